# proofs.py — benchmark of the proofs: exact solve time against model size, interval verification against the floating solve.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: BUILD=build /usr/bin/python3 tests/bench/proofs.py

Prints two tables and writes them to $BUILD/bench-proofs.md:
 1. `solve --method exact` wall time against model size: Garnet models
    (Archibald, McKinnon & Thomas 1995; 3 actions, 3 successors, discount
    0.95) of 100 to 2,000 states (5,000 with BENCH_BIG=1, which takes long),
    and slip grids (0.8 intended, 0.1 to each side) with the linear solver
    auto, sparse and dense;
 2. the interval proof's time as a fraction of the floating-point solve on a
    Garnet model of 200,000 states (goal: at most 0.5), from the seconds the
    JSON report gives for each (one run, the same process).
BENCH_QUICK=1 runs small sizes only (a smoke test).  Times are wall seconds
of one run on this machine; nothing here is an assertion.
"""
import json
import os
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
BUILD = os.environ.get("BUILD", "build")
if not os.path.isabs(BUILD):
    BUILD = os.path.join(ROOT, BUILD)
BC = os.path.join(BUILD, "bellcheck")
GARNET = os.path.join(BUILD, "bench", "garnet")
QUICK = os.environ.get("BENCH_QUICK") == "1"
BIG = os.environ.get("BENCH_BIG") == "1"


def slip_grid(n, g, path):
    """An n x n grid, cost 1 per step, goal in the far corner (terminal)."""
    mv = {"N": (-1, 0), "E": (0, 1), "S": (1, 0), "W": (0, -1)}
    side = {"N": "EW", "S": "EW", "E": "NS", "W": "NS"}
    name = lambda i, j: "r%dc%d" % (i, j)
    lines = ["bell 1", "name slip-grid-%d" % n, "discount %s" % g,
             "states " + " ".join(name(i, j) for i in range(n) for j in range(n)),
             "terminal " + name(n - 1, n - 1), "actions N E S W", "initial " + name(0, 0)]
    for i in range(n):
        for j in range(n):
            if (i, j) == (n - 1, n - 1):
                continue
            for a in "NESW":
                out = {}
                for b, p in ((a, 8), (side[a][0], 1), (side[a][1], 1)):
                    di, dj = mv[b]
                    d = name(i + di, j + dj) if 0 <= i + di < n and 0 <= j + dj < n else name(i, j)
                    out[d] = out.get(d, 0) + p
                succ = " ".join("%s %s" % (d, "1" if p == 10 else "0.%d" % p) for d, p in out.items())
                lines.append("%s %s -1 -> %s" % (name(i, j), a, succ))
    with open(path, "w") as f:
        f.write("\n".join(lines) + "\n")


def run_json(args):
    t0 = time.monotonic()
    p = subprocess.run([BC] + args + ["--json", "-", "--quiet"], capture_output=True, text=True)
    wall = time.monotonic() - t0
    try:
        return json.loads(p.stdout), wall, p.returncode
    except ValueError:
        return None, wall, p.returncode


def exact_table(tmp):
    rows = []
    sizes = [100, 200] if QUICK else [100, 200, 500, 1000, 2000] + ([5000] if BIG else [])
    for n in sizes:
        path = os.path.join(tmp, "garnet-%d.bell" % n)
        subprocess.run([GARNET, "--states", str(n), "--actions", "3", "--branch", "3",
                        "--discount", "0.95", "--seed", "7", "-o", path], check=True)
        rep, wall, rc = run_json(["solve", path, "--method", "exact"])
        rows.append(("Garnet n=%d" % n, n, "auto", wall, rc, rep))
    grids = [10, 20] if QUICK else [10, 20, 30]
    for k in grids:
        path = os.path.join(tmp, "slip-%d.bell" % k)
        slip_grid(k, "0.95", path)
        for solver in ("auto", "sparse", "dense"):
            rep, wall, rc = run_json(["solve", path, "--method", "exact", "--exact-solver", solver])
            rows.append(("slip grid %dx%d" % (k, k), k * k, solver, wall, rc, rep))
    out = ["| model | states | exact solver | seconds | digits of the largest denominator |",
           "| --- | --- | --- | --- | --- |"]
    for name, n, solver, wall, rc, rep in rows:
        digits = "-"
        if rep and rc == 0:
            digits = str(max(len(v.split("/")[1]) if "/" in v else 1
                             for v in rep["exact_values"].values()))
        out.append("| %s | %d | %s | %s | %s |" % (name, n, solver,
                                                  "%.2f" % wall if rc == 0 else "failed (%d)" % rc,
                                                  digits))
    return out


def interval_table(tmp):
    n = 20000 if QUICK else 200000
    path = os.path.join(tmp, "garnet-big.bell")
    subprocess.run([GARNET, "--states", str(n), "--actions", "4", "--branch", "5",
                    "--discount", "0.99", "--seed", "3", "-o", path], check=True)
    out = ["| model | solve seconds | interval proof seconds | ratio (goal <= 0.5) | proven bound |",
           "| --- | --- | --- | --- | --- |"]
    for method in ("vi", "auto"):
        rep, wall, rc = run_json(["solve", path, "--method", method, "--proof", "interval"])
        if not rep or rc != 0:
            out.append("| Garnet %d x 4 x 5, %s | failed (%d) | | | |" % (n, method, rc))
            continue
        s, p = rep["seconds"], rep["proof"]["seconds"]
        out.append("| Garnet %d x 4 x 5, discount 0.99, %s | %.2f | %.2f | %.2f | %.2g |"
                   % (n, method, s, p, p / s if s > 0 else float("nan"), rep["proof"]["bound"]))
    return out


def main():
    if not os.path.exists(BC) or not os.path.exists(GARNET):
        print("build bellcheck and %s first (make bench)" % GARNET, file=sys.stderr)
        return 2
    with tempfile.TemporaryDirectory() as tmp:
        text = ["## Exact solve time against size", ""] + exact_table(tmp)
        text += ["", "## Interval verification against the floating-point solve", ""]
        text += interval_table(tmp)
    doc = "\n".join(text) + "\n"
    sys.stdout.write(doc)
    with open(os.path.join(BUILD, "bench-proofs.md"), "w") as f:
        f.write("# bellcheck proofs benchmark (one run)\n\n" + doc)
    return 0


if __name__ == "__main__":
    sys.exit(main())
