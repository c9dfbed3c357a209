# fast_paths.sh — the solvers' paths for large models (Jacobi value iteration with MacQueen-Porteus bounds, hand-over to warm-started policy iteration, threads) against the independent reference solver.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
GRID="${BUILD:-$(dirname "$BELLCHECK")}/bench/gridworld" # BUILD: exported by tests/run.sh (BELLCHECK may be a wrapper)

# A Garnet model beyond the size where auto prices a factorisation (100
# states): auto runs Jacobi value iteration, which must certify 1e-9 by
# itself.  Garnet MDPs: Archibald, McKinnon & Thomas, J. Oper. Res. Soc.
# (1995); generator tests/tools/garnet.py.
g="$TMP/garnet-3000.bell"
"$PY" "$TOOLS/garnet.py" --states 3000 --actions 3 --branch 4 --discount 0.999 --seed 9 -o "$g"
# V* from the independent reference solver (tests/tools/ref_solve.py: policy
# iteration with sparse direct solves; common practice).
ref_values "$g" "$TMP/ref-g.json"
bc solve "$g" --json "$TMP/auto.json" --quiet
expect_status "garnet 3000 auto exit" 0
"$PY" "$TOOLS/compare_values.py" "garnet 3000 auto" "$TMP/auto.json" "$TMP/ref-g.json" 1e-8 --method vi --model "$g"
expect_in "garnet 3000 auto: Jacobi sweeps with MacQueen-Porteus bounds" "$TMP/auto.json" "Jacobi sweeps with MacQueen-Porteus bounds"

# Threads: a sweep computes every state by the same operations whatever
# the number of threads, so values and policy must be identical, bit for
# bit (common practice for deterministic parallel reductions: min and max
# are exact).
bc solve "$g" --method vi --threads 1 --proof off --json "$TMP/t1.json" --quiet
bc solve "$g" --method vi --threads 2 --proof off --json "$TMP/t2.json" --quiet
"$PY" - "$TMP/t1.json" "$TMP/t2.json" <<'PYEOF'
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:3])
same = a["values"] == b["values"] and a["policy"] == b["policy"] and a["iterations"] == b["iterations"]
print(("PASS" if same else "FAIL") + " vi with 2 threads gives the values and policy of 1 thread, bit for bit")
PYEOF

# The benchmark's slippery grid world (tests/bench/gridworld.c, 40 x 40,
# discount 0.999): a slow-mixing model, where value iteration hands over to
# policy iteration started from its greedy policy.
if [ -x "$GRID" ]; then
  w="$TMP/grid-40.bell"
  "$GRID" --width 40 --height 40 --discount 0.999 -o "$w"
  ref_values "$w" "$TMP/ref-w.json"
  bc solve "$w" --json "$TMP/grid.json" --quiet
  expect_status "grid 40 auto exit" 0
  "$PY" "$TOOLS/compare_values.py" "grid 40 auto" "$TMP/grid.json" "$TMP/ref-w.json" 1e-7 --method pi --model "$w"
  expect_in "grid 40 auto: policy iteration warm-started by value iteration" "$TMP/grid.json" "from the policy of"
  # A tolerance of 1e-6 at discount 0.999 must be certified (bound <= tol), not just approached.
  bc solve "$w" --tol 1e-6 --proof off --json "$TMP/grid6.json" --quiet
  "$PY" - "$TMP/grid6.json" <<'PYEOF'
import json, sys
r = json.load(open(sys.argv[1]))
ok = r.get("bound") is not None and 0 <= r["bound"] <= 1e-6
print(("PASS" if ok else "FAIL") + " grid 40 auto at tol 1e-6: proven bound <= 1e-6" + ("" if ok else ": %r" % r.get("bound")))
PYEOF
else
  fail "grid 40 auto" "$GRID missing (make test builds it)"
fi

# Discount 1 beyond 100 states: auto runs Gauss-Seidel sweeps until the
# greedy policy stops changing, then policy iteration from that policy (its
# proven bound needs the evaluation).  The crater-rover task on a 24 x 24
# grid (577 states; the grid's probabilities are checked against Python in
# test_task_ref), against the independent reference solver.
r="$TMP/rover-24.bell"
bc grid "$ROOT/models/crater-rover.task" --cells 24x24 -o "$r" --quiet
expect_status "rover 24x24 grid exit" 0
ref_values "$r" "$TMP/ref-r.json"
bc solve "$r" --json "$TMP/rover.json" --quiet
expect_status "rover 24x24 auto exit" 0
"$PY" "$TOOLS/compare_values.py" "rover 24x24 auto (discount 1)" "$TMP/rover.json" "$TMP/ref-r.json" 1e-8 --method pi --model "$r"
expect_in "rover 24x24 auto: policy iteration warm-started by Gauss-Seidel sweeps" "$TMP/rover.json" "from the policy of"
# The same with value iteration's sweeps only: no bound, same values to its tolerance.
bc solve "$r" --method vi --tol 1e-10 --json "$TMP/rover-vi.json" --quiet
"$PY" "$TOOLS/compare_values.py" "rover 24x24 vi (discount 1)" "$TMP/rover-vi.json" "$TMP/ref-r.json" 1e-6 --method vi --model "$r"
