# compare_values.py — compares a `bellcheck solve --json` report with expected values; one PASS/FAIL line per check.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: /usr/bin/python3 compare_values.py NAME REPORT EXPECTED TOL
                                          [--model MODEL] [--method M] [--plain]

REPORT is the JSON written by `bellcheck solve --json`; EXPECTED is a JSON
object {state: value} (numbers, or exact "p/q" strings); TOL is the largest
accepted |reported - expected| per state.  --plain: REPORT is itself a plain
{state: value} object (to compare two references); only `values` is checked.  Checks, each printed as
"PASS NAME <what>" or "FAIL NAME <what>: why":
  values        report["values"] has exactly the expected states, each within TOL;
  method        (--method) report["method"] is M;
with --model MODEL (the .bell file, read by the reference parser of
ref_solve.py, never by bellcheck):
  summary       report["model"] counts, discount and objective match the file;
  value_initial report["value_initial"] = sum of initial probability * expected value, within TOL;
  policy        the reported policy, evaluated independently (policy
                evaluation of ref_solve.py), is worth the expected values
                within TOL in every state; under discount 1 a policy that
                never terminates (for example one that loops on a zero-reward
                action, which looks greedy) fails here.
Exit status 0 when every check passed, 1 otherwise, 2 on bad usage.
"""
import json
import os
import sys
from fractions import Fraction

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import ref_solve  # noqa: E402  (the reference parser and policy evaluation)


class Checker:
    def __init__(self, name):
        self.name, self.failed = name, 0

    def result(self, what, why):
        if why is None:
            print("PASS %s %s" % (self.name, what))
        else:
            print("FAIL %s %s: %s" % (self.name, what, why))
            self.failed += 1


def _number(x):
    if isinstance(x, bool) or x is None:
        return None
    if isinstance(x, (int, float)):
        return float(x)
    try:
        return float(Fraction(x))
    except (TypeError, ValueError, ZeroDivisionError):
        return None


def check_values(got, expected, tol):
    if not isinstance(got, dict):
        return "no \"values\" object in the report"
    missing = sorted(set(expected) - set(got))
    extra = sorted(set(got) - set(expected))
    if missing or extra:
        return "states missing %s, unexpected %s" % (missing[:5], extra[:5])
    bad, worst = 0, None
    for s, e in expected.items():
        g = _number(got[s])
        d = float("inf") if g is None else abs(g - e)
        if not d <= tol:
            bad += 1
            if worst is None or d > worst[0]:
                worst = (d, s, got[s], e)
    if bad:
        d, s, g, e = worst
        return "%d of %d states off by more than %g; worst %s: reported %r, expected %.12g (diff %.3g)" % (
            bad, len(expected), tol, s, g, e, d)
    return None


def check_summary(rep, m):
    mod = rep.get("model")
    if not isinstance(mod, dict):
        return "no \"model\" object in the report"
    want = {"states": len(m.states), "actions": len(m.actions), "pairs": len(m.pairs),
            "transitions": sum(len(p[3]) for p in m.pairs), "objective": m.objective}
    diffs = ["%s %r (file: %r)" % (k, mod.get(k), v) for k, v in want.items() if mod.get(k) != v]
    g = _number(mod.get("discount"))
    if g is None or abs(g - float(m.discount)) > 1e-15:
        diffs.append("discount %r (file: %s)" % (mod.get("discount"), m.discount))
    return "; ".join(diffs) if diffs else None


def check_initial(rep, m, expected, tol):
    want = sum(float(p) * expected[m.states[s]] for s, p in m.initial.items())
    got = _number(rep.get("value_initial"))
    if got is None or not abs(got - want) <= tol:
        return "reported %r, expected %.12g" % (rep.get("value_initial"), want)
    return None


def _non_terminating(m, choice):
    """States from which the fixed policy `choice` reaches no terminal state."""
    preds = [[] for _ in m.states]
    for s, k in enumerate(choice):
        if k >= 0:
            for nxt, p in m.pairs[k][3]:
                if p > 0:
                    preds[nxt].append(s)
    reach, stack = set(m.terminal), list(m.terminal)
    while stack:
        for s in preds[stack.pop()]:
            if s not in reach:
                reach.add(s)
                stack.append(s)
    return [m.states[s] for s in range(len(m.states)) if s not in reach]


def check_policy(rep, m, expected, tol):
    pol = rep.get("policy")
    if not isinstance(pol, dict):
        return "no \"policy\" object in the report"
    if m.horizon:
        return None  # stage-dependent policies are not evaluated here
    choice = np.full(len(m.states), -1, dtype=np.int64)
    for s, name in enumerate(m.states):
        if s in m.terminal:
            continue
        act = pol.get(name)
        ks = [k for k in m.state_pairs[s] if m.actions[m.pairs[k][1]] == act]
        if not ks:
            return "state %s: reported action %r is not an action of that state" % (name, act)
        choice[s] = ks[0]
    a = ref_solve.Arrays(m)
    try:
        v = ref_solve._evaluate(a, choice)
    except ref_solve.SolveError as e:
        stuck = _non_terminating(m, choice)
        return "cannot evaluate the reported policy: %s; it never terminates from %s" % (
            e, " ".join("%s (%s)" % (n, pol.get(n)) for n in stuck[:5]) or "?")
    sign = -1.0 if m.objective == "min" else 1.0
    worst = max(((abs(sign * v[s] - expected[n]), n) for s, n in enumerate(m.states)),
                default=(0.0, None))
    if not worst[0] <= tol:
        n = worst[1]
        s = m.index[n]
        return "the policy is worth %.12g at %s (action %s), the optimum is %.12g" % (
            sign * v[s], n, pol.get(n), expected[n])
    return None


def main(argv):
    args, opts, i = [], {}, 1
    while i < len(argv):
        if argv[i] in ("--model", "--method") and i + 1 < len(argv):
            opts[argv[i]], i = argv[i + 1], i + 2
        else:
            if argv[i] == "--plain":
                opts["--plain"] = True
            else:
                args.append(argv[i])
            i += 1
    if len(args) != 4:
        print(__doc__.split("\n\n")[0], file=sys.stderr)
        return 2
    name, report_path, expected_path, tol = args[0], args[1], args[2], float(args[3])
    c = Checker(name)
    try:
        with open(expected_path, encoding="utf-8") as f:
            expected = {k: _number(v) for k, v in json.load(f).items()}
    except (OSError, ValueError) as e:
        c.result("values", "cannot read expected values: %s" % e)
        return 1
    try:
        with open(report_path, encoding="utf-8") as f:
            rep = json.load(f)
        if not isinstance(rep, dict):
            raise ValueError("not a JSON object")
        if opts.get("--plain"):
            rep = {"values": rep}
    except (OSError, ValueError) as e:
        c.result("values", "report is not valid JSON: %s" % e)
        return 1
    c.result("values", check_values(rep.get("values"), expected, tol))
    if "--method" in opts:
        got = rep.get("method")
        c.result("method", None if got == opts["--method"] else "report says %r" % (got,))
    if "--model" in opts:
        with open(opts["--model"], encoding="utf-8") as f:
            m = ref_solve.parse(f.read())
        c.result("summary", check_summary(rep, m))
        if set(expected) != set(m.states):
            why = "the expected values do not name exactly the model's states"
            c.result("value_initial", why)
            c.result("policy", why)
        else:
            c.result("value_initial", check_initial(rep, m, expected, tol))
            c.result("policy", check_policy(rep, m, expected, tol))
    return 1 if c.failed else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
