# score_ref.py — independent reference for scoring an agent on a .bell model: regret, residual, agreement (numpy, dense).
# SPDX-License-Identifier: GPL-3.0-or-later
"""Reference score of a Q-table or policy on a .bell model, written apart from bellcheck.

Usage: /usr/bin/python3 score_ref.py MODEL (--q CSV | --policy CSV | --qstar)
                                     [--discount G] [--q-discount G]

CSV files have no header: `state,action,q` lines (Q-table) or
`state,action,prob` lines (policy).  A state with no line is not covered:
there the agent takes the optimal action and the state is left out of the
statistics.  --qstar prints the optimal Q-values `qstar STATE ACTION VALUE`
and nothing else.

Prints `key value` lines: optimal_initial, value_initial, regret_initial,
regret_max_state, worst_state, n_tied, n_wrong, agreement_states,
agreement_weighted, residual, q_error, regret_bound, then `value STATE V`
and `regret STATE R` per state.

Definitions (common practice): the greedy action of a Q-table has the
largest Q (smallest for objective min), first in action order on exact
ties; V of a policy solves (I - g P_pi) v = r_pi over the non-terminal
states (dense numpy solve); regret = V* - V (V - V* for min); the Bellman
residual is max |T Q - Q| with (T Q)(s,a) = r + g_q sum_t P(t) best_a' Q(t,a')
over pairs whose successors are all covered; q_error = max |Q - Q*| with
Q* = r + g P V*; the regret bound 2 residual / (1 - g) (a Q-function
Bellman-residual bound, cf. Williams & Baird 1993) when g < 1, g_q = g and
every state is covered, else nan.  An action is optimal when
V*(s) - Q*(s,a) <= 1e-9 max(1, |V*(s)|) (in the objective's direction);
agreement weights are the expected discounted visits from the initial
distribution, solved from the transposed system.  V* comes from
ref_solve.py's policy iteration.  Traps (discount 1, no termination) are not
handled: the evaluation then fails with exit status 3.
"""
import os
import sys
from fractions import Fraction

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import ref_solve  # noqa: E402  (the independent parser and solver)


def read_csv(path, m):
    """{(state index, pair index): float} from `state,action,value` lines."""
    out = {}
    with open(path, encoding="utf-8") as f:
        for line in f:
            line = line.strip()
            if not line:
                continue
            st, act, val = line.split(",")
            s, a = m.index[st], m.action_index[act]
            pair = next(k for k in m.state_pairs[s] if m.pairs[k][1] == a)
            out[(s, pair)] = float(val)
    return out


def best_in(vals, sign):
    """Index of the first best value (largest of sign * value) and how many tie."""
    keys = [sign * x for x in vals]
    top = max(keys)
    return keys.index(top), sum(1 for k in keys if k == top)


def agent_policy(m, a, sign, qtab, ptab, opt_policy):
    """pi[s] = {pair: prob}; covered[s]; number of tied states."""
    n = len(m.states)
    pi, covered, tied = [dict() for _ in range(n)], [s in m.terminal for s in range(n)], 0
    for s in range(n):
        if s in m.terminal:
            continue
        pairs = m.state_pairs[s]
        if qtab is not None and all((s, k) in qtab for k in pairs):
            i, count = best_in([qtab[(s, k)] for k in pairs], sign)
            tied += count > 1
            pi[s] = {pairs[i]: 1.0}
            covered[s] = True
        elif ptab is not None and any((s, k) in ptab for k in pairs):
            pi[s] = {k: ptab[(s, k)] for k in pairs if (s, k) in ptab}
            covered[s] = True
        else:
            pi[s] = {int(opt_policy[s]): 1.0}
    return pi, covered, tied


def policy_matrix(m, a, pi):
    """Dense P_pi (states x states) and r_pi in the model's sign."""
    n = len(m.states)
    P, r = np.zeros((n, n)), np.zeros(n)
    for s in range(n):
        for k, w in pi[s].items():
            r[s] += w * float(m.pairs[k][2])
            for nxt, prob in m.pairs[k][3]:
                P[s, nxt] += w * float(prob)
    return P, r


def evaluate(m, g, P, r):
    """Values (0 at terminal states) and discounted visits from the initial distribution."""
    n = len(m.states)
    live = [s for s in range(n) if s not in m.terminal]
    A = np.eye(len(live)) - g * P[np.ix_(live, live)]
    v, d = np.zeros(n), np.zeros(n)
    if np.linalg.matrix_rank(A) < len(live):
        raise ref_solve.SolveError("the policy does not terminate from some state")
    v[live] = np.linalg.solve(A, r[live])
    init = np.array([float(m.initial.get(s, 0)) for s in live])
    d[live] = np.linalg.solve(A.T, init)
    return v, d


def q_stats(m, sign, g, gq, qtab, covered, vstar):
    """Residual, max |Q - Q*| and the regret bound."""
    def best_q(t):
        if t in m.terminal:
            return 0.0
        vals = [qtab[(t, k)] for k in m.state_pairs[t]]
        return vals[best_in(vals, sign)[0]]
    res, err, complete = 0.0, 0.0, all(covered)
    for s in range(len(m.states)):
        if s in m.terminal or not covered[s]:
            continue
        for k in m.state_pairs[s]:
            _, _, rew, succ = m.pairs[k]
            qs = float(rew) + g * sum(float(p) * vstar[t] for t, p in succ)
            err = max(err, abs(qtab[(s, k)] - qs))
            if all(covered[t] for t, p in succ if p > 0):
                tq = float(rew) + gq * sum(float(p) * best_q(t) for t, p in succ if p > 0)
                res = max(res, abs(tq - qtab[(s, k)]))
    bound = 2 * res / (1 - g) if g < 1 and gq == g and complete else float("nan")
    return res, err, bound


def agreement(m, sign, g, pi, covered, vstar, visits):
    """Share of covered live states using only optimal pairs, plain and visit-weighted; wrong count."""
    n_cov = n_ok = 0
    w_all = w_ok = 0.0
    for s in range(len(m.states)):
        if s in m.terminal or not covered[s]:
            continue
        ok = True
        for k, w in pi[s].items():
            _, _, rew, succ = m.pairs[k]
            qs = float(rew) + g * sum(float(p) * vstar[t] for t, p in succ)
            if w > 0 and sign * (vstar[s] - qs) > 1e-9 * max(1.0, abs(vstar[s])):
                ok = False
        n_cov += 1
        n_ok += ok
        w_all += visits[s]
        w_ok += visits[s] if ok else 0.0
    share = n_ok / n_cov if n_cov else float("nan")
    weighted = w_ok / w_all if w_all > 0 else float("nan")
    return share, weighted, n_cov - n_ok


def main(argv):
    args, opts, i = [], {}, 1
    while i < len(argv):
        if argv[i] in ("--q", "--policy", "--discount", "--q-discount"):
            opts[argv[i]] = argv[i + 1]
            i += 2
        elif argv[i] == "--qstar":
            opts["--qstar"] = True
            i += 1
        else:
            args.append(argv[i])
            i += 1
    if len(args) != 1:
        print(__doc__.split("\n\n")[1], file=sys.stderr)
        return 2
    with open(args[0], encoding="utf-8") as f:
        m = ref_solve.parse(f.read())
    if "--discount" in opts:
        m.discount = Fraction(opts["--discount"])
    g = float(m.discount)
    gq = float(Fraction(opts["--q-discount"])) if "--q-discount" in opts else g
    sign = -1.0 if m.objective == "min" else 1.0
    v_max, opt_policy, a = ref_solve.solve_float(m)
    vstar = sign * v_max
    if "--qstar" in opts:
        for k, (s, act, rew, succ) in enumerate(m.pairs):
            qs = float(rew) + g * sum(float(p) * vstar[t] for t, p in succ)
            print("qstar %s %s %.17g" % (m.states[s], m.actions[act], qs))
        return 0
    qtab = read_csv(opts["--q"], m) if "--q" in opts else None
    ptab = read_csv(opts["--policy"], m) if "--policy" in opts else None
    pi, covered, tied = agent_policy(m, a, sign, qtab, ptab, opt_policy)
    P, r = policy_matrix(m, a, pi)
    try:
        v, visits = evaluate(m, g, P, r)
    except ref_solve.SolveError as e:
        print("score_ref: %s" % e, file=sys.stderr)
        return 3
    init = {s: float(p) for s, p in m.initial.items()}
    opt_init = sum(p * vstar[s] for s, p in init.items())
    val_init = sum(p * v[s] for s, p in init.items())
    regret = [sign * (vstar[s] - v[s]) if covered[s] else float("nan") for s in range(len(v))]
    worst = max((s for s in range(len(v)) if covered[s]), key=lambda s: (regret[s], -s))
    out = [("optimal_initial", opt_init), ("value_initial", val_init),
           ("regret_initial", sign * (opt_init - val_init)),
           ("regret_max_state", regret[worst]), ("worst_state", m.states[worst]),
           ("n_tied", tied)]
    share, weighted, wrong = agreement(m, sign, g, pi, covered, vstar, visits)
    out += [("n_wrong", wrong), ("agreement_states", share), ("agreement_weighted", weighted)]
    if qtab is not None:
        res, err, bound = q_stats(m, sign, g, gq, qtab, covered, vstar)
        out += [("residual", res), ("q_error", err), ("regret_bound", bound)]
    for key, val in out:
        print("%s %s" % (key, "%.17g" % val if isinstance(val, float) else val))
    for s, name in enumerate(m.states):
        print("value %s %.17g" % (name, v[s]))
        print("regret %s %.17g" % (name, regret[s]))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
