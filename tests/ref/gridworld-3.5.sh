# gridworld-3.5.sh — Sutton & Barto's 5x5 gridworld (Example 3.5): optimal values from the book and from the reference solver.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
model="$MODELS/sutton-barto-3.5-gridworld.bell"

# Optimal state values printed (one decimal) in Sutton & Barto, Reinforcement
# Learning: An Introduction, 2nd ed. (2018), Figure 3.5; values from memory.
"$PY" - "$TMP/book.json" <<'PYEOF'
import json, sys
rows = ["22.0 24.4 22.0 19.4 17.5", "19.8 22.0 19.8 17.8 16.0", "17.8 19.8 17.8 16.0 14.4",
        "16.0 17.8 16.0 14.4 13.0", "14.4 16.0 14.4 13.0 11.7"]
vals = {"r%dc%d" % (r, c): float(x) for r, row in enumerate(rows) for c, x in enumerate(row.split())}
json.dump(vals, open(sys.argv[1], "w"))
PYEOF

# The independent reference solver (tests/tools/ref_solve.py) must itself
# reproduce the book's Figure 3.5 (Sutton & Barto 2018; values from memory), to 0.1.
ref_values "$model" "$TMP/ref.json"
"$PY" "$TOOLS/compare_values.py" "gridworld-3.5 reference vs book" "$TMP/ref.json" "$TMP/book.json" 0.1 --plain

for method in vi pi lp; do
  # Sutton & Barto (2018), Figure 3.5, optimal values to one decimal (from memory).
  bc solve "$model" --method "$method" --json -
  expect_status "gridworld-3.5 $method book exit" 0
  "$PY" "$TOOLS/compare_values.py" "gridworld-3.5 $method book" "$out" "$TMP/book.json" 0.1
  # Reference solver (tests/tools/ref_solve.py, policy iteration; common practice), to 1e-8.
  solve_check "gridworld-3.5 $method" "$model" "$method" "$TMP/ref.json" 1e-8
done
