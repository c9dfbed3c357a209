# review_fixes.sh — one check per defect found in review of the core; each would have caught its bug.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=/usr/bin/python3
jget() { "$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
expect_eq() { if [ "$2" = "$3" ]; then pass "$1"; else fail "$1" "got '$2', want '$3'"; fi; }

# A model with no transition lines (every state terminal) is refused, not a crash.
printf 'discount 0.5\nterminal t\ninitial t\n' > "$TMP/empty.bell"
bc check "$TMP/empty.bell"
expect_status "all-terminal model: exit 2" 2
expect_in "all-terminal model: says why" "$err" "no transition lines"

# Expected rewards are summed exactly: 1e20 + 1/3 (-1e20) + 2/3 (-1e20) = 0, so V* = 0 (by hand).
printf 'discount 1/2\ns a 100000000000000000000 -> s 1/3 -100000000000000000000 s 2/3 -100000000000000000000\ns b 0 -> s\n' > "$TMP/cancel.bell"
bc solve "$TMP/cancel.bell" --json "$TMP/cancel.json"
expect_status "cancelling outcome rewards: exit 0" 0
expect_eq "cancelling outcome rewards: V*(s) = 0" "$(jget "$TMP/cancel.json" "d['values']['s']")" "0"

# A successor written with probability 0 is no way out: s can never reach t.
printf 'discount 1\nterminal t\ninitial s\ns a -1 -> s 1 t 0\n' > "$TMP/zero.bell"
bc check "$TMP/zero.bell"
expect_status "probability-0 exit does not count: exit 2" 2

# The nearest double (IEEE 754 round to nearest, as strtod does — common practice):
# 0.999999999999999999 rounds to 1, so with discount 1/2 V = r / (1 - 1/2) = 2.
printf 'discount 1/2\nx a 0.999999999999999999 -> x\n' > "$TMP/near.bell"
bc solve "$TMP/near.bell" --json "$TMP/near.json"
expect_eq "reward rounds to the nearest double" "$(jget "$TMP/near.json" "d['values']['x'] == 2")" "True"

# `name` takes the rest of its line up to a comment, `->` included.
printf 'name dock -> depot  # the shuttle\ndiscount 1/2\na x 1 -> a\n' > "$TMP/name.bell"
bc check "$TMP/name.bell" --json "$TMP/name.json"
expect_eq "name keeps -> and drops the comment" "$(jget "$TMP/name.json" "d['model']['name']")" "dock -> depot"

# A label that is not UTF-8 (here Latin-1) is refused at its byte.
printf 'name caf\351\ndiscount 1/2\na x 1 -> a\n' > "$TMP/latin1.bell"
bc check "$TMP/latin1.bell" --json "$TMP/latin1.json"
expect_status "Latin-1 label: refused" 2
expect_in "Latin-1 label: at its byte" "$err" "latin1.bell:1:9: error: the label holds a byte that is not UTF-8 (0xE9)"
# Bytes of a file name that are not UTF-8 become U+FFFD in the default label, so JSON stays valid.
latin1file="$TMP/caf$(printf '\351').bell"
printf 'discount 1/2\na x 1 -> a\n' > "$latin1file"
bc check "$latin1file" --json "$TMP/latin1-name.json"
expect_eq "Latin-1 file name: label with U+FFFD" \
  "$("$PY" -c "import json,sys; print(json.load(open(sys.argv[1], encoding='utf-8'))['model']['name'] == 'caf\ufffd')" "$TMP/latin1-name.json" 2>&1)" "True"
# The same for a grid model named after its task file (grid_build.c).
latin1task="$TMP/rov$(printf '\351').task"
printf 'discount 0.9\nstate x 0 10\naction u = {step: 1, stay: 0}\nnext x = x + u\nreward 1\ninitial x = 0\n' > "$latin1task"
bc grid "$latin1task" --cells 4 --format json -o "$TMP/rov-grid.json"
expect_eq "Latin-1 task file name: grid label with U+FFFD" \
  "$("$PY" -c "import json,sys; print(json.load(open(sys.argv[1], encoding='utf-8'))['name'].startswith('rov\ufffd (grid 4'))" "$TMP/rov-grid.json" 2>&1)" "True"

# A failed solve (iteration limit) writes no output file.
bc solve "$ROOT/models/sutton-barto-3.5-gridworld.bell" --method vi --max-iter 1 --values-out "$TMP/v.csv" --policy-out "$TMP/p.csv"
expect_status "iteration limit: exit 3" 3
if [ -e "$TMP/v.csv" ] || [ -e "$TMP/p.csv" ]; then fail "failed solve leaves no CSV" "a CSV was written"; else pass "failed solve leaves no CSV"; fi

# An output path that is a symbolic link: the file it names is replaced, the link stays.
echo old > "$TMP/target.json"; ln -s target.json "$TMP/link.json"
bc check "$ROOT/models/puterman-two-state.bell" --json "$TMP/link.json" --quiet
if [ -L "$TMP/link.json" ] && grep -q '"model"' "$TMP/target.json"; then pass "symlink output: link kept, target written"
else fail "symlink output: link kept, target written" "$(ls -la "$TMP")"; fi

# Two outputs cannot share standard output.
bc solve "$ROOT/models/puterman-two-state.bell" --json - --values-out -
expect_status "two outputs on stdout: exit 2" 2

# A report that cannot reach standard output is a failure (exit 3), not silence.
if [ -w /dev/full ]; then
  "$BELLCHECK" check "$ROOT/models/puterman-two-state.bell" > /dev/full 2>"$TMP/full.err"; st=$?
  if [ "$st" -eq 3 ]; then pass "stdout write error: exit 3"; else fail "stdout write error: exit 3" "exit $st"; fi
fi

# Thirty bad lines: 20 errors listed (docs/limits.md, "errors per reading"), then a line saying
# reading stopped there, since nothing past the 20th is counted.
{ printf 'discount 0.9\nterminal t\n'; i=1; while [ $i -le 30 ]; do printf 's%d a 1 -> t 0.3\n' $i; i=$((i + 1)); done; } > "$TMP/thirty.bell"
bc check "$TMP/thirty.bell"
expect_status "thirty bad lines: exit 2" 2
expect_eq "thirty bad lines: 20 errors listed" "$(grep -c ': error: ' "$err")" "20"
expect_in "thirty bad lines: says reading stopped" "$err" "(reading stops at 20 errors; later problems, if any, are not listed)"
