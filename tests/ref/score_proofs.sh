# score_proofs.sh — the proofs behind score's figures: exact regrets against an exact reference, interval bounds that contain them.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
jget() { "$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
expect_eq() { if [ "$2" = "$3" ]; then pass "$1"; else fail "$1" "got '$2', want '$3'"; fi; }

# Puterman (1994) two-state example, discount 0.95 (values from memory): the
# policy {s1: a12} is worth 10 + 0.95 (-20) = -9 at s1 (by hand), regret
# 9 - 60/7 = 3/7 there and 3/14 at the uniform initial distribution.
printf 'state,action\ns1,a12\ns2,a21\n' >"$TMP/p.csv"
bc score "$MODELS/puterman-two-state.bell" --policy "$TMP/p.csv" --json "$TMP/p.json"
expect_status "puterman score exit" 0
expect_eq "puterman regret is exactly 3/14 (by hand)" "$(jget "$TMP/p.json" "d['regret']['exact_initial']")" "3/14"
expect_eq "puterman regret proof exact" "$(jget "$TMP/p.json" "d['regret']['initial_proof']['kind']")" "exact"
expect_eq "puterman max-state regret proof exact" "$(jget "$TMP/p.json" "d['regret']['max_state_proof']['kind']")" "exact"
# V = (-9 + -20) / 2 at the uniform initial distribution (by hand).
expect_eq "puterman agent value exact" "$(jget "$TMP/p.json" "d['exact_value_initial']")" "-29/2"
bc score "$MODELS/puterman-two-state.bell" --policy "$TMP/p.csv"
expect_in "text: regret labelled exact" "$out" "regret at initial          0.2142857143 (exact"

# Garnet models (Archibald, McKinnon & Thomas 1995) with a deliberately poor
# policy (first action everywhere): the exact regret equals the reference's
# (tests/tools/score_exact_ref.py: ref_solve.py's exact policy iteration and
# exact evaluation in Python fractions), and the interval proof's bound
# contains it (common practice: an enclosure must contain the true value).
for c in "30 3 3 0.9 21 max" "60 4 3 0.95 22 min"; do
  set -- $c
  name="garnet-n$1-seed$5"
  model="$TMP/$name.bell"
  "$PY" "$TOOLS/garnet.py" --states "$1" --actions "$2" --branch "$3" --discount "$4" \
    --seed "$5" --objective "$6" -o "$model"
  { echo "state,action"; i=0; while [ $i -lt "$1" ]; do echo "s$i,a0"; i=$((i + 1)); done; } >"$TMP/$name.csv"
  "$PY" "$TOOLS/score_exact_ref.py" "$model" "$TMP/$name.csv" >"$TMP/$name-ref.json"
  bc score "$model" --policy "$TMP/$name.csv" --proof exact --json "$TMP/$name-x.json"
  expect_status "$name exact score exit" 0
  want=$(jget "$TMP/$name-ref.json" "d['regret_initial']")
  expect_eq "$name exact regret = reference (fractions)" "$(jget "$TMP/$name-x.json" "d['regret']['exact_initial']")" "$want"
  expect_eq "$name agent value = reference (fractions)" "$(jget "$TMP/$name-x.json" "d['exact_value_initial']")" "$(jget "$TMP/$name-ref.json" "d['value_initial']")"
  bc score "$model" --policy "$TMP/$name.csv" --proof interval --json "$TMP/$name-i.json"
  expect_status "$name interval score exit" 0
  expect_eq "$name interval kind" "$(jget "$TMP/$name-i.json" "d['regret']['initial_proof']['kind']")" "interval"
  expect_eq "$name interval regret contains the exact one" "$("$PY" -c "
import json, sys
from fractions import Fraction as F
d = json.load(open(sys.argv[1])); r = json.load(open(sys.argv[2]))
b = F(d['regret']['initial_proof']['bound'])
print(abs(F(d['regret']['initial']) - F(r['regret_initial'])) <= b and b < F(1, 10**6))
" "$TMP/$name-i.json" "$TMP/$name-ref.json")" "True"
  expect_eq "$name interval max-state regret contains the exact one" "$("$PY" -c "
import json, sys
from fractions import Fraction as F
d = json.load(open(sys.argv[1])); r = json.load(open(sys.argv[2]))
b = F(d['regret']['max_state_proof']['bound'])
print(abs(F(d['regret']['max_state']) - F(r['regret_max_state'])) <= b)
" "$TMP/$name-i.json" "$TMP/$name-ref.json")" "True"
done

# A Q-table's residual is enclosed: the table Q = Q* rounded to doubles has
# a residual of rounding size only, and its proof bound must be tiny
# (Puterman 1994 example; Q*(s1,a11) = -60/7, Q*(s1,a12) = -9, Q*(s2,a21) = -20).
printf 'state,a11,a12,a21\ns1,-8.571428571428571,-9,\ns2,,,-20\n' >"$TMP/q.csv"
bc score "$MODELS/puterman-two-state.bell" --q "$TMP/q.csv" --json "$TMP/q.json"
expect_status "Q* table score exit" 0
expect_eq "residual proof kind interval" "$(jget "$TMP/q.json" "d['residual_proof']['kind']")" "interval"
expect_eq "residual of Q* below 1e-12 with its bound" "$(jget "$TMP/q.json" "d['residual'] + d['residual_proof']['bound'] < 1e-12")" "True"
expect_eq "q_error proof present" "$(jget "$TMP/q.json" "d['q_error_proof']['kind']")" "interval"
