# score.sh — `bellcheck score` from the command line: readers, JSON fields, gates and exit statuses.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=/usr/bin/python3
jget() { "$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
expect_eq() { if [ "$2" = "$3" ]; then pass "$1"; else fail "$1" "got '$2', want '$3'"; fi; }
P=$ROOT/models/puterman-two-state.bell

# Puterman, Markov Decision Processes (1994), two-state example, discount 0.95 (values from
# memory): v*(s1) = -60/7 with a11; a12 in s1 gives 10 + 0.95 * (-20) = -9 (by hand),
# so the policy {s1: a12} has regret 9 - 60/7 = 3/7 at s1, and 3/14 at the uniform initial distribution.
printf 'state,action\ns1,a12\ns2,a21\n' > "$TMP/pol.csv"
bc score "$P" --policy "$TMP/pol.csv" --json "$TMP/s.json"
expect_status "policy with regret, no gate: exit 0" 0
expect_eq "regret at s1 is 3/7 (by hand)" "$(jget "$TMP/s.json" "abs(d['regret']['max_state'] - 3/7) < 1e-9")" "True"
expect_eq "regret at the initial distribution is 3/14 (by hand)" "$(jget "$TMP/s.json" "abs(d['regret']['initial'] - 3/14) < 1e-9")" "True"
expect_eq "worst state is s1" "$(jget "$TMP/s.json" "d['regret']['worst_state']")" "s1"
expect_eq "agreement 1/2 of states" "$(jget "$TMP/s.json" "d['agreement']['states']")" "0.5"
expect_eq "agent value of s1 is -9 (by hand)" "$(jget "$TMP/s.json" "abs(d['values']['s1'] + 9) < 1e-9")" "True"
expect_eq "JSON has every documented key" "$(jget "$TMP/s.json" "all(k in d for k in ['values','optimal_values','regret','residual','q_error','agreement','traps','gates'])")" "True"

# Gates: regret 3/14 = 0.214...
bc score "$P" --policy "$TMP/pol.csv" --max-regret 0.3
expect_status "max-regret 0.3 holds: exit 0" 0
bc score "$P" --policy "$TMP/pol.csv" --max-regret 0.2
expect_status "max-regret 0.2 fails: exit 1" 1
expect_in "failed gate is named" "$err" "max-regret"
# |V*(initial)| = (60/7 + 20)/2 = 100/7; 1% of it is 0.1428... < 3/14.
bc score "$P" --policy "$TMP/pol.csv" --max-regret 1%
expect_status "max-regret 1% fails: exit 1" 1
bc score "$P" --policy "$TMP/pol.csv" --max-regret 2%
expect_status "max-regret 2% holds: exit 0" 0
bc score "$P" --policy "$TMP/pol.csv" --min-agreement 0.9 --max-state-regret 1
expect_status "min-agreement fails, state regret holds: exit 1" 1
expect_in "only the failed gate is named" "$err" "min-agreement"
expect_not_in "the passing gate is not named as failed" "$err" "max-state-regret failed"

# A Q-table equal to Q* (by hand: Q*(s1,a11) = -60/7, Q*(s1,a12) = -9, Q*(s2,a21) = -20).
printf 'state,a11,a12,a21\ns1,-8.571428571428571,-9,\ns2,,,-20\n' > "$TMP/q.csv"
bc score "$P" --q "$TMP/q.csv" --json "$TMP/q.json" --max-residual 1e-9 --max-regret 0
expect_status "Q* itself passes every gate: exit 0" 0
expect_eq "Q*: regret 0" "$(jget "$TMP/q.json" "d['regret']['initial'] == 0")" "True"
bc score "$P" --policy "$TMP/pol.csv" --max-residual 1
expect_status "--max-residual without a Q-table: exit 2" 2

# Bad input: unknown action, missing state.
printf 'state,action\ns1,fly\ns2,a21\n' > "$TMP/bad.csv"
bc score "$P" --policy "$TMP/bad.csv"
expect_status "unknown action: exit 2" 2
expect_in "unknown action named" "$err" "fly"
printf 'state,action\ns1,a11\n' > "$TMP/part.csv"
bc score "$P" --policy "$TMP/part.csv"
expect_status "missing state: exit 2" 2
bc score "$P" --policy "$TMP/part.csv" --missing skip
expect_status "missing state with --missing skip: exit 0" 0
bc score "$P"
expect_status "no agent given: exit 2" 2

# A policy that shuttles forever under discount 1 is a trap (hand-made model):
# a <-> b on `loop`, each may instead `go` to the terminal end.
printf 'discount 1\ninitial a\nterminal end\na loop -1 -> b\nb loop -1 -> a\na go -5 -> end\nb go -5 -> end\n' > "$TMP/shuttle.bell"
printf 'state,action\na,loop\nb,loop\n' > "$TMP/shuttle.csv"
bc score "$TMP/shuttle.bell" --policy "$TMP/shuttle.csv" --json "$TMP/t.json" --max-regret 100
expect_status "trap fails a finite regret gate: exit 1" 1
expect_eq "both states are traps" "$(jget "$TMP/t.json" "sorted(d['traps']['states'])")" "['a', 'b']"
expect_eq "trap values are null in JSON" "$(jget "$TMP/t.json" "d['values']['a']")" "None"
expect_eq "reach probability 0" "$(jget "$TMP/t.json" "d['traps']['reach_probability']")" "0"
bc score "$TMP/shuttle.bell" --policy "$TMP/shuttle.csv"
expect_in "text report prints -inf" "$out" "-inf"

# Equiprobable random policies given as stochastic policy files (state,action,prob).
# random_policy MODEL OUT: every non-terminal state, each of its actions with probability 1/4.
random_policy() {
  { echo "state,action,prob"
    grep -E '^r[0-9]+c[0-9]+ [a-z]+ ' "$1" | awk '{print $1 "," $2 ",0.25"}'; } > "$2"
}
# Sutton & Barto, Reinforcement Learning: An Introduction, 2nd ed. (2018), Figure 3.2:
# state values of the equiprobable random policy on the Example 3.5 gridworld,
# discount 0.9; first row 3.3 8.8 4.4 5.3 1.5 (from memory), to 0.1.
random_policy "$ROOT/models/sutton-barto-3.5-gridworld.bell" "$TMP/rand35.csv"
bc score "$ROOT/models/sutton-barto-3.5-gridworld.bell" --policy "$TMP/rand35.csv" --json "$TMP/r35.json"
expect_status "Figure 3.2 policy file: exit 0" 0
expect_eq "Figure 3.2 first row (S&B 2018, from memory)" \
  "$(jget "$TMP/r35.json" "all(abs(d['values']['r0c%d' % c] - v) <= 0.1 for c, v in enumerate([3.3, 8.8, 4.4, 5.3, 1.5]))")" "True"
# Sutton & Barto (2018), Figure 4.1 (k = infinity): random policy on the Example 4.1
# gridworld, discount 1: 0 -14 -20 -22 / -14 -18 -20 -20 / -20 -20 -18 -14 / -22 -20 -14 0
# (from memory; the book rounds to integers), to 0.5.
random_policy "$ROOT/models/sutton-barto-4.1-gridworld.bell" "$TMP/rand41.csv"
bc score "$ROOT/models/sutton-barto-4.1-gridworld.bell" --policy "$TMP/rand41.csv" --json "$TMP/r41.json"
expect_status "Figure 4.1 policy file: exit 0" 0
expect_eq "Figure 4.1 values (S&B 2018, from memory)" \
  "$(jget "$TMP/r41.json" "all(abs(d['values']['r%dc%d' % (i // 4, i % 4)] - v) <= 0.5 for i, v in enumerate([0,-14,-20,-22,-14,-18,-20,-20,-20,-20,-18,-14,-22,-20,-14,0]))")" "True"
expect_eq "Figure 4.1: no traps under the random policy" "$(jget "$TMP/r41.json" "d['traps']['count']")" "0"

# Found in review. A gap of 5e-7 on values near 1e6 is a suboptimal action (by hand:
# Q*(s0,a) = 1000000, Q*(s0,b) = 999999.9999995), whatever the size of the values.
printf 'discount 0.9\ninitial s0\nterminal T\ns0 a 1000000 -> T\ns0 b 999999.9999995 -> T\n' > "$TMP/big.bell"
printf 'state,action\ns0,b\n' > "$TMP/big.csv"
bc score "$TMP/big.bell" --policy "$TMP/big.csv" --min-agreement 1
expect_status "a 5e-7 gap at |V| = 1e6 fails min-agreement 1: exit 1" 1
# A horizon model is unsupported input (exit 2), not a solver failure.
printf 'discount 1\nhorizon 3\ns a 1 -> s\n' > "$TMP/h.bell"
printf 'state,action\ns,a\n' > "$TMP/h.csv"
bc score "$TMP/h.bell" --policy "$TMP/h.csv"
expect_status "horizon model: exit 2" 2
bc score "$P" --policy "$TMP/pol.csv" --q-discount 0.5
expect_status "--q-discount without a Q-table: exit 2" 2
printf 'state,a11,a12,a21\n' > "$TMP/empty-q.csv"
bc score "$P" --q "$TMP/empty-q.csv" --missing skip
expect_status "a table covering no state: exit 2" 2
bc score "$P" --policy "$TMP/part.csv" --missing skip --json "$TMP/part.json"
expect_eq "an uncovered state has no agent action in JSON" "$(jget "$TMP/part.json" "'s2' in d['policy']")" "False"
