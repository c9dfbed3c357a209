#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""gen_demo_drone.py — writes the invented demo for `score`: a delivery drone
crossing a gusty yard to its charging pad (models/demo-yard-drone.bell), and a
Q-table of the kind a tabular learner leaves behind (models/demo-yard-drone-q.csv).

The Q-table is made, not learned: the optimal Q-values plus seeded noise, with
two faults a grader must find — the learner never explored the north-east
corner well, so there `hover` looks cheapest (a loop that never reaches the
pad, which the wind can push the drone into), and noise flips the best action
in a few cells.
Invented scenario; run with /usr/bin/python3 (Debian numpy).
"""
import sys
import numpy as np

W, H = 6, 4                      # columns x rows; row 0 is the south edge
PAD = (5, 0)                     # the charging pad (terminal)
GUSTY = {(2, 1), (2, 2), (3, 1)} # cells where every action costs 3 instead of 1
ACTIONS = ["north", "south", "east", "west", "hover"]
MOVES = {"north": (0, 1), "south": (0, -1), "east": (1, 0), "west": (-1, 0), "hover": (0, 0)}


def name(c):
    return "x%dy%d" % c


def step(c, d):
    x, y = c[0] + d[0], c[1] + d[1]
    return (x, y) if 0 <= x < W and 0 <= y < H else c


def outcomes(c, a):
    """Intended move 8/10; the wind pushes east 1/10; 1/10 nothing happens. Hover stays."""
    if a == "hover":
        return [(c, 10)]
    out = {}
    for cell, p in ((step(c, MOVES[a]), 8), (step(c, (1, 0)), 1), (c, 1)):
        out[cell] = out.get(cell, 0) + p
    return [(cell, p) for cell, p in out.items()]


def main():
    cells = [(x, y) for y in range(H) for x in range(W)]
    live = [c for c in cells if c != PAD]
    cost = {c: (3 if c in GUSTY else 1) for c in cells}
    # Optimal expected cost to the pad (value iteration to machine precision).
    v = {c: 0.0 for c in cells}
    for _ in range(5000):
        nv = {c: 0.0 for c in cells}
        for c in live:
            nv[c] = min(cost[c] + sum(p / 10 * v[n] for n, p in outcomes(c, a)) for a in ACTIONS if a != "hover")
        if max(abs(nv[c] - v[c]) for c in cells) < 1e-13:
            v = nv
            break
        v = nv
    rng = np.random.default_rng(20261201)
    with open(sys.argv[1], "w") as f:
        f.write("# demo-yard-drone — an invented scenario: a delivery drone crosses a 6 x 4 yard\n"
                "# to its charging pad in the south-east corner.  Each move costs 1 (3 in the\n"
                "# gusty cells around x2-x3); the intended move happens with probability 8/10,\n"
                "# the wind pushes it east with 1/10, and with 1/10 it stays put.  `hover`\n"
                "# stays put for sure.  Objective: least expected cost to the pad.\n"
                "bell 1\nname demo-yard-drone\ndiscount 1\nobjective min\n")
        f.write("initial %s\nterminal %s\n" % (name((0, 3)), name(PAD)))
        f.write("actions %s\n\n" % " ".join(ACTIONS))
        for c in live:
            for a in ACTIONS:
                succ = " ".join("%s %d/10" % (name(n), p) if a != "hover" else name(n) for n, p in outcomes(c, a))
                f.write("%s %s %d -> %s\n" % (name(c), a, cost[c], succ))
    with open(sys.argv[2], "w") as f:
        f.write("state," + ",".join(ACTIONS) + "\n")
        for c in live:
            row = []
            for a in ACTIONS:
                q = cost[c] + sum(p / 10 * v[n] for n, p in outcomes(c, a))
                noise = rng.normal(0, 0.3)             # what a finite amount of training leaves
                q += abs(noise) if a == "hover" else noise
                if a == "hover" and c == (5, 3):
                    q = v[c] - 1.5                     # the under-explored corner: hover looks best
                row.append("%.4f" % q)
            f.write(name(c) + "," + ",".join(row) + "\n")


if __name__ == "__main__":
    main()
