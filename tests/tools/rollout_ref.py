#!/usr/bin/python3
# rollout_ref.py — independent replay of `bellcheck rollout` on tests/tasks/noisy-walk.task: the
# SPDX-License-Identifier: GPL-3.0-or-later
# random streams as docs/methods.md ("Simulation") describes them, the walk's formulas written
# out in Python with the same floating-point operations, the policy read from a CSV file.
#   splitmix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number generators", 2014):
#   output i+1 of the generator started at s is mix(s + (i+1) * 0x9E3779B97F4A7C15); episode e's
#   key is output e+1 from the seed, its draw j is output j+1 from the key; a draw z becomes
#   ((z >> 11) + 0.5) / 2^53.  Draw 0 is the initial state, draws 1 + 2s and 2 + 2s the noise
#   and the action draw of step s: a stochastic policy takes `back` when that draw is below
#   P(back), as the simulation walks the cumulative probabilities in action order.
# usage: rollout_ref.py POLICY.csv SEED EPISODES      (CSV state,action[,prob])
# Prints: mean_return success_rate steps_p50 (the mean as a double, repr), one line.
import csv
import math
import sys

M64 = (1 << 64) - 1
GOLDEN = 0x9E3779B97F4A7C15


def mix(z):
    z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & M64
    z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & M64
    return z ^ (z >> 31)


def output(s, i):
    """Output i+1 of splitmix64 started at state s."""
    return mix((s + (i + 1) * GOLDEN) & M64)


def unit(z):
    return ((z >> 11) + 0.5) * 2.0 ** -53


def main():
    policy_path, seed, episodes = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
    p_back = {}  # cell -> probability of `back`
    with open(policy_path) as f:
        for row in csv.DictReader(f):
            cell = int(row["state"][1:])
            prob = float(row.get("prob") or 1.0)
            p_back[cell] = p_back.get(cell, 0.0) + (prob if row["action"] == "back" else 0.0)
    total, successes, steps_all = 0.0, 0, []
    for e in range(episodes):
        key = output(seed, e)
        x = 0.0 + unit(output(key, 0)) * (2.0 - 0.0)    # initial x uniform 0 2
        ret, weight, steps, stopped = 0.0, 1.0, 0, False
        for s in range(200):                            # limit 200
            w = -0.5 + unit(output(key, 1 + 2 * s)) * (0.5 - -0.5)
            cell = min(max(math.floor((x - 0.0) / 1.0), 0), 9)
            u = -1.0 if unit(output(key, 2 + 2 * s)) < p_back[cell] else 1.0
            x2 = min(max(x + 0.5 * u + w, 0.0), 10.0)   # next x, clamped to its range
            r = -1 + x2 / 10
            ret += weight * r
            weight *= 0.9
            x = x2
            steps = s + 1
            if x2 >= 9:
                stopped = True
                break
        total += ret
        successes += stopped
        steps_all.append(steps)
    steps_all.sort()
    p50 = steps_all[math.ceil(0.5 * episodes) - 1]
    print(repr(total / episodes), successes / episodes, p50)


if __name__ == "__main__":
    main()
