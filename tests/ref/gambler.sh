# gambler.sh — Sutton & Barto's gambler's problem (Example 4.3, p = 0.4): V* is the win probability of bold play.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
model="$MODELS/sutton-barto-4.3-gambler.bell"

# Dubins & Savage, How to Gamble If You Must (1965): in a subfair game bold
# play is optimal, so V*(c<s>) is its probability of reaching 100 from s,
# computed exactly by the bold-play recursion (tests/tools/bold_play.py),
# without the model file.  Problem: Sutton & Barto (2018), Example 4.3.
"$PY" "$TOOLS/bold_play.py" >"$TMP/bold.json"

# The reference solver in exact arithmetic (tests/tools/ref_solve.py --fractions)
# must reproduce bold play exactly (Dubins & Savage 1965); this checks the model
# file and the reference, not bellcheck.
"$PY" "$TOOLS/bold_play.py" --fractions >"$TMP/bold-exact.json"
"$PY" "$TOOLS/ref_solve.py" --fractions "$model" >"$TMP/ref-exact.json" 2>"$TMP/ref.err"
"$PY" "$TOOLS/compare_values.py" "gambler reference vs bold play" "$TMP/ref-exact.json" "$TMP/bold-exact.json" 0 --plain

# The model keeps stake0, a zero-reward self-loop: discount-1 solvers must not
# stop at a fixed point that uses it (compare_values evaluates the reported
# policy and fails if it never terminates).  Common practice (stochastic
# shortest paths); the loop is our addition to the book's problem.
for method in vi pi lp; do
  # Dubins & Savage (1965) bold play, exact rational recursion, to 1e-8.
  solve_check "gambler $method" "$model" "$method" "$TMP/bold.json" 1e-8
done
