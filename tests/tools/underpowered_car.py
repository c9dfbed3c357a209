#!/usr/bin/python3
# underpowered_car.py — independent reference for the formula engine: trajectories of the
# SPDX-License-Identifier: GPL-3.0-or-later
# under-powered car (Moore 1990) with the dynamics as given by Sutton & Barto, Reinforcement
# Learning: An Introduction (2nd ed., 2018), Section 10.1 (from memory):
#   v' = bound(v + 0.001 a - 0.0025 cos(3 x)),  x' = bound(x + v'),
#   -1.2 <= x <= 0.5, -0.07 <= v <= 0.07, v' = 0 when x' reaches the left bound,
#   the episode ends when x' reaches the right bound.
# usage: underpowered_car.py X0 V0 [X0 V0 ...]
# For each start, follows the policy "throttle along the velocity" (forward when v >= 0,
# else reverse) for at most 1000 steps and prints one line per step:
#   episode step x' v' stop   (numbers as repr, which round-trips doubles)
import math
import sys


def bound(v, lo, hi):
    return min(max(v, lo), hi)


def main():
    args = [float(a) for a in sys.argv[1:]]
    for e in range(len(args) // 2):
        x, v = args[2 * e], args[2 * e + 1]
        for k in range(1000):
            a = 1 if v >= 0 else -1
            v2 = bound(v + 0.001 * a - 0.0025 * math.cos(3 * x), -0.07, 0.07)
            x2 = bound(x + v2, -1.2, 0.5)
            if x2 <= -1.2:
                v2 = 0.0
            stop = x2 >= 0.5
            print(e, k, repr(x2), repr(v2), int(stop))
            x, v = x2, v2
            if stop:
                break


main()
