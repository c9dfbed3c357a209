# outputs.sh — CSV outputs of solve, and output files that must not appear when a run fails.
# SPDX-License-Identifier: GPL-3.0-or-later
# Contract: bellcheck.h (bc_write_values_csv: `state,value`, one row per state;
# bc_write_policy_csv: `state,action`, terminal states omitted) and model-format.md
# ("No partial output file is left behind by a failed run").
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}

# A cost model worked by hand (discount 0.9, objective min): b costs 1 then ends;
# in a, fast costs 10, slow costs 1 + 0.9 * 1 = 1.9, so V(a) = 1.9, V(b) = 1, V(done) = 0.
cat >"$TMP/costs.bell" <<'M'
discount 0.9
objective min
initial a
terminal done
a fast 10 -> done
a slow 1 -> b
b walk 1 -> done
M
mkdir "$TMP/o"
bc solve "$TMP/costs.bell" --values-out "$TMP/o/values.csv" --policy-out "$TMP/o/policy.csv"
expect_status "csv outputs exit 0" 0
if [ "$(head -n 1 "$TMP/o/values.csv")" = "state,value" ]; then pass "values csv header"
else fail "values csv header" "$(head -n 1 "$TMP/o/values.csv")"; fi
if [ "$(head -n 1 "$TMP/o/policy.csv")" = "state,action" ]; then pass "policy csv header"
else fail "policy csv header" "$(head -n 1 "$TMP/o/policy.csv")"; fi
n=$(($(wc -l <"$TMP/o/values.csv") - 1))
if [ "$n" -eq 3 ]; then pass "values csv has one row per state (3)"; else fail "values csv rows" "$n, expected 3"; fi
n=$(($(wc -l <"$TMP/o/policy.csv") - 1))
if [ "$n" -eq 2 ]; then pass "policy csv omits the terminal state (2 rows)"; else fail "policy csv rows" "$n, expected 2"; fi
"$PY" - "$TMP/o/values.csv" "$TMP/o/policy.csv" <<'PYEOF'
import csv, sys
v = {r["state"]: float(r["value"]) for r in csv.DictReader(open(sys.argv[1]))}
p = {r["state"]: r["action"] for r in csv.DictReader(open(sys.argv[2]))}
want = {"a": 1.9, "b": 1.0, "done": 0.0}   # worked by hand above
ok = sorted(v) == sorted(want) and all(abs(v[s] - want[s]) <= 1e-9 for s in want)
print("PASS values csv holds the costs" if ok else "FAIL values csv holds the costs: %r" % v)
print("PASS policy csv holds the policy" if p == {"a": "slow", "b": "walk"} else "FAIL policy csv holds the policy: %r" % p)
PYEOF

# An output path in a directory that does not exist: exit 2 or 3, nothing left behind.
for opt in --json --values-out --policy-out; do
  mkdir "$TMP/d$opt"
  bc solve "$TMP/costs.bell" "$opt" "$TMP/d$opt/missing/out"
  case $status in 2|3) pass "solve $opt into a missing directory fails ($status)" ;;
    *) fail "solve $opt into a missing directory fails" "exit $status" ;; esac
  expect_in "solve $opt into a missing directory names the path" "$err" "missing/out"
  left=$(ls -A "$TMP/d$opt" | tr "\n" " ")
  if [ -z "$left" ]; then pass "solve $opt into a missing directory leaves nothing"
  else fail "solve $opt into a missing directory leaves nothing" "$left"; fi
done
# Several outputs, one impossible: the run fails, so none of them may appear
# (a pipeline that tests for the report file must not be misled).
mkdir "$TMP/mix"
bc solve "$TMP/costs.bell" --json "$TMP/mix/report.json" --values-out "$TMP/mix/values.csv" \
   --policy-out "$TMP/mix/missing/policy.csv"
case $status in 2|3) pass "one impossible output fails the run ($status)" ;;
  *) fail "one impossible output fails the run" "exit $status" ;; esac
left=$(ls -A "$TMP/mix" | tr "\n" " ")
if [ -z "$left" ]; then pass "one impossible output: no other output left behind"
else fail "one impossible output: no other output left behind" "left: $left"; fi

# A bad model: no report file, no CSV, no temporary file.
mkdir "$TMP/bad"
printf 'discount 0.9\na go 1 -> harbour\n' >"$TMP/deadend.bell"
for cmd in check solve; do
  bc "$cmd" "$TMP/deadend.bell" --json "$TMP/bad/out.json"
  expect_status "$cmd bad model --json exit 2" 2
  if [ -e "$TMP/bad/out.json" ]; then fail "$cmd bad model leaves no out.json" "out.json exists"
  else pass "$cmd bad model leaves no out.json"; fi
done
bc solve "$TMP/deadend.bell" --values-out "$TMP/bad/v.csv" --policy-out "$TMP/bad/p.csv"
expect_status "solve bad model with csv outputs exit 2" 2
left=$(ls -A "$TMP/bad" | tr "\n" " ")
if [ -z "$left" ]; then pass "bad model leaves nothing in the output directory"
else fail "bad model leaves nothing in the output directory" "$left"; fi
# An unsolvable model (discount 1, a state that never ends): solve fails, no report.
printf 'discount 1\ninitial a\nterminal t\na go -1 -> a 1/2 t 1/2\na spin 0 -> sinkhole\nsinkhole loop -1 -> sinkhole\n' >"$TMP/noexit.bell"
bc solve "$TMP/noexit.bell" --json "$TMP/bad/out.json"
expect_status "solve unusable model exit 2" 2
if [ -e "$TMP/bad/out.json" ]; then fail "solve unusable model leaves no out.json" "out.json exists"
else pass "solve unusable model leaves no out.json"; fi
# `check --quiet` still explains an unusable model on standard error ("only errors on
# standard error", check --help): exit 2 with no word would leave the user guessing.
bc check --quiet "$TMP/noexit.bell"
expect_status "check --quiet unusable model exit 2" 2
expect_in "check --quiet unusable model names the state on stderr" "$err" "sinkhole"
if [ -s "$out" ]; then fail "check --quiet prints no report" "$(head -c 200 "$out")"; else pass "check --quiet prints no report"; fi
