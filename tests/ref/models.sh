# models.sh — every bundled model: --compare agrees, and each method matches the independent reference solver.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"

for model in "$MODELS"/*.bell; do
  base=$(basename "$model" .bell)
  # Common practice: all solution methods must agree on the optimum
  # (`solve --compare` exits 0 only when they do).
  bc solve "$model" --compare
  expect_status "$base --compare" 0
  # The reference solver (tests/tools/ref_solve.py, written from the format
  # description; common practice) reads and solves every bundled model.
  ref_values "$model" "$TMP/ref.json"
  for method in vi pi lp; do
    # Reference solver (tests/tools/ref_solve.py, policy iteration; common practice), to 1e-8.
    solve_check "$base $method" "$model" "$method" "$TMP/ref.json" 1e-8
  done
done
