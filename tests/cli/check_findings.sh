# check_findings.sh — the structural findings of `check` on small hand-made models, read from its JSON.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=/usr/bin/python3
# jget FILE EXPR: evaluates a Python expression on the parsed JSON `d`.
jget() { "$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
# expect_eq NAME GOT WANT
expect_eq() { if [ "$2" = "$3" ]; then pass "$1"; else fail "$1" "got '$2', want '$3'"; fi; }

# Hand-made: `island` is mentioned only as a successor of `lost`, which nothing reaches.
cat > "$TMP/unreach.bell" <<'M'
discount 0.9
initial home
home  stay  1 -> home
lost  stay  0 -> island
island stay 0 -> island
M
bc check "$TMP/unreach.bell" --json "$TMP/u.json"
expect_status "unreachable states are a warning (exit 0)" 0
expect_eq "unreachable states listed" "$(jget "$TMP/u.json" "sorted(d['unreachable'])")" "['island', 'lost']"
expect_eq "no discount-1 findings at discount 0.9" "$(jget "$TMP/u.json" "d['no_exit']")" "None"
expect_in "text report names the unreachable states" "$out" "2 states are unreachable"

# Hand-made, discount 1: from `a`, action `gamble` ends with probability 1/2 and
# otherwise falls into `pit`, which loops forever; `safe` always ends.  From `pit`
# no policy ends; `a` can end with probability 1 (action `safe`), so only `pit` is listed.
cat > "$TMP/noexit.bell" <<'M'
discount 1
initial a
terminal end
a   gamble -1 -> end 1/2 pit 1/2
a   safe   -5 -> end
pit spin   -1 -> pit
M
bc check "$TMP/noexit.bell" --json "$TMP/n.json"
expect_status "a state with no way out is an error (exit 2)" 2
expect_eq "no_exit lists exactly pit" "$(jget "$TMP/n.json" "d['no_exit']")" "['pit']"
expect_eq "usable is false" "$(jget "$TMP/n.json" "d['usable']")" "False"
expect_in "stderr names pit" "$err" "pit"
bc solve "$TMP/noexit.bell"
expect_status "solve refuses the model (exit 2)" 2

# Hand-made, discount 1: `wait` loops on reward 0 in `q` (an end component of
# zero reward); `go` ends.  `r` has only a paid loop back to q, so it is on no zero loop.
cat > "$TMP/zero.bell" <<'M'
discount 1
initial q
terminal done
q  wait  0 -> q
q  go    1 -> done
r  back -1 -> q
M
bc check "$TMP/zero.bell" --json "$TMP/z.json"
expect_status "zero-reward loop is a warning (exit 0)" 0
expect_eq "zero_reward_loops lists exactly q" "$(jget "$TMP/z.json" "d['zero_reward_loops']")" "['q']"

# Hand-made, discount 1: a zero-reward pair that can leave its cycle is no end component:
# x -> y (0), y -> x 1/2, done 1/2 (0): every policy ends with probability 1.
cat > "$TMP/leaky.bell" <<'M'
discount 1
terminal done
x  move 0 -> y
y  move 0 -> x 1/2 done 1/2
M
bc check "$TMP/leaky.bell" --json "$TMP/l.json"
expect_status "leaky zero cycle exit 0" 0
expect_eq "leaky zero cycle is not an end component" "$(jget "$TMP/l.json" "d['zero_reward_loops']")" "[]"

# Renormalised lines are listed by line number: 0.3333333333 + 0.6666666666 = 1 - 1e-10 (the format allows |sum - 1| <= 1e-9).
printf 'discount 0.5\na x 1 -> a 0.3333333333 b 0.6666666666\nb x 0 -> b\n' > "$TMP/renorm.bell"
bc check "$TMP/renorm.bell" --json "$TMP/r.json"
expect_status "renormalised model exit 0" 0
expect_eq "renormalised_lines is [2]" "$(jget "$TMP/r.json" "d['renormalised_lines']")" "[2]"

# Hand-made, discount 1: staying in s on `a` pays +1 forever, so no optimum exists (an error);
# the same loop with a cost of 1 under objective max is fine (every loop loses).
printf 'discount 1\nterminal t\ninitial s\ns a 1 -> s\ns b 0 -> t\n' > "$TMP/pos.bell"
bc check "$TMP/pos.bell" --json "$TMP/pos.json"
expect_status "positive-reward loop under discount 1: exit 2" 2
expect_eq "unbounded lists s" "$(jget "$TMP/pos.json" "d['unbounded']")" "['s']"
bc solve "$TMP/pos.bell"
expect_status "solve refuses the unbounded model (exit 2)" 2
printf 'discount 1\nterminal t\ninitial s\ns a -1 -> s\ns b 0 -> t\n' > "$TMP/neg.bell"
bc check "$TMP/neg.bell" --json "$TMP/neg.json"
expect_status "negative-reward loop: exit 0" 0
expect_eq "nothing unbounded" "$(jget "$TMP/neg.json" "d['unbounded']")" "[]"
# Objective min: a loop that earns (negative cost) is unbounded.
printf 'discount 1\nobjective min\nterminal t\ninitial s\ns a -1 -> s\ns b 0 -> t\n' > "$TMP/earn.bell"
bc check "$TMP/earn.bell"
expect_status "negative-cost loop under objective min: exit 2" 2

# A renormalised `initial` (0.5 + 0.4999999999 = 1 - 1e-10) is a finding, not only a stderr line.
printf 'discount 1/2\ninitial a 0.5 b 0.4999999999\na x 1 -> b\nb x 1 -> a\n' > "$TMP/ir.bell"
bc check "$TMP/ir.bell" --quiet --json "$TMP/ir.json"
expect_status "renormalised initial: exit 0" 0
expect_eq "initial_renormalised is true" "$(jget "$TMP/ir.json" "d['initial_renormalised']")" "True"
