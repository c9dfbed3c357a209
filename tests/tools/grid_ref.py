#!/usr/bin/python3
# grid_ref.py — independent check of `bellcheck grid` on the crater rover (models/crater-rover.task,
# SPDX-License-Identifier: GPL-3.0-or-later
# an invented task): recomputes, in plain Python, what each scheme must produce for every
# state-action pair and compares with the written .bell model.
#   sample: K = m*m points per cell at the midpoints of an m x m sub-grid; the probability of a
#           successor cell is exactly count/K (fractions compared exactly), reward -1;
#   center: the successor of the cell's centre, probability 1;
#   interp: the weights are non-negative multiples of 2^-30 summing to exactly 1, their corners
#           are neighbouring nodes (cell centres) and the weighted corners reproduce the node's
#           image (barycentric coordinates, up to the 2^-30 rounding);
#   stuck:  prints the cells whose centre every action keeps in the cell although it moves.
# usage: grid_ref.py MODE BELL NX NV [M]      (MODE sample, center, interp; stuck NX NV)
# Prints "ok N" (pairs checked) or the first mismatches, and exits 1 on any mismatch.
import math
import sys
from fractions import Fraction

XLO, XHI, VLO, VHI = -1.5, 0.7, -0.08, 0.08
ACTIONS = {"reverse": -1.0, "idle": 0.0, "forward": 1.0}


def clamp(v, lo, hi):
    return min(max(v, lo), hi)


def step(x, v, a):
    """The crater rover's dynamics as written in its task file."""
    v2 = clamp(v + 0.0012 * a - 0.0030 * math.cos(2.5 * x), -0.08, 0.08)
    x2 = clamp(x + v2, -1.5, 0.7)
    return x2, v2, x2 >= 0.6


class Grid:
    def __init__(self, nx, nv):
        self.n = (nx, nv)
        self.lo = (XLO, VLO)
        self.w = ((XHI - XLO) / nx, (VHI - VLO) / nv)

    def index(self, j, value):
        f = (value - self.lo[j]) / self.w[j]
        if not f >= 0:
            return 0
        return int(f) if f < self.n[j] else self.n[j] - 1

    def cell(self, x, v):
        return "c%d_%d" % (self.index(0, x), self.index(1, v))

    def centre(self, j, i):
        return self.lo[j] + (i + 0.5) * self.w[j]


def read_bell(path):
    pairs = {}
    for line in open(path):
        t = line.split()
        if len(t) >= 4 and t[3] == "->":
            succ = {}
            rest = t[4:]
            k = 0
            while k < len(rest):
                name = rest[k]
                p = Fraction(1)
                if k + 1 < len(rest) and not rest[k + 1][0].isalpha():
                    p = Fraction(rest[k + 1])
                    k += 1
                succ[name] = succ.get(name, 0) + p
                k += 1
            pairs[(t[0], t[1])] = (Fraction(t[2]), succ)
    return pairs


def expected_counted(g, i, j, a, m):
    counts = {}
    for p in range(m * m):
        px, pv = p // m, p % m
        x = g.lo[0] + (i + (px + 0.5) / m) * g.w[0]
        v = g.lo[1] + (j + (pv + 0.5) / m) * g.w[1]
        x2, v2, stop = step(x, v, a)
        name = "stop" if stop else g.cell(x2, v2)
        counts[name] = counts.get(name, 0) + 1
    return {k: Fraction(c, m * m) for k, c in counts.items()}


def check_interp(g, i, j, a, succ, bad):
    x2, v2, stop = step(g.centre(0, i), g.centre(1, j), a)
    if stop:
        return succ == {"stop": 1} or bad.append("stop expected")
    if sum(succ.values()) != 1:
        return bad.append("weights sum to %s" % sum(succ.values()))
    image = (x2, v2)
    node = [min(max((image[d] - g.lo[d]) / g.w[d] - 0.5, 0), g.n[d] - 1) for d in (0, 1)]
    got = [0.0, 0.0]
    for name, w in succ.items():
        if w < 0 or (w * 2 ** 30).denominator != 1:
            return bad.append("weight %s is not a multiple of 2^-30" % w)
        idx = [int(s) for s in name[1:].split("_")]
        for d in (0, 1):
            if abs(idx[d] - node[d]) > 1:
                return bad.append("corner %s is not next to the image" % name)
            got[d] += float(w) * g.centre(d, idx[d])
    want = [g.centre(d, 0) + node[d] * g.w[d] for d in (0, 1)]
    for d in (0, 1):
        if abs(got[d] - want[d]) > 4 * 2 ** -30 * max(abs(g.lo[d]), abs(g.lo[d] + g.n[d] * g.w[d])) + 1e-12:
            return bad.append("weighted corners give %r, image %r" % (got, want))


def main():
    mode = sys.argv[1]
    if mode == "stuck":
        g = Grid(int(sys.argv[2]), int(sys.argv[3]))
        for i in range(g.n[0]):
            for j in range(g.n[1]):
                x, v = g.centre(0, i), g.centre(1, j)
                here = "c%d_%d" % (i, j)
                imgs = [step(x, v, a) for a in ACTIONS.values()]
                stays = all(not s and g.cell(x2, v2) == here for x2, v2, s in imgs)
                moves = any(s or (x2, v2) != (x, v) for x2, v2, s in imgs)
                if stays and moves:
                    print(here)
        return 0
    pairs = read_bell(sys.argv[2])
    g = Grid(int(sys.argv[3]), int(sys.argv[4]))
    m = int(sys.argv[5]) if len(sys.argv) > 5 else 1
    bad = []
    for i in range(g.n[0]):
        for j in range(g.n[1]):
            for an, a in ACTIONS.items():
                key = ("c%d_%d" % (i, j), an)
                if key not in pairs:
                    bad.append("%s %s: no line" % key)
                    continue
                reward, succ = pairs[key]
                if reward != -1:
                    bad.append("%s %s: reward %s" % (key[0], key[1], reward))
                if mode == "interp":
                    before = len(bad)
                    check_interp(g, i, j, a, succ, bad)
                    if len(bad) > before:
                        bad[-1] = "%s %s: %s" % (key[0], key[1], bad[-1])
                    continue
                want = expected_counted(g, i, j, a, m if mode == "sample" else 1) if mode == "sample" \
                    else {("stop" if step(g.centre(0, i), g.centre(1, j), a)[2] else
                           g.cell(*step(g.centre(0, i), g.centre(1, j), a)[:2])): Fraction(1)}
                if want != succ:
                    bad.append("%s %s: want %s, found %s" % (key[0], key[1], want, succ))
    if bad:
        print("\n".join(bad[:5]))
        return 1
    print("ok %d" % (g.n[0] * g.n[1] * len(ACTIONS)))
    return 0


sys.exit(main())
