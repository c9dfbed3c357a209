# puterman.sh — Puterman's two-state example, discount 0.95: v*(s1) = -60/7, v*(s2) = -20.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
model="$MODELS/puterman-two-state.bell"

# Puterman, Markov Decision Processes (1994), two-state example of Section 3.1
# under discount 0.95: v*(s1) = -60/7, v*(s2) = -20 (values from memory;
# re-derived by hand in the model file's header).
echo '{"s1": "-60/7", "s2": "-20"}' >"$TMP/book.json"

# The reference solver in exact arithmetic (tests/tools/ref_solve.py --fractions)
# must give exactly Puterman's values (1994, Section 3.1; from memory).
"$PY" "$TOOLS/ref_solve.py" --fractions "$model" >"$TMP/ref.json" 2>"$TMP/ref.err"
"$PY" - "$TMP/ref.json" <<'PYEOF'
import json, sys
got = json.load(open(sys.argv[1]))
want = {"s1": "-60/7", "s2": "-20"}
print("PASS puterman reference exact" if got == want else
      "FAIL puterman reference exact: got %r, expected %r" % (got, want))
PYEOF

for method in vi pi lp; do
  # Puterman (1994), Section 3.1 two-state example, discount 0.95 (from memory), to 1e-9.
  solve_check "puterman $method" "$model" "$method" "$TMP/book.json" 1e-9
done
