# score_exact_ref.py — exact regret of a deterministic policy on a .bell model, in Python fractions, for checking score's exact proofs.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: /usr/bin/python3 score_exact_ref.py MODEL POLICY.csv

POLICY.csv: a header `state,action`, then one line per non-terminal state.
Prints JSON {"regret_initial": "p/q", "regret_max_state": "p/q",
"value_initial": "p/q"}: V* by the reference solver's exact policy iteration
(ref_solve.py: its own parser, Python fractions), V of the policy by exact
Gaussian elimination over fractions, regret = V* - V (V - V* for min).
Written apart from bellcheck (common practice: regret as the difference of
the optimal and the policy's value).
"""
import json
import os
import sys
from fractions import Fraction

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import ref_solve  # noqa: E402


def frac_text(x):
    return str(x.numerator) if x.denominator == 1 else "%d/%d" % (x.numerator, x.denominator)


def main(argv):
    if len(argv) != 3:
        print(__doc__, file=sys.stderr)
        return 2
    with open(argv[1], encoding="utf-8") as f:
        m = ref_solve.parse(f.read())
    sign = -1 if m.objective == "min" else 1
    _, pol_star, _ = ref_solve.solve_float(m)
    vstar, _ = ref_solve.solve_exact(m, pol_star)           # maximising sense
    policy = [-1] * len(m.states)
    with open(argv[2], encoding="utf-8") as f:
        for line in f.read().split("\n")[1:]:
            if not line.strip():
                continue
            st, act = line.strip().split(",")
            s, a = m.index[st], m.action_index[act]
            policy[s] = next(k for k in m.state_pairs[s] if m.pairs[k][1] == a)
    v = ref_solve._exact_evaluate(m, policy, sign)          # maximising sense
    regret = [vstar[s] - v[s] for s in range(len(m.states))]
    init = lambda x: sum(p * x[s] for s, p in m.initial.items())
    out = {"regret_initial": frac_text(init(vstar) - init(v)),
           "regret_max_state": frac_text(max(regret[s] for s in range(len(m.states))
                                             if s not in m.terminal)),
           "value_initial": frac_text(sign * init(v))}
    json.dump(out, sys.stdout)
    print()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
