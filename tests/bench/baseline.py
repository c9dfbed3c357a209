# baseline.py — the practitioner's alternative the benchmark compares against: value iteration with scipy's sparse matrix-vector product.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: /usr/bin/python3 baseline.py PREFIX [--tol 1e-6] [--max-seconds S]

Reads the raw arrays tests/bench/probe wrote (PREFIX.meta, .spstart, .tstart,
.succ, .prob, .reward: the model as bellcheck read it, rewards already in the
maximising sign), builds P as a scipy.sparse CSR matrix of shape
(pairs, states) and runs plain value iteration the way a practitioner writes
it:

    Q = r + g * (P @ V);  V' = max of Q over each state's pairs

until ||V' - V||_inf * g / (1 - g) <= tol, which proves ||V' - V*||_inf <= tol
(the contraction argument, e.g. Puterman 1994, Theorem 6.3.1).  At discount 1
(a task that ends at terminal states) no such rule exists; the baseline then
stops, as a practitioner would, when ||V' - V||_inf <= tol, which proves
nothing (the error is the change times the expected steps still to go) and
stops earlier than a proof could: it favours the baseline.  Only the
iteration loop is timed: reading the arrays and building the matrix are not.
Prints one line of JSON: seconds, iterations, the value at the initial distribution,
whether it converged, and the peak resident memory of this process.  When
--max-seconds stops it first, projected_seconds extrapolates the time to the
stopping rule from the rate at which the last 200 differences shrank.
"""
import json
import resource
import sys
import time

import numpy as np
import scipy.sparse as sp


def load(prefix):
    meta = json.load(open(prefix + ".meta"))
    spstart = np.fromfile(prefix + ".spstart", dtype=np.int64)
    tstart = np.fromfile(prefix + ".tstart", dtype=np.int64)
    succ = np.fromfile(prefix + ".succ", dtype=np.int32)
    prob = np.fromfile(prefix + ".prob", dtype=np.float64)
    reward = np.fromfile(prefix + ".reward", dtype=np.float64)
    meta["initial"] = np.fromfile(prefix + ".initial", dtype=np.float64)  # the initial distribution
    n, npairs = meta["n_states"], meta["n_pairs"]
    P = sp.csr_matrix((prob, succ, tstart), shape=(npairs, n))
    P.sum_duplicates()
    return meta, spstart, P, reward


def main(argv):
    if len(argv) < 2:
        print(__doc__, file=sys.stderr)
        return 2
    prefix, tol, max_seconds = argv[1], 1e-6, float("inf")
    i = 2
    while i + 1 < len(argv):
        if argv[i] == "--tol":
            tol = float(argv[i + 1])
        elif argv[i] == "--max-seconds":
            max_seconds = float(argv[i + 1])
        i += 2
    meta, spstart, P, r = load(prefix)
    g, n = meta["discount"], meta["n_states"]
    counts = np.diff(spstart)
    live = counts > 0  # terminal states have no pairs and value 0
    uniform = bool(np.all(counts == counts[0])) and counts[0] > 0
    starts = spstart[:-1][live]
    stop = tol * (1 - g) / g if g < 1 else tol  # discount 1: the change alone (nothing proven)
    V = np.zeros(n)
    it, converged, hist = 0, False, []
    t0 = time.perf_counter()
    while True:
        Q = r + g * (P @ V)
        if uniform:
            Vn = Q.reshape(n, counts[0]).max(axis=1)
        else:
            Vn = np.zeros(n)
            Vn[live] = np.maximum.reduceat(Q, starts)
        diff = np.abs(Vn - V).max()
        V = Vn
        it += 1
        hist.append(diff)
        if len(hist) > 200:
            hist.pop(0)
        if diff <= stop:
            converged = True
            break
        if time.perf_counter() - t0 > max_seconds:
            break
    seconds = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    projected = None
    if not converged and len(hist) > 1 and hist[-1] < hist[0]:
        # Stopped by --max-seconds: the differences shrink geometrically; the
        # iterations still needed follow from the observed rate (a projection).
        rate = (hist[-1] / hist[0]) ** (1.0 / (len(hist) - 1))
        more = np.log(stop / diff) / np.log(rate)
        projected = seconds * (it + more) / it
    print(json.dumps({"seconds": seconds, "iterations": it, "converged": converged,
                      "certified": bool(g < 1),
                      "projected_seconds": projected,
                      "value_initial": float(meta["initial"] @ V * meta["sign"]),
                      "peak_bytes": peak}))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
