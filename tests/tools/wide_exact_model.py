# wide_exact_model.py — writes a model whose exact certificate takes seconds to verify (Ctrl-C during verify: tests/cli/hostile_inputs.sh).
# SPDX-License-Identifier: GPL-3.0-or-later
"""usage: wide_exact_model.py STATES SUCCESSORS DIGITS SEED > model.bell

Discount 9/10.  State s_i has two actions: `stop` pays a fraction r_i in
(0, 1) whose denominator has DIGITS digits and ends in the terminal state
`end`; `spread` pays -1 and moves to SUCCESSORS states drawn at random, each
with probability 1/SUCCESSORS.  By hand: `spread` earns at most
-1 + 9/10 * 1 < 0 < r_i, so V*(s_i) = r_i and `stop` is optimal everywhere.
The exact check of Q(s_i, spread) <= r_i adds SUCCESSORS fractions whose
denominators share almost no factor, so every sum grows to thousands of
digits: the check costs far more than reading the file or solving the model."""
import random
import sys


def main():
    n, k, digits, seed = (int(a) for a in sys.argv[1:5])
    rng = random.Random(seed)
    w = sys.stdout.write
    w("bell 1\nname wide-exact\ndiscount 9/10\nterminal end\n")
    for i in range(n):
        q = rng.randrange(10 ** (digits - 1), 10 ** digits)
        w("s%d stop %d/%d -> end\n" % (i, rng.randrange(1, q), q))
        succ = rng.sample(range(n), k)
        w("s%d spread -1 -> %s\n" % (i, " ".join("s%d 1/%d" % (j, k) for j in succ)))


if __name__ == "__main__":
    main()
