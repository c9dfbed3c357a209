# methods.sh — solve --method vi|pi|lp on a published example, a cost model (objective min) and a finite horizon worked by hand.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}
M="$ROOT/models/puterman-two-state.bell"

# values_near NAME JSON 'state=value ...' TOL: every listed value within TOL; also
# optional keys method=, initial=, policy.STATE= checked exactly / within TOL.
values_near() {
  "$PY" - "$@" <<'PYEOF'
import json, sys
name, path, spec, tol = sys.argv[1], sys.argv[2], sys.argv[3].split(), float(sys.argv[4])
try:
    r = json.load(open(path))
except ValueError as e:
    print("FAIL %s: no JSON report (%s)" % (name, e)); sys.exit(0)
for item in spec:
    k, want = item.split("=", 1)
    if k == "method":
        got, ok = r.get("method"), r.get("method") == want
    elif k == "initial":
        got = r.get("value_initial")
        ok = isinstance(got, (int, float)) and abs(got - float(eval(want))) <= tol
    elif k.startswith("policy."):
        got = r.get("policy", {}).get(k[7:]); ok = got == want
    else:
        got = r.get("values", {}).get(k)
        ok = isinstance(got, (int, float)) and abs(got - float(eval(want))) <= tol
    print(("PASS %s %s" % (name, k)) if ok else "FAIL %s %s: got %r, expected %s" % (name, k, got, want))
PYEOF
}

# Puterman, Markov Decision Processes (1994), Section 3.1 two-state example, discount
# 0.95: v*(s1) = -60/7 = -8.571428571428571, v*(s2) = -20, a11 optimal (values from memory).
for method in vi pi lp; do
  bc solve "$M" --method "$method" --json -
  expect_status "puterman $method exit 0" 0
  values_near "puterman $method" "$out" "method=$method s1=-60/7 s2=-20 policy.s1=a11 policy.s2=a21" 1e-9
done

# objective min: costs stay positive in every output (the model's own sign).
# Worked by hand: b costs 1 then ends; in a, fast costs 10, slow costs 1 + 0.9 * 1 = 1.9.
cat >"$TMP/costs.bell" <<'X'
discount 0.9
objective min
initial a
terminal done
a fast 10 -> done
a slow 1 -> b
b walk 1 -> done
X
for method in vi pi lp; do
  bc solve "$TMP/costs.bell" --method "$method" --json -
  expect_status "costs $method exit 0" 0
  values_near "costs $method" "$out" "method=$method a=1.9 b=1 done=0 initial=1.9 policy.a=slow policy.b=walk" 1e-9
done
bc solve "$TMP/costs.bell"
expect_status "costs text exit 0" 0
expect_in "costs text report shows +1.9" "$out" "1.9"
expect_not_in "costs text report shows no -1.9" "$out" "-1.9"

# A finite horizon of 3 decisions, by backward induction by hand (V0 = 0):
#   home: rest pays 1 and stays; work pays 0 and goes to office;
#   office: earn pays 4, then home or office with probability 1/2 each.
# Discount 1:
#   V1(home) = max(1, 0) = 1 (rest)            V1(office) = 4
#   V2(home) = max(1+1, 0+4) = 4 (work)        V2(office) = 4 + (1 + 4)/2 = 6.5
#   V3(home) = max(1+4, 0+6.5) = 6.5 (work)    V3(office) = 4 + (4 + 6.5)/2 = 9.25
# Discount 1/2 (future stages weighted by the discount, common practice):
#   V1 = (1, 4);  V2(home) = max(1 + 1/2, 4/2) = 2 (work), V2(office) = 4 + (1 + 4)/4 = 5.25
#   V3(home) = max(1 + 2/2, 5.25/2) = 2.625 (work), V3(office) = 4 + (2 + 5.25)/4 = 5.8125
model_h() { # DISCOUNT
  printf 'bell 1\ndiscount %s\nhorizon 3\ninitial home\n' "$1"
  printf 'home rest 1 -> home\nhome work 0 -> office\noffice earn 4 -> home 1/2 office 1/2\n'
}
model_h 1 >"$TMP/h1.bell"
model_h 1/2 >"$TMP/h2.bell"
bc solve "$TMP/h1.bell" --json -
expect_status "horizon 3 discount 1 exit 0" 0
values_near "horizon 3 discount 1" "$out" "home=6.5 office=9.25 initial=6.5 policy.home=work policy.office=earn" 1e-12
cp "$out" "$TMP/h1.json"
"$PY" - "$TMP/h1.json" <<'PYEOF'
import json, sys
try:
    sp = json.load(open(sys.argv[1])).get("stage_policy")
except ValueError:
    sp = None
# By hand above: work at stages 0 and 1 (3 and 2 decisions left), rest at the last one.
want = [{"home": "work", "office": "earn"}, {"home": "work", "office": "earn"},
        {"home": "rest", "office": "earn"}]
print("PASS horizon 3 stage policy" if sp == want else "FAIL horizon 3 stage policy: %r" % (sp,))
PYEOF
bc solve "$TMP/h2.bell" --json -
expect_status "horizon 3 discount 1/2 exit 0" 0
values_near "horizon 3 discount 1/2" "$out" "home=2.625 office=5.8125 initial=2.625 policy.home=work" 1e-12
bc check "$TMP/h1.bell"
expect_status "horizon 3 check exit 0" 0
if grep -i horizon "$out" | grep -q 3; then pass "horizon 3 check reports the horizon"
else fail "horizon 3 check reports the horizon" "$(head -c 300 "$out")"; fi
# vi/pi/lp are for infinite horizons: refused with a reason; the method the
# refusal points to (backward induction, bc_method_name "backward") is accepted.
bc solve "$TMP/h1.bell" --method vi
case $status in 2|3) pass "horizon 3 --method vi refused ($status)" ;;
  *) fail "horizon 3 --method vi refused" "exit $status" ;; esac
expect_in "horizon 3 --method vi says why" "$err" "horizon"
bc solve "$TMP/h1.bell" --method backward --json -
expect_status "horizon 3 --method backward exit 0" 0
values_near "horizon 3 --method backward" "$out" "method=backward home=6.5 office=9.25" 1e-12
