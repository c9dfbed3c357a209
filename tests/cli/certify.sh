# certify.sh — certify writes certificates that verify re-checks; changed, foreign and malformed certificates are refused.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}
M="$ROOT/models"
P="$M/puterman-two-state.bell"

bc certify --help
expect_status "certify --help" 0
expect_in "certify --help text" "$out" "re-checks it later without solving"
bc verify --help
expect_status "verify --help" 0

# Puterman (1994) two-state example: V*(s1) = -60/7, V*(s2) = -20 (from memory).
bc certify "$P" -o "$TMP/p.cert"
expect_status "certify puterman" 0
expect_in "certificate is exact" "$TMP/p.cert" '"kind": "exact"'
expect_in "certificate holds -60/7" "$TMP/p.cert" '"s1": "-60/7"'
expect_in "certificate names the model digest" "$TMP/p.cert" '"sha256": "'
expect_in "certify text says what a certificate covers" "$out" "not the physical system"
bc verify "$P" "$TMP/p.cert"
expect_status "verify puterman holds" 0
expect_in "verify says HOLDS" "$out" "HOLDS"
bc verify "$P" "$TMP/p.cert" --json -
expect_in "verify JSON holds" "$out" '"holds": true'

# A changed value: the Bellman equation fails at s1 (exit 1, the state named).
sed 's|"-60/7"|"-61/7"|' "$TMP/p.cert" >"$TMP/v.cert"
bc verify "$P" "$TMP/v.cert"
expect_status "changed value fails" 1
expect_in "changed value names s1" "$out" "first failing state: s1"
# A changed action: a12 (worth 10 - 0.95*20 = -9 < -60/7) does not give s1's value.
sed 's|"s1": "a11"|"s1": "a12"|' "$TMP/p.cert" >"$TMP/a.cert"
bc verify "$P" "$TMP/a.cert"
expect_status "changed action fails" 1
expect_in "changed action names s1" "$err" "state s1"
# A value that is optimal but claimed for the wrong action set: all values
# raised consistently is still refused (s2 = -19 breaks s2's own equation).
sed 's|"s2": "-20"|"s2": "-19"|' "$TMP/p.cert" >"$TMP/s2.cert"
bc verify "$P" "$TMP/s2.cert"
expect_status "changed s2 fails" 1

# Another model: refused as foreign (exit 2), both digests given.
bc verify "$M/sutton-barto-3.5-gridworld.bell" "$TMP/p.cert"
expect_status "foreign certificate refused" 2
expect_in "foreign certificate message" "$err" "belongs to another model"
# The same model with comments and spacing changed has the same normalised form.
{ echo "# a comment"; sed 's/ -> / ->  /' "$P"; } >"$TMP/p2.bell"
bc verify "$TMP/p2.bell" "$TMP/p.cert"
expect_status "same model, other spacing, verifies" 0
# One probability changed: another model.
sed 's|s1 a11  5 -> s1 1/2 s2 1/2|s1 a11  5 -> s1 0.4 s2 0.6|' "$P" >"$TMP/p3.bell"
bc verify "$TMP/p3.bell" "$TMP/p.cert"
expect_status "changed model refuses the certificate" 2

# Malformed certificates: exit 2 with a reason.
head -c 60 "$TMP/p.cert" >"$TMP/trunc.cert"
bc verify "$P" "$TMP/trunc.cert"
expect_status "truncated certificate" 2
expect_in "truncated certificate message" "$err" "JSON syntax error"
echo '{"hello": 1}' >"$TMP/other.cert"
bc verify "$P" "$TMP/other.cert"
expect_status "not a certificate" 2
expect_in "not a certificate message" "$err" "not a bellcheck certificate"
grep -v '"s2": "-20"' "$TMP/p.cert" | sed 's|"s1": "-60/7",|"s1": "-60/7"|' >"$TMP/miss.cert"
bc verify "$P" "$TMP/miss.cert"
expect_status "missing value" 2
expect_in "missing value message" "$err" "no value for state 's2'"
sed 's|"-60/7"|"-60/0"|' "$TMP/p.cert" >"$TMP/zero.cert"
bc verify "$P" "$TMP/zero.cert"
expect_status "zero denominator" 2
expect_in "zero denominator located" "$err" "values.s1"
sed 's|"s1": "a11"|"s9": "a11"|' "$TMP/p.cert" >"$TMP/unknown.cert"
bc verify "$P" "$TMP/unknown.cert"
expect_status "unknown state" 2
expect_in "unknown state located" "$err" "policy.s9"
: >"$TMP/empty.cert"
bc verify "$P" "$TMP/empty.cert"
expect_status "empty certificate" 2
bc verify "$P" "$TMP/nonexistent.cert"
expect_status "missing certificate file" 2

# Discount 1: the gambler's problem (Sutton & Barto 2018, Example 4.3).  A
# policy that stakes nothing at c50 satisfies both Bellman conditions there
# (a zero-reward self-loop keeps the value) but never terminates: refused.
G="$M/sutton-barto-4.3-gambler.bell"
bc certify "$G" -o "$TMP/g.cert"
expect_status "certify gambler" 0
bc verify "$G" "$TMP/g.cert"
expect_status "verify gambler holds" 0
sed 's|"c50": "stake50"|"c50": "stake0"|' "$TMP/g.cert" >"$TMP/g0.cert"
expect_in "gambler certificate stakes 50 at c50" "$TMP/g.cert" '"c50": "stake50"'
bc verify "$G" "$TMP/g0.cert"
expect_status "non-terminating policy refused" 1
expect_in "non-terminating policy message" "$out" "never reaches a terminal state"

# Interval certificates (a Garnet model, Archibald, McKinnon & Thomas 1995).
"$PY" "$ROOT/tests/tools/garnet.py" --states 300 --actions 3 --branch 4 --discount 0.95 \
  --seed 7 -o "$TMP/g300.bell"
bc certify "$TMP/g300.bell" --proof interval -o "$TMP/i.cert"
expect_status "certify interval" 0
expect_in "interval certificate kind" "$TMP/i.cert" '"kind": "interval"'
bc verify "$TMP/g300.bell" "$TMP/i.cert" --json -
expect_status "verify interval holds" 0
expect_in "verify interval JSON" "$out" '"holds": true'
sed 's|"bound": [0-9.e+-]*|"bound": 1e-300|' "$TMP/i.cert" >"$TMP/ib.cert"
bc verify "$TMP/g300.bell" "$TMP/ib.cert"
expect_status "interval bound too small fails" 1
"$PY" - "$TMP/i.cert" "$TMP/iv.cert" <<'PYEOF'
import json, sys
c = json.load(open(sys.argv[1]))
c["values"]["s5"] += 0.5  # far outside any proven bound
json.dump(c, open(sys.argv[2], "w"))
PYEOF
bc verify "$TMP/g300.bell" "$TMP/iv.cert"
expect_status "interval changed value fails" 1

# Outputs: nothing half-written; horizon models refused.
bc certify "$P" -o "$TMP/no/such/dir/p.cert"
expect_status "certify to a missing directory" 3
[ ! -e "$TMP/no/such/dir/p.cert" ] && pass "no certificate left behind" || fail "no certificate left behind" "file exists"
printf 'bell 1\ndiscount 1\nhorizon 2\nstates s t\nactions a\ns a 1 -> t\nt a 0 -> s\n' >"$TMP/h.bell"
bc certify "$TMP/h.bell" -o "$TMP/h.cert"
expect_status "horizon model refused" 2
[ ! -e "$TMP/h.cert" ] && pass "no horizon certificate written" || fail "no horizon certificate written" "file exists"
bc certify "$P" -o - --json -
expect_status "two outputs on stdout refused" 2
