# bold_play.py — exact win probability of bold play in the gambler's problem, as expected values for the gambler model.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: /usr/bin/python3 bold_play.py [--goal N] [--p-heads P] [--fractions]

Prints JSON {state: value} in the naming of tests/tools/gen_gambler.py:
c<s> -> probability that bold play (stake min(s, goal - s)) starting from
capital s reaches the goal; the terminal states broke and win -> 0 (the +1 is
paid on the move into `win`, so the terminal state itself is worth nothing).

Source: Dubins, L. E. & Savage, L. J., How to Gamble If You Must (1965):
in a subfair game (p < 1/2) bold play maximises the probability of reaching
the goal.  With x = s / goal its success probability f solves
    f(0) = 0, f(1) = 1,
    f(x) = p f(2x)              for x <= 1/2,
    f(x) = p + (1 - p) f(2x - 1) for x > 1/2.
The sequence of x is eventually periodic for rational x, so following it
until x repeats gives f(x) exactly as a rational: along the way
f(start) = a + b f(x); when x comes back the two expressions are equated.
This shares nothing with the model reader or the solvers.
"""
import json
import sys
from fractions import Fraction


def bold_play(x, p):
    """Exact success probability of bold play from fraction-of-goal x."""
    q = 1 - p
    a, b = Fraction(0), Fraction(1)  # invariant: f(start) = a + b f(x)
    seen = {}
    while True:
        if x == 0:
            return a
        if x == 1:
            return a + b
        if x in seen:
            a0, b0 = seen[x]
            fx = (a - a0) / (b0 - b)  # a0 + b0 f(x) = a + b f(x)
            return a0 + b0 * fx
        seen[x] = (a, b)
        if x <= Fraction(1, 2):
            b, x = b * p, 2 * x
        else:
            a, b, x = a + b * p, b * q, 2 * x - 1


def main(argv):
    goal, p, fractions = 100, Fraction("0.4"), False
    i = 1
    while i < len(argv):
        if argv[i] == "--goal":
            goal, i = int(argv[i + 1]), i + 2
        elif argv[i] == "--p-heads":
            p, i = Fraction(argv[i + 1]), i + 2
        elif argv[i] == "--fractions":
            fractions, i = True, i + 1
        else:
            print(__doc__.split("\n\n")[0], file=sys.stderr)
            return 2
    out = {"broke": 0, "win": 0}
    for s in range(1, goal):
        f = bold_play(Fraction(s, goal), p)
        out["c%d" % s] = ("%d/%d" % (f.numerator, f.denominator)) if fractions else float(f)
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
