# input_forms.sh — the same model from standard input, with CRLF, a UTF-8 BOM, tabs, no final newline, or as JSON: same answer.
# SPDX-License-Identifier: GPL-3.0-or-later
# Contract: OVERVIEW.md (MODEL "-" = standard input) and model-format.md (UTF-8 text,
# tokens separated by spaces or tabs; errors name line and column).  Reference answer:
# Puterman, Markov Decision Processes (1994), Section 3.1 two-state example,
# discount 0.95: v*(s1) = -60/7, v*(s2) = -20 (values from memory).
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}
M="$ROOT/models/puterman-two-state.bell"

# same_answer NAME JSON: values, policy and value_initial equal those of the file run
# (to 1e-12: the same exact model must give the same doubles up to solver order).
same_answer() {
  "$PY" - "$1" "$TMP/ref.json" "$2" <<'PYEOF'
import json, sys
name, ref = sys.argv[1], json.load(open(sys.argv[2]))
try:
    got = json.load(open(sys.argv[3]))
except ValueError as e:
    print("FAIL %s: not JSON (%s)" % (name, e)); sys.exit(0)
ok = (sorted(ref["values"]) == sorted(got["values"])
      and all(abs(ref["values"][s] - got["values"][s]) <= 1e-12 for s in ref["values"])
      and ref["policy"] == got["policy"]
      and abs(ref["value_initial"] - got["value_initial"]) <= 1e-12
      and ref["model"]["transitions"] == got["model"]["transitions"])
print("PASS " + name if ok else "FAIL %s: %r vs %r" % (name, got.get("values"), ref["values"]))
PYEOF
}
# solve_same NAME FILE-OR-DASH [stdin file]
solve_same() {
  if [ $# -ge 3 ]; then bc solve "$2" --method pi --json - <"$3"; else bc solve "$2" --method pi --json -; fi
  expect_status "$1 exit 0" 0
  cp "$out" "$TMP/got.json"
  same_answer "$1 same answer" "$TMP/got.json"
}

bc solve "$M" --method pi --json -
expect_status "file exit 0" 0
cp "$out" "$TMP/ref.json"
"$PY" - "$TMP/ref.json" <<'PYEOF'
import json, sys
v = json.load(open(sys.argv[1]))["values"]
ok = abs(v["s1"] + 60 / 7) <= 1e-9 and abs(v["s2"] + 20) <= 1e-9   # Puterman (1994), Sec. 3.1, from memory
print("PASS file gives Puterman's values" if ok else "FAIL file gives Puterman's values: %r" % v)
PYEOF

solve_same "stdin" - "$M"
bc check - <"$M"
expect_status "check stdin exit 0" 0

# Variants of the same model text.
awk '{ printf "%s\r\n", $0 }' "$M" >"$TMP/crlf.bell"
printf '\357\273\277' >"$TMP/bom.bell"; cat "$M" >>"$TMP/bom.bell"
sed 's/ \{1,\}/\t/g' "$M" >"$TMP/tabs.bell"
printf '%s' "$(cat "$M")" >"$TMP/nonl.bell"          # $(...) drops the final newline
{ printf '\357\273\277'; sed 's/ \{1,\}/ \t /g' "$M" | awk '{ printf "%s\r\n", $0 }'; } >"$TMP/all.bell"
printf '%s' "$(cat "$TMP/all.bell")" >"$TMP/all-nonl.bell"
for v in crlf bom tabs nonl all all-nonl; do
  solve_same "$v" "$TMP/$v.bell"
done
solve_same "crlf stdin" - "$TMP/crlf.bell"
solve_same "bom stdin" - "$TMP/bom.bell"
if [ "$(tail -c 1 "$TMP/nonl.bell" | od -An -tx1 | tr -d ' ')" != "0a" ]; then pass "nonl file really ends without newline"
else fail "nonl file really ends without newline" "$(tail -c 3 "$TMP/nonl.bell" | od -An -c)"; fi

# The JSON form of the same model, from a file and from standard input.
cat >"$TMP/m.json" <<'J'
{"format": "bell-json", "version": 1, "name": "puterman-two-state", "discount": "0.95",
 "states": ["s1", "s2"], "actions": ["a11", "a12", "a21"],
 "transitions": [
  {"state": "s1", "action": "a11", "reward": "5", "next": [["s1", "1/2"], ["s2", "1/2"]]},
  {"state": "s1", "action": "a12", "reward": 10, "next": [["s2"]]},
  {"state": "s2", "action": "a21", "reward": "-1", "next": [["s2", "1"]]}]}
J
solve_same "json file" "$TMP/m.json"
solve_same "json stdin" - "$TMP/m.json"

# Positions stay right: a BOM takes no column, CR is not part of a token,
# and a tab counts as one column (errors name the byte column).
printf '\357\273\277bell 2\ndiscount 0.9\na go 1 -> a\n' >"$TMP/bom-err.bell"
bc check "$TMP/bom-err.bell"
expect_status "bom error exit 2" 2
expect_in "bom error at 1:6" "$err" "bom-err.bell:1:6: error:"
printf 'discount 0.9\r\na go ten -> a\r\n' >"$TMP/crlf-err.bell"
bc check "$TMP/crlf-err.bell"
expect_status "crlf error exit 2" 2
expect_in "crlf error at 2:6" "$err" "crlf-err.bell:2:6: error:"
if grep -q "$(printf '\r')" "$err"; then fail "crlf error message holds no CR" "CR found"; else pass "crlf error message holds no CR"; fi
printf 'discount 0.9\na\tgo\tten\t->\ta\n' >"$TMP/tab-err.bell"
bc check "$TMP/tab-err.bell"
expect_status "tab error exit 2" 2
expect_in "tab error at 2:6" "$err" "tab-err.bell:2:6: error:"
