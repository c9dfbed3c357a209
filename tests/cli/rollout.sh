# rollout.sh — `bellcheck rollout` and `bellcheck refine`: returns computed by hand, the 95% interval against scipy and its coverage, an independent replay of the random streams, reproducibility whatever the threads, success rate, --against, bad usage.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=/usr/bin/python3
TASKS="$ROOT/tests/tasks"
ROVER="$ROOT/models/crater-rover.task"
RES="$ROOT/models/reservoir-release.task"
jget() { "$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
expect_eq() { if [ "$2" = "$3" ]; then pass "$1"; else fail "$1" "got '$2', want '$3'"; fi; }
expect_true() { # NAME JSON PYTHON-CONDITION
  r=$(jget "$2" "$3" 2>&1)
  if [ "$r" = "True" ]; then pass "$1"; else fail "$1" "$3 is $r"; fi
}

for cmd in rollout refine; do
  bc "$cmd" --help
  expect_status "$cmd --help exit 0" 0
  expect_in "$cmd --help prints usage" "$out" "usage: bellcheck $cmd"
  expect_in "$cmd --help says what a simulation covers" "$out" "not the physical machine"
done
bc --help
expect_in "bellcheck --help lists rollout" "$out" "rollout"
expect_in "bellcheck --help lists refine" "$out" "refine"

# Returns by hand (tests/tasks/hand-walk.task): every episode takes 5 steps at
# 2 each, so the mean is 10 and the 95% interval [10, 10] contains it exactly.
printf 'state,action\n' >"$TMP/walk.csv"
for c in 0 1 2 3 4 5 6 7 8 9; do printf 'c%s,step\n' "$c" >>"$TMP/walk.csv"; done
bc rollout "$TASKS/hand-walk.task" --cells 10 --policy "$TMP/walk.csv" --episodes 500 --json "$TMP/walk.json"
expect_status "rollout of a policy file" 0
expect_eq "hand-walk: mean return 10 (by hand)" "$(jget "$TMP/walk.json" "d['mean_return']")" "10.0"
expect_eq "hand-walk: 95% interval [10, 10] (every episode the same)" "$(jget "$TMP/walk.json" "d['ci95']")" "[10.0, 10.0]"
expect_eq "hand-walk: every episode stops" "$(jget "$TMP/walk.json" "float(d['success_rate'])")" "1.0"
expect_eq "hand-walk: 5 steps (by hand)" "$(jget "$TMP/walk.json" "[d['steps'][k] for k in ('min', 'p50', 'max')]")" "[5, 5, 5]"
expect_in "the text report says what a simulation covers" "$out" "not the physical machine"
expect_in "the text report gives the interval" "$out" "95% CI [10, 10]"

# The 95% interval of coin.task (pays 1 with probability 1/2) is
# mean +- t(0.975, n-1) s / sqrt(n) with s = sqrt(k (n-k) / (n (n-1))): the
# half-width is recomputed with scipy.stats.t.ppf (Student 1908) for three n.
printf 'state,action\n' >"$TMP/coin.csv"
for c in 0 1 2 3; do printf 'c%s,a:0\n' "$c" >>"$TMP/coin.csv"; done
for n in 5 30 10000; do
  bc rollout "$TASKS/coin.task" --cells 4 --policy "$TMP/coin.csv" --episodes $n --json "$TMP/coin$n.json"
  r=$("$PY" - "$TMP/coin$n.json" <<'EOF'
import json, math, sys
from scipy.stats import t
d = json.load(open(sys.argv[1]))
n = d["episodes"]; k = round(d["mean_return"] * n)
s = math.sqrt(k * (n - k) / (n * (n - 1)))
half = t.ppf(0.975, n - 1) * s / math.sqrt(n)
lo, hi = d["ci95"]
ok = abs(d["mean_return"] - k / n) < 1e-15 and abs(lo - (k / n - half)) <= 1e-8 * half and abs(hi - (k / n + half)) <= 1e-8 * half
print("ok" if ok else "got %r, want mean %r +- %r" % (d["ci95"], k / n, half))
EOF
)
  expect_eq "coin, $n episodes: interval = mean +- t s/sqrt(n) (scipy)" "$r" "ok"
done
expect_true "coin, 10000 episodes: the interval contains 1/2 (by hand)" "$TMP/coin10000.json" "d['ci95'][0] <= 0.5 <= d['ci95'][1]"
# Coverage: over 40 seeds the 95% interval of 400 episodes should contain 1/2
# about 38 times; fewer than 33 has probability below 1e-3 (binomial(40, 0.95)).
hits=0
for s in $(seq 1 40); do
  "$BELLCHECK" rollout "$TASKS/coin.task" --cells 4 --policy "$TMP/coin.csv" --episodes 400 --seed "$s" --json - --quiet >"$TMP/c.json" 2>/dev/null
  [ "$(jget "$TMP/c.json" "d['ci95'][0] <= 0.5 <= d['ci95'][1]")" = True ] && hits=$((hits + 1))
done
if [ "$hits" -ge 33 ]; then pass "coin: the 95% interval holds 1/2 for $hits of 40 seeds (>= 33)"
else fail "coin: the 95% interval holds 1/2 often enough" "only $hits of 40 seeds"; fi

# The random streams as docs/methods.md describes them: tests/tools/rollout_ref.py
# replays noisy-walk.task in Python (splitmix64, Steele, Lea and Flood 2014) with a
# stochastic policy; 200 episodes fit one block, so even the sum's order is the same.
cat >"$TMP/walk2.csv" <<'EOF'
state,action,prob
c0,ahead,1
c1,back,0.3
c1,ahead,0.7
c2,ahead,1
c3,ahead,1
c4,back,0.5
c4,ahead,0.5
c5,ahead,1
c6,ahead,1
c7,ahead,1
c8,ahead,1
c9,back,1
EOF
for seed in 42 7; do
  bc rollout "$TASKS/noisy-walk.task" --cells 10 --policy "$TMP/walk2.csv" --episodes 200 --seed $seed --json "$TMP/nw.json"
  expect_eq "noisy-walk seed $seed: the same episodes as the Python replay" \
    "$(jget "$TMP/nw.json" "repr(d['mean_return']), float(d['success_rate']), d['steps']['p50']" | tr -d "()',")" \
    "$("$PY" "$ROOT/tests/tools/rollout_ref.py" "$TMP/walk2.csv" $seed 200 | tr -d "'")"
done

# Reproducibility: same seed, same JSON, whatever the threads; another seed differs.
bc solve "$RES" --cells 10x5 --policy-out "$TMP/res.csv" --quiet
bc rollout "$RES" --cells 10x5 --policy "$TMP/res.csv" --episodes 3000 --against 20x10 --threads 1 --json "$TMP/r1.json"
expect_status "rollout --against" 0
bc rollout "$RES" --cells 10x5 --policy "$TMP/res.csv" --episodes 3000 --against 20x10 --threads 1 --json "$TMP/r1b.json"
bc rollout "$RES" --cells 10x5 --policy "$TMP/res.csv" --episodes 3000 --against 20x10 --threads 2 --json "$TMP/r2.json"
if cmp -s "$TMP/r1.json" "$TMP/r1b.json"; then pass "same seed: identical JSON"; else fail "same seed: identical JSON" "differ"; fi
if cmp -s "$TMP/r1.json" "$TMP/r2.json"; then pass "--threads 1 and 2: identical JSON"; else fail "--threads 1 and 2: identical JSON" "$(diff "$TMP/r1.json" "$TMP/r2.json" | head -4 | tr '\n' ' ')"; fi
bc rollout "$RES" --cells 10x5 --policy "$TMP/res.csv" --episodes 3000 --against 20x10 --seed 2 --json "$TMP/r3.json"
expect_true "another seed: another mean" "$TMP/r3.json" "d['mean_return'] != $(jget "$TMP/r1.json" "d['mean_return']")"
# The reservoir has no `stop` line: no episode stops, each runs its limit of 365 days.
expect_eq "never stops: success_rate 0" "$(jget "$TMP/r1.json" "float(d['success_rate'])")" "0.0"
expect_eq "never stops: every episode runs 365 steps" "$(jget "$TMP/r1.json" "[d['steps']['min'], d['steps']['max']]")" "[365, 365]"
# Common random numbers: the regret is the difference of the two means, episode by episode.
expect_true "regret = against's mean - agent's mean (paired)" "$TMP/r1.json" \
  "abs(d['against']['regret']['mean'] - (d['against']['mean_return'] - d['mean_return'])) < 1e-9 * max(1, abs(d['mean_return']))"
expect_true "regret has an interval" "$TMP/r1.json" "d['against']['regret']['ci95'][0] <= d['against']['regret']['mean'] <= d['against']['regret']['ci95'][1]"
expect_true "JSON: episodes, mean_return, ci95, success_rate" "$TMP/r1.json" \
  "d['episodes'] == 3000 and len(d['ci95']) == 2 and 'success_rate' in d and 'note' in d"

# A Q-table as NPY: the grid comes from its shape; greedy actions.
"$PY" -c "
import numpy as np
q = np.zeros((16, 16, 3)); q[:, :, 2] = 1.0; q[:, 8:, 0] = 2.0   # forward, reverse when moving right
np.save('$TMP/q.npy', q)"
bc rollout "$ROVER" --q "$TMP/q.npy" --episodes 200 --json "$TMP/q.json"
expect_status "rollout TASK --q q.npy without --cells" 0
expect_eq "the grid came from the array's shape" "$(jget "$TMP/q.json" "d['grid']['cells']")" "[16, 16]"
bc rollout "$ROVER" --q "$TMP/q.npy" --episodes 200 --json - --quiet
expect_status "rollout --json - --quiet" 0
if cmp -s "$out" "$TMP/q.json"; then pass "--json - writes the same JSON to standard output"; else fail "--json -" "differs"; fi

# A formula that fails only in simulation: reward sqrt(w + 3) with w normal: the
# grid's noise strata stay above -3, the simulation's draws do not.
cat >"$TMP/nan.task" <<'EOF'
task 1
discount 0.9
state x 0 1
action a 0
noise w normal 0 1
next x = x
reward sqrt(w + 3)
initial x = 0.5
limit 100
EOF
printf 'state,action\nc0,a:0\nc1,a:0\n' >"$TMP/nan.csv"
bc rollout "$TMP/nan.task" --cells 2 --policy "$TMP/nan.csv" --episodes 1000 --json "$TMP/nan.json"
expect_status "a NaN in simulation: exit 2" 2
expect_in "a NaN in simulation names the episode and step" "$err" "episode "
expect_in "a NaN in simulation names the formula" "$err" "reward"
if [ -e "$TMP/nan.json" ]; then fail "a failed rollout writes no JSON" "file exists"; else pass "a failed rollout writes no JSON"; fi

# Bad usage: exit 2 and a message for every option.
usage2() { # NAME FRAGMENT ARGS...
  name=$1; frag=$2; shift 2
  bc "$@"
  expect_status "$name: exit 2" 2
  expect_in "$name: says why" "$err" "$frag"
}
P="--policy $TMP/walk.csv"
W="$TASKS/hand-walk.task"
usage2 "rollout without an agent" "exactly one of --q" rollout "$W" --cells 10
usage2 "rollout with --q and --policy" "exactly one of --q" rollout "$W" --cells 10 $P --q "$TMP/q.npy"
usage2 "rollout --episodes 0" "--episodes" rollout "$W" --cells 10 $P --episodes 0
usage2 "rollout --episodes x" "--episodes" rollout "$W" --cells 10 $P --episodes x
usage2 "rollout --episodes too many" "--episodes" rollout "$W" --cells 10 $P --episodes 100000001
usage2 "rollout --against 0x4" "--against" rollout "$W" --cells 10 $P --against 0x4
usage2 "rollout --against with the wrong number of counts" "count" rollout "$W" --cells 10 $P --against 20x20
usage2 "rollout --seed -1" "--seed" rollout "$W" --cells 10 $P --seed -1
usage2 "rollout --threads 0" "--threads" rollout "$W" --cells 10 $P --threads 0
usage2 "rollout --cells bad" "--cells" rollout "$W" --cells 10y $P
usage2 "rollout --scheme bad" "--scheme" rollout "$W" --cells 10 --scheme nearest $P
usage2 "rollout --samples bad" "--samples" rollout "$W" --cells 10 --samples 0 $P
usage2 "rollout --noise-samples bad" "--noise-samples" rollout "$W" --cells 10 --noise-samples 0 $P
usage2 "rollout --max-memory bad" "--max-memory" rollout "$W" --cells 10 --max-memory lots $P
usage2 "rollout without --cells (CSV policy)" "--cells" rollout "$W" $P
usage2 "rollout of a model" "not a TASK" rollout "$ROOT/models/puterman-two-state.bell" $P
usage2 "rollout unknown option" "unknown" rollout "$W" --cells 10 $P --frobnicate
usage2 "rollout missing argument" "incomplete" rollout "$W" --cells 10 $P --episodes
usage2 "rollout two tasks" "one TASK" rollout "$W" "$W" --cells 10 $P
usage2 "rollout agent file missing" "no-such" rollout "$W" --cells 10 --policy "$TMP/no-such.csv"
usage2 "rollout agent of another grid" "" rollout "$W" --cells 12 $P
usage2 "rollout --against unusable grid" "not usable" rollout "$ROVER" --q "$TMP/q.npy" --against 4x4 --scheme center
usage2 "refine without --cells" "--cells" refine "$W"
usage2 "refine with one grid" "at least two" refine "$W" --cells 10
usage2 "refine with grids not getting finer" "more cells" refine "$W" --cells 20,10
usage2 "refine with mixed counts" "same number" refine "$W" --cells 10,20x20
usage2 "refine with an empty grid in the list" "--cells" refine "$W" --cells 10,,20
usage2 "refine with a bad grid" "--cells" refine "$W" --cells 10,2y
usage2 "refine --episodes 0" "--episodes" refine "$W" --cells 10,20 --episodes 0
usage2 "refine --proof bad" "--proof" refine "$W" --cells 10,20 --proof maybe
usage2 "refine --max-seconds 0" "--max-seconds" refine "$W" --cells 10,20 --max-seconds 0
usage2 "refine --seed bad" "--seed" refine "$W" --cells 10,20 --seed x
usage2 "refine --threads bad" "--threads" refine "$W" --cells 10,20 --threads 2000
usage2 "refine --scheme bad" "--scheme" refine "$W" --cells 10,20 --scheme nearest
usage2 "refine --samples not a power" "--samples" refine "$ROVER" --cells 8x8,16x16 --samples 5
usage2 "refine --noise-samples bad" "--noise-samples" refine "$W" --cells 10,20 --noise-samples 0
usage2 "refine --max-memory bad" "--max-memory" refine "$W" --cells 10,20 --max-memory lots
usage2 "refine --json without a file" "incomplete" refine "$W" --cells 10,20 --json
usage2 "rollout --json without a file" "incomplete" rollout "$W" --cells 10 $P --json
usage2 "refine of a model" "not a TASK" refine "$ROOT/models/puterman-two-state.bell" --cells 10,20
usage2 "refine unknown option" "unknown" refine "$W" --cells 10,20 --frobnicate
usage2 "refine two tasks" "one TASK" refine "$W" "$W" --cells 10,20
usage2 "refine a task that does not read" "no-such" refine "$TMP/no-such.task" --cells 10,20

# refine on a grid the model of which is unusable: reported, exit 2, the other grids still shown.
bc refine "$ROVER" --cells 4x4,16x16 --episodes 50 --proof off --json "$TMP/ru.json"
expect_status "refine with an unusable coarse grid: exit 2" 2
expect_eq "refine JSON: the unusable grid's status" "$(jget "$TMP/ru.json" "[g['status'] for g in d['grids']]")" "['unusable', 'ok']"
expect_in "refine text names the unusable grid" "$out" "not usable"
