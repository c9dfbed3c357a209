# ref_solve.py — independent reference solver for .bell models: own exact parser, policy iteration, JSON values.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Reference optimum of a .bell model, written independently of the C reader.

Usage: /usr/bin/python3 ref_solve.py MODEL [--exact] [--fractions] [--policy]

Prints one JSON object {state: value} (every state, terminal states 0) on
standard output.  --policy prints {"values": {...}, "policy": {state: action}}
instead.  --exact re-evaluates and re-checks the final policy in exact
rational arithmetic (small models only) and continues policy iteration
exactly if a floating-point tie hid a better action; --fractions prints the
exact values as "p/q" strings (implies --exact).

Method (common practice; policy iteration as in Puterman, Markov Decision
Processes, 1994, chapter 6, from memory): evaluation by a sparse direct
solve, an action switched only on strict improvement, until the policy is
stable; then one Bellman backup must reproduce the values.  objective min is
solved as max of the negated rewards.  A finite horizon is solved by
backward induction (values of stage 0).

Discount 1: the optimum is taken over the policies that reach a terminal
state with probability 1; a policy that never terminates is worth minus
infinity (plus infinity for costs), as bellcheck defines it, even on a loop
of zero reward.  Policy iteration starts from a terminating policy (each
state takes an action with a successor one layer closer to a terminal
state).  Why the result is that optimum (stochastic shortest paths, common
practice): if an improved policy left a closed set C for ever, summing its
improvement over C weighted by C's stationary distribution shows C's mean
reward is > 0 (a positive cycle: unbounded model, evaluation fails) or = 0
with no strict switch in C, so C was already closed under the previous,
terminating policy, a contradiction.  At the end V = T V with V the value of
a terminating policy; for the best terminating policy mu*, T_mu* V <= V, and
iterating T_mu* converges to its value, so V* <= V <= V*.

Exit status: 0 ok, 2 the model cannot be read, 3 the reference cannot solve it
(unbounded or non-terminating discount-1 model, no convergence).
"""
import json
import re
import sys
import warnings
from fractions import Fraction

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

NAME_RE = re.compile(r"[A-Za-z_][A-Za-z0-9_.:-]*\Z")
NUM_RE = re.compile(r"[+-]?(\d+/\d+|(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?)\Z")
DIRECTIVES = ("bell", "name", "discount", "objective", "horizon", "initial",
              "terminal", "states", "actions")


class ModelError(Exception):
    """A problem with the model text, with its line number."""


class SolveError(Exception):
    """The reference cannot solve this model."""


class Model:
    """A parsed model: names, exact and float data, pairs grouped by state."""

    def __init__(self):
        self.name = None
        self.discount = None
        self.objective = "max"
        self.horizon = 0
        self.states = []           # names, in the model's order
        self.index = {}            # name -> index
        self.actions = []
        self.action_index = {}
        self.terminal = set()      # state indices
        self.initial = None        # {state index: Fraction} or None = uniform
        # pairs: list of (state, action, exact expected reward, [(succ, prob)])
        self.pairs = []
        self.state_pairs = []      # per state: list of pair indices in action order


def _num(tok, lineno):
    if not NUM_RE.match(tok):
        raise ModelError("line %d: expected a number, found '%s'" % (lineno, tok))
    return Fraction(tok)


def _name(tok, lineno):
    if not NAME_RE.match(tok) or len(tok.encode()) > 255:
        raise ModelError("line %d: expected a name, found '%s'" % (lineno, tok))
    return tok


def _tokens(line):
    return line.split("#", 1)[0].split()


def _parse_lines(text):
    """First pass: directives and transition lines, in file order.

    A line whose first token is a directive keyword is a directive unless
    its fourth token is the arrow (then it is a transition of a state that
    happens to carry a keyword's name)."""
    entries, seen, first = [], set(), True
    for lineno, raw in enumerate(text.splitlines(), 1):
        toks = _tokens(raw)
        if not toks:
            continue
        key = toks[0]
        if key in DIRECTIVES and not (len(toks) > 3 and toks[3] == "->"):
            if key in seen:
                raise ModelError("line %d: directive '%s' repeated" % (lineno, key))
            if key == "bell" and (not first or toks[1:] != ["1"]):
                raise ModelError("line %d: 'bell 1' must be the first line" % lineno)
            seen.add(key)
            rest = raw.split("#", 1)[0].strip()[len(key):].strip()
            entries.append(("dir", lineno, toks, rest))
        else:
            entries.append(("tr", lineno, toks, None))
        first = False
    return entries


def _intern(m, name):
    if name not in m.index:
        m.index[name] = len(m.states)
        m.states.append(name)
    return m.index[name]


def _intern_action(m, name):
    if name not in m.action_index:
        m.action_index[name] = len(m.actions)
        m.actions.append(name)
    return m.action_index[name]


def _transition(m, lineno, toks):
    """Parses STATE ACTION REWARD -> NEXT [PROB [OUTCOME]] ... into a pair."""
    if len(toks) < 5 or toks[3] != "->":
        raise ModelError("line %d: expected 'STATE ACTION REWARD -> NEXT ...'" % lineno)
    s = _intern(m, _name(toks[0], lineno))
    a = _intern_action(m, _name(toks[1], lineno))
    reward = _num(toks[2], lineno)
    succ, i = [], 4
    while i < len(toks):
        nxt = _intern(m, _name(toks[i], lineno))
        nums = []
        i += 1
        while i < len(toks) and len(nums) < 2 and not NAME_RE.match(toks[i]):
            nums.append(_num(toks[i], lineno))
            i += 1
        succ.append([nxt, nums[0] if nums else None, nums[1] if len(nums) > 1 else Fraction(0)])
    if any(p is None for _, p, _ in succ):
        if len(succ) != 1:
            raise ModelError("line %d: only a lone successor may omit its probability" % lineno)
        succ[0][1] = Fraction(1)
    total = sum(p for _, p, _ in succ)
    if any(p < 0 for _, p, _ in succ):
        raise ModelError("line %d: negative probability" % lineno)
    if total != 1:
        if abs(total - 1) > Fraction(1, 10**9):
            raise ModelError("line %d: probabilities sum to %s, not 1" % (lineno, total))
        print("ref_solve: line %d: probabilities sum to %s; renormalised" % (lineno, total),
              file=sys.stderr)
        for e in succ:
            e[1] /= total
    expected = reward + sum(p * o for _, p, o in succ)
    return (s, a, expected, [(n, p) for n, p, _ in succ], lineno)


def _apply_directives(m, d):
    if "discount" not in d:
        raise ModelError("no 'discount' line")
    lineno, toks, _ = d["discount"]
    g = _num(toks[0] if toks else "", lineno)
    if not (0 < g <= 1) or len(toks) != 1:
        raise ModelError("line %d: discount must be one number in (0, 1]" % lineno)
    m.discount = g
    if "objective" in d:
        lineno, toks, _ = d["objective"]
        if toks not in (["max"], ["min"]):
            raise ModelError("line %d: objective must be max or min" % lineno)
        m.objective = toks[0]
    if "horizon" in d:
        lineno, toks, _ = d["horizon"]
        h = _num(toks[0] if toks else "", lineno)
        if h.denominator != 1 or h < 1:
            raise ModelError("line %d: horizon must be a positive integer" % lineno)
        m.horizon = int(h)
    if "name" in d:
        m.name = d["name"][2]
    if "states" in d:
        lineno, toks, _ = d["states"]
        for t in toks:
            if _name(t, lineno) in m.index:
                raise ModelError("line %d: state '%s' listed twice" % (lineno, t))
            _intern(m, t)
    if "actions" in d:
        lineno, toks, _ = d["actions"]
        for t in toks:
            if _name(t, lineno) in m.action_index:
                raise ModelError("line %d: action '%s' listed twice" % (lineno, t))
            _intern_action(m, t)


def _initial(m, lineno, toks):
    out, i = {}, 0
    while i < len(toks):
        s = _intern(m, _name(toks[i], lineno))
        if i + 1 < len(toks) and not NAME_RE.match(toks[i + 1]):
            out[s] = out.get(s, Fraction(0)) + _num(toks[i + 1], lineno)
            i += 2
        elif len(toks) == 1:
            out[s] = Fraction(1)
            i += 1
        else:
            raise ModelError("line %d: initial: '%s' has no probability" % (lineno, toks[i]))
    total = sum(out.values())
    if any(p < 0 for p in out.values()) or abs(total - 1) > Fraction(1, 10**9):
        raise ModelError("line %d: initial probabilities must be >= 0 and sum to 1" % lineno)
    return {s: p / total for s, p in out.items()}


def parse(text):
    """Parses .bell text into a Model; raises ModelError on the first problem."""
    entries = _parse_lines(text)
    d = {toks[0]: (lineno, toks[1:], rest) for kind, lineno, toks, rest in entries
         if kind == "dir"}
    m = Model()
    _apply_directives(m, d)
    pair_lines = {}
    for kind, lineno, toks, _ in entries:
        if kind == "tr":
            pair = _transition(m, lineno, toks)
            key = (pair[0], pair[1])
            if key in pair_lines:
                raise ModelError("line %d: pair %s %s already given on line %d" %
                                 (lineno, toks[0], toks[1], pair_lines[key]))
            pair_lines[key] = lineno
            m.pairs.append(pair[:4])
        elif toks[0] == "terminal":
            m.terminal.update(_intern(m, _name(t, lineno)) for t in toks[1:])
        elif toks[0] == "initial":
            m.initial = _initial(m, lineno, toks[1:])
    n = len(m.states)
    m.pairs.sort(key=lambda p: (p[0], p[1]))
    m.state_pairs = [[] for _ in range(n)]
    for k, (s, _, _, _) in enumerate(m.pairs):
        if s in m.terminal:
            raise ModelError("terminal state '%s' has a transition line" % m.states[s])
        m.state_pairs[s].append(k)
    dead = [m.states[s] for s in range(n) if s not in m.terminal and not m.state_pairs[s]]
    if dead:
        raise ModelError("dead ends (no transition line, not terminal): " + " ".join(dead))
    if m.initial is None:
        live = [s for s in range(n) if s not in m.terminal]
        m.initial = {s: Fraction(1, len(live)) for s in live}
    return m


# ---------------------------------------------------------------------------
# Floating-point policy iteration
# ---------------------------------------------------------------------------

class Arrays:
    """The model as numpy/scipy arrays; rewards negated for objective min."""

    def __init__(self, m):
        sign = -1.0 if m.objective == "min" else 1.0
        self.n = len(m.states)
        self.npairs = len(m.pairs)
        self.gamma = float(m.discount)
        self.pair_state = np.array([p[0] for p in m.pairs], dtype=np.int64)
        self.r = np.array([sign * float(p[2]) for p in m.pairs])
        rows, cols, vals = [], [], []
        for k, (_, _, _, succ) in enumerate(m.pairs):
            for nxt, prob in succ:
                rows.append(k)
                cols.append(nxt)
                vals.append(float(prob))
        self.P = sp.csr_matrix((vals, (rows, cols)), shape=(self.npairs, self.n))
        self.live = np.array([s not in m.terminal for s in range(self.n)])

    def q(self, v):
        """Q = r + gamma P v for every pair."""
        return self.r + self.gamma * (self.P @ v)


def _layers_to_terminal(m):
    """For discount 1: a terminating first policy.

    Layer 0 holds the terminal states; a state joins layer k+1 when one of its
    actions has a successor (probability > 0) in layers <= k, and takes that
    action.  Under the result every live state moves one layer down with
    positive probability, so a terminal state is reached with probability 1.
    Returns {state: pair} for the states that can reach a terminal state."""
    n = len(m.states)
    preds = [[] for _ in range(n)]
    for k, (s, _, _, succ) in enumerate(m.pairs):
        for nxt, prob in succ:
            if prob > 0:
                preds[nxt].append(k)
    chosen, frontier, done = {}, list(m.terminal), set(m.terminal)
    while frontier:
        nxt_frontier = []
        for t in frontier:
            for k in preds[t]:
                s = m.pairs[k][0]
                if s not in done:
                    done.add(s)
                    chosen[s] = k
                    nxt_frontier.append(s)
        frontier = nxt_frontier
    return chosen


def _evaluate(a, policy):
    """Values of a policy (pair per state, -1 for terminal states)."""
    n = a.n
    rows = np.where(a.live & (policy >= 0))[0]
    v = np.zeros(n)
    if len(rows) == 0:
        return v
    P_pi = a.P[policy[rows]][:, rows]
    A = sp.identity(len(rows), format="csc") - a.gamma * P_pi.tocsc()
    b = a.r[policy[rows]]
    with np.errstate(all="raise"), warnings.catch_warnings():
        warnings.simplefilter("error", spla.MatrixRankWarning)
        try:
            x = spla.spsolve(A, b)
        except (RuntimeError, FloatingPointError, np.linalg.LinAlgError,
                spla.MatrixRankWarning) as e:
            raise SolveError("singular policy evaluation (%s): the policy does not "
                             "terminate from some state" % e)
    if not np.all(np.isfinite(x)):
        raise SolveError("policy evaluation gave non-finite values: unbounded model?")
    v[rows] = x
    return v


def _first_policy(m, a):
    policy = np.full(a.n, -1, dtype=np.int64)
    if a.gamma == 1.0:
        chosen = _layers_to_terminal(m)
        for s in range(a.n):
            if not a.live[s]:
                continue
            if s not in chosen:
                raise SolveError("state '%s' reaches no terminal state under any policy: its "
                                 "value is infinite" % m.states[s])
            policy[s] = chosen[s]
    else:
        for s in range(a.n):
            if a.live[s]:
                policy[s] = m.state_pairs[s][0]
    return policy


def _improve(m, a, v, policy):
    """One improvement step; returns the number of states that switched."""
    q = a.q(v)
    scale = 1e-12 * max(1.0, float(np.max(np.abs(v))) if len(v) else 1.0)
    changed = 0
    for s in np.where(a.live)[0]:
        cur = policy[s]
        cur_q = q[cur]
        best, best_q = cur, cur_q
        for k in m.state_pairs[s]:
            if q[k] > best_q + scale:
                best, best_q = k, q[k]
        if best != cur:
            policy[s] = best
            changed += 1
    return changed


def _backward(m, a):
    """Finite horizon: backward induction; values and pairs of stage 0."""
    v = np.zeros(a.n)
    policy = np.full(a.n, -1, dtype=np.int64)
    for _ in range(m.horizon):
        q = a.q(v)
        nv = np.zeros(a.n)
        for s in np.where(a.live)[0]:
            ks = m.state_pairs[s]
            j = int(np.argmax(q[ks]))
            nv[s], policy[s] = q[ks[j]], ks[j]
        v = nv
    return v, policy


def solve_float(m, max_steps=10000):
    """V* (in the max sense, rewards negated for min) and a policy, by policy iteration."""
    a = Arrays(m)
    if m.horizon:
        return _backward(m, a) + (a,)
    policy = _first_policy(m, a)
    for _ in range(max_steps):
        v = _evaluate(a, policy)
        if _improve(m, a, v, policy) == 0:
            break
    else:
        raise SolveError("policy iteration did not converge in %d steps" % max_steps)
    _bellman_check(m, a, v)
    return v, policy, a


def _bellman_check(m, a, v):
    """One Bellman backup must give back v (up to rounding)."""
    q = a.q(v)
    tv = np.zeros(a.n)
    for s in np.where(a.live)[0]:
        tv[s] = max(q[k] for k in m.state_pairs[s])
    res = float(np.max(np.abs(tv - v))) if a.n else 0.0
    scale = max(1.0, float(np.max(np.abs(v))))
    print("ref_solve: Bellman residual %.3g (values up to %.6g)" % (res, scale), file=sys.stderr)
    if res > 1e-9 * scale:
        raise SolveError("Bellman residual %.3g too large" % res)


# ---------------------------------------------------------------------------
# Exact re-check (rational arithmetic; small models)
# ---------------------------------------------------------------------------

def _exact_evaluate(m, policy, sign):
    """Exact values of a policy by Gaussian elimination over Fractions."""
    g = m.discount
    rows = [s for s in range(len(m.states)) if policy[s] >= 0]
    pos = {s: i for i, s in enumerate(rows)}
    n = len(rows)
    A = [dict() for _ in range(n)]
    b = [Fraction(0)] * n
    for i, s in enumerate(rows):
        _, _, rew, succ = m.pairs[policy[s]]
        A[i][i] = Fraction(1)
        b[i] = sign * rew
        for nxt, p in succ:
            if nxt in pos and p:
                j = pos[nxt]
                A[i][j] = A[i].get(j, Fraction(0)) - g * p
    for col in range(n):  # sparse Gauss-Jordan with row pivoting
        piv = next((r for r in range(col, n) if A[r].get(col, 0) != 0), None)
        if piv is None:
            raise SolveError("exact evaluation: singular system (policy does not terminate)")
        A[col], A[piv], b[col], b[piv] = A[piv], A[col], b[piv], b[col]
        inv = 1 / A[col][col]
        A[col] = {j: x * inv for j, x in A[col].items()}
        b[col] *= inv
        for r in range(n):
            f = A[r].get(col, 0) if r != col else 0
            if f:
                for j, x in A[col].items():
                    y = A[r].get(j, Fraction(0)) - f * x
                    if y:
                        A[r][j] = y
                    else:
                        A[r].pop(j, None)
                b[r] -= f * b[col]
    v = [Fraction(0)] * len(m.states)
    for i, s in enumerate(rows):
        v[s] = b[i]
    return v


def solve_exact(m, policy, max_steps=1000):
    """Exact policy iteration from the float policy: exact values (max sense)."""
    if m.horizon:
        raise SolveError("--exact does not handle a finite horizon")
    sign = -1 if m.objective == "min" else 1
    policy = [int(k) for k in policy]
    for _ in range(max_steps):
        v = _exact_evaluate(m, policy, sign)
        changed = False
        for s in range(len(m.states)):
            if s in m.terminal:
                continue
            cur = v[s]
            best, best_q = policy[s], cur
            for k in m.state_pairs[s]:
                _, _, rew, succ = m.pairs[k]
                q = sign * rew + m.discount * sum(p * v[nx] for nx, p in succ)
                if q > best_q:
                    best, best_q = k, q
            if best != policy[s]:
                policy[s], changed = best, True
        if not changed:
            return v, policy
    raise SolveError("exact policy iteration did not converge")


def _fmt_fraction(x):
    return str(x.numerator) if x.denominator == 1 else "%d/%d" % (x.numerator, x.denominator)


def main(argv):
    args = [x for x in argv[1:] if not x.startswith("--")]
    flags = {x for x in argv[1:] if x.startswith("--")}
    unknown = flags - {"--exact", "--fractions", "--policy"}
    if len(args) != 1 or unknown:
        print(__doc__.split("\n\n")[1], file=sys.stderr)
        return 2
    try:
        with open(args[0], encoding="utf-8") as f:
            m = parse(f.read())
    except (OSError, UnicodeDecodeError, ModelError) as e:
        print("ref_solve: %s: %s" % (args[0], e), file=sys.stderr)
        return 2
    sign = -1.0 if m.objective == "min" else 1.0
    try:
        v, policy, a = solve_float(m)
        if "--exact" in flags or "--fractions" in flags:
            ve, policy = solve_exact(m, policy)
            v = np.array([float(x) for x in ve])
            exact_vals = [int(sign) * x for x in ve]
    except SolveError as e:
        print("ref_solve: %s: %s" % (args[0], e), file=sys.stderr)
        return 3
    if "--fractions" in flags:
        values = {name: _fmt_fraction(exact_vals[i]) for i, name in enumerate(m.states)}
    else:
        values = {name: sign * float(v[i]) + 0.0 for i, name in enumerate(m.states)}
    if "--policy" in flags:
        pol = {}
        for s, name in enumerate(m.states):
            k = policy[s]
            pol[name] = None if k == -1 else m.actions[m.pairs[k][1]]
        out = {"values": values, "policy": pol}
    else:
        out = values
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
