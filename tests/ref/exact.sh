# exact.sh — exact optima (solve --method exact) against published values and exact references; interval enclosures contain them.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
CHECK="$TOOLS/check_exact.py"

# Puterman, Markov Decision Processes (1994), the two-state example of
# section 3.1 with discount 0.95: V*(s1) = -60/7, V*(s2) = -20 (from memory).
bc solve "$MODELS/puterman-two-state.bell" --method exact --json -
expect_status "puterman exact exit" 0
cp "$out" "$TMP/puterman.json"
printf '{"s1": "-60/7", "s2": "-20"}\n' >"$TMP/puterman-expected.json"
"$PY" "$CHECK" fractions "puterman (Puterman 1994, from memory)" "$TMP/puterman.json" "$TMP/puterman-expected.json"

# Sutton & Barto (2018), Example 4.3, the gambler's problem with p_h = 0.4 and
# goal 100: V*(s) is exactly the win probability of bold play, optimal in
# subfair games (Dubins & Savage, How to Gamble If You Must, 1965), computed
# by tests/tools/bold_play.py in Python fractions.  The bundled model has the
# "stake nothing" action (stake0, a zero-reward loop); a copy without it too.
"$PY" "$TOOLS/bold_play.py" --fractions >"$TMP/bold.json"
bc solve "$MODELS/sutton-barto-4.3-gambler.bell" --method exact --json -
expect_status "gambler exact exit (with stake0)" 0
cp "$out" "$TMP/gambler.json"
"$PY" "$CHECK" fractions "gambler with stake0 (Dubins & Savage 1965)" "$TMP/gambler.json" "$TMP/bold.json"
grep -v ' stake0 ' "$MODELS/sutton-barto-4.3-gambler.bell" >"$TMP/gambler-no-stake0.bell"
expect_not_in "copy has no stake0" "$TMP/gambler-no-stake0.bell" " stake0 "
bc solve "$TMP/gambler-no-stake0.bell" --method exact --json -
expect_status "gambler exact exit (without stake0)" 0
cp "$out" "$TMP/gambler2.json"
"$PY" "$CHECK" fractions "gambler without stake0 (Dubins & Savage 1965)" "$TMP/gambler2.json" "$TMP/bold.json"
# Random Garnet models (Archibald, McKinnon & Thomas 1995) against the
# independent reference solver in exact rational arithmetic
# (tests/tools/ref_solve.py --fractions: its own parser, Python fractions).
for c in "12 3 2 0.9 11 max" "40 3 3 0.95 12 min" "80 4 3 0.99 13 max"; do
  set -- $c
  name="garnet-n$1-seed$5"
  "$PY" "$TOOLS/garnet.py" --states "$1" --actions "$2" --branch "$3" --discount "$4" \
    --seed "$5" --objective "$6" -o "$TMP/$name.bell"
  "$PY" "$TOOLS/ref_solve.py" --fractions "$TMP/$name.bell" >"$TMP/$name-ref.json" 2>"$TMP/ref.err"
  bc solve "$TMP/$name.bell" --method exact --json -
  expect_status "$name exact exit" 0
  cp "$out" "$TMP/$name-exact.json"
  "$PY" "$CHECK" fractions "$name vs ref_solve --fractions" "$TMP/$name-exact.json" "$TMP/$name-ref.json"
done

# Interval proofs must enclose the exact optimum (common practice: an
# enclosure that misses the true value is a wrong proof).  Every bundled model
# with discount < 1, and the Garnet models above.
for model in "$MODELS"/*.bell "$TMP"/garnet-*.bell; do
  name=$(basename "$model" .bell)
  if grep -q '^discount 1 *$' "$model"; then continue; fi
  bc solve "$model" --method exact --json -
  [ "$status" -eq 0 ] || { fail "$name exact" "exit $status: $(head -c 200 "$err")"; continue; }
  cp "$out" "$TMP/x.json"
  for method in vi pi lp; do
    bc solve "$model" --method "$method" --proof interval --json -
    expect_status "$name $method interval exit" 0
    "$PY" "$CHECK" enclose "$name $method" "$out" "$TMP/x.json"
  done
done

# Discount 1: the interval proof through expected steps (docs/methods.md) must
# also enclose the exact optimum wherever it succeeds; the gambler's problem
# (Sutton & Barto 2018, Example 4.3) and the demo drone model must get one.
for model in "$MODELS"/*.bell; do
  grep -q '^discount 1 *$' "$model" || continue
  name=$(basename "$model" .bell)
  bc solve "$model" --method exact --json -
  [ "$status" -eq 0 ] || { fail "$name exact" "exit $status"; continue; }
  cp "$out" "$TMP/x.json"
  bc solve "$model" --method pi --proof interval --json -
  expect_status "$name discount-1 interval exit" 0
  kind=$("$PY" -c "import json,sys; print(json.load(open(sys.argv[1]))['proof']['kind'])" "$out")
  case "$name" in
    sutton-barto-4.3-gambler|demo-yard-drone)
      [ "$kind" = interval ] && pass "$name gets a discount-1 interval proof" || fail "$name gets a discount-1 interval proof" "kind $kind";;
  esac
  if [ "$kind" = interval ]; then
    "$PY" "$CHECK" enclose "$name discount 1" "$out" "$TMP/x.json"
  fi
done

# A finite horizon with costs (objective min), by hand: at t, action b costs
# 0.1 and stays; over 3 stages V(t) = 0.1 + 0.9 (0.1 + 0.9 * 0.1) = 0.271
# (action a, cost 2, is never better).  The interval proof encloses it.
printf 'bell 1\ndiscount 0.9\nobjective min\nhorizon 3\nstates s t u\nactions a b\nterminal u\ns a 1 -> s 1/3 t 2/3\ns b 0.7 -> t 0.1 u 0.9\nt a 2 -> s 0.5 u 0.5\nt b 0.1 -> t\n' >"$TMP/h.bell"
bc solve "$TMP/h.bell" --method exact --json -
expect_status "min horizon exact exit" 0
cp "$out" "$TMP/hx.json"
expect_in "min horizon V(t) = 271/1000 (by hand)" "$TMP/hx.json" '"t": "271/1000"'
bc solve "$TMP/h.bell" --proof interval --json -
"$PY" "$CHECK" enclose "min horizon" "$out" "$TMP/hx.json"
