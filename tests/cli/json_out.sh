# json_out.sh — `--json -` puts one JSON document alone on standard output; the fields of the solve report.
# SPDX-License-Identifier: GPL-3.0-or-later
# Contract: ../shared/design/OVERVIEW.md (--json FILE, "-" for standard output) and
# docs/json-reports.md; expected values are Puterman's two-state example
# (Markov Decision Processes, 1994, Section 3.1; values from memory):
# v*(s1) = -60/7, v*(s2) = -20, a11 optimal in s1.
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}
M="$ROOT/models/puterman-two-state.bell"

# is_json NAME FILE: FILE holds exactly one JSON document and nothing else.
is_json() {
  if "$PY" -c 'import json,sys; json.load(sys.stdin)' <"$2" 2>"$TMP/pyerr"; then pass "$1"
  else fail "$1" "$(tail -n 1 "$TMP/pyerr"); stdout starts: $(head -c 200 "$2")"; fi
}

bc check "$M" --json -
expect_status "check --json - exit 0" 0
is_json "check --json - stdout is JSON only" "$out"

bc solve "$M" --json -
expect_status "solve --json - exit 0" 0
is_json "solve --json - stdout is JSON only" "$out"
cp "$out" "$TMP/solve.json"

# Warnings still go to standard error, never into the JSON stream.
printf 'discount 0.9\na go 1 -> b 0.5 a 0.5000000001\nb go 0 -> a\n' >"$TMP/renorm.bell"
bc check "$TMP/renorm.bell" --json -
expect_status "check --json - with a warning exit 0" 0
is_json "check --json - with a warning: stdout is JSON only" "$out"
expect_in "check --json - with a warning: warning on stderr" "$err" "warning"
bc solve "$TMP/renorm.bell" --json -
is_json "solve --json - with a warning: stdout is JSON only" "$out"

# --json - together with --quiet, and a text report alongside a JSON file.
bc solve "$M" --json - --quiet
is_json "solve --json - --quiet: stdout is JSON only" "$out"
bc solve "$M" --json "$TMP/report.json"
expect_status "solve --json FILE exit 0" 0
is_json "solve --json FILE holds JSON" "$TMP/report.json"
expect_in "solve --json FILE: text report still on stdout" "$out" "s1"

# Every field the solve report promises, with Puterman's values (1994, Sec. 3.1; from memory).
"$PY" - "$TMP/solve.json" <<'PYEOF'
import json, sys
r = json.load(open(sys.argv[1]))
def check(cond, name, why=""):
    print(("PASS " if cond else "FAIL ") + name + ("" if cond else ": " + why))
m = r.get("model", {})
for k in ("name", "states", "actions", "pairs", "transitions", "discount", "objective"):
    check(k in m, "solve json model." + k, "missing; model = %r" % m)
for k in ("method", "value_initial", "values", "policy", "bound", "iterations", "seconds"):
    check(k in r, "solve json " + k, "missing; keys = %r" % sorted(r))
check(m.get("name") == "puterman-two-state", "solve json model.name value", repr(m.get("name")))
check((m.get("states"), m.get("actions"), m.get("pairs"), m.get("transitions")) == (2, 3, 3, 4),
      "solve json model counts 2 3 3 4", repr(m))
check(m.get("discount") == 0.95, "solve json model.discount 0.95", repr(m.get("discount")))
check(m.get("objective") == "max", "solve json model.objective max", repr(m.get("objective")))
check(r.get("method") in ("vi", "pi", "lp"), "solve json method is a method name", repr(r.get("method")))
v = r.get("values", {})
check(isinstance(v, dict) and sorted(v) == ["s1", "s2"], "solve json values keyed by state", repr(v))
check(abs(v.get("s1", 0) - (-60 / 7)) <= 1e-9, "solve json values s1 = -60/7", repr(v))
check(abs(v.get("s2", 0) - (-20)) <= 1e-9, "solve json values s2 = -20", repr(v))
# Default initial distribution: uniform over the non-terminal states (model-format.md).
check(abs(r.get("value_initial", 0) - (-60 / 7 - 20) / 2) <= 1e-9,
      "solve json value_initial = mean of the values", repr(r.get("value_initial")))
check(r.get("policy") == {"s1": "a11", "s2": "a21"}, "solve json policy", repr(r.get("policy")))
b = r.get("bound")
check(isinstance(b, (int, float)) and 0 <= b <= 1e-9, "solve json bound in [0, 1e-9]", repr(b))
check(isinstance(r.get("iterations"), int) and r["iterations"] >= 0, "solve json iterations integer", repr(r.get("iterations")))
s = r.get("seconds")
check(isinstance(s, (int, float)) and s >= 0, "solve json seconds >= 0", repr(s))
PYEOF
