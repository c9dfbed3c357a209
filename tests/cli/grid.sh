# grid.sh — `bellcheck grid` and TASK inputs of check, solve and score: exact scheme probabilities recomputed in Python, stuck cells, read-back, the grid of an NPY Q-table, errors.
# SPDX-License-Identifier: GPL-3.0-or-later
# The task is the invented crater rover (models/crater-rover.task).  The independent
# reference is tests/tools/grid_ref.py (plain Python with fractions), which recomputes
# every state-action pair of each scheme from the task's formulas.
. "$(dirname "$0")/../lib.sh"
PY=/usr/bin/python3
ROVER="$ROOT/models/crater-rover.task"
REF="$ROOT/tests/tools/grid_ref.py"
jget() { "$PY" -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }
expect_eq() { if [ "$2" = "$3" ]; then pass "$1"; else fail "$1" "got '$2', want '$3'"; fi; }
# ref_ok NAME ARGS...: grid_ref.py prints "ok N".
ref_ok() {
  name=$1; shift
  got=$("$PY" "$REF" "$@" 2>&1)
  case "$got" in ok*) pass "$name ($got pairs)";; *) fail "$name" "$(echo "$got" | head -3 | tr '\n' '~')";; esac
}

bc grid --help
expect_status "grid --help" 0
expect_in "grid --help names --cells" "$out" "--cells"

# sample: count/K exactly, every pair (K = 16: 4 x 4 points per cell).
bc grid "$ROVER" --cells 16x16 -o "$TMP/s.bell" --json "$TMP/s.json"
expect_status "grid sample 16x16" 0
expect_in "grid reports the model's size" "$out" "257 states (1 terminal), 3 actions, 768 state-action pairs"
expect_eq "grid JSON: points per cell" "$(jget "$TMP/s.json" "d['grid']['points_per_cell']")" "16"
ref_ok "sample: every probability is count/16 as recomputed in Python" sample "$TMP/s.bell" 16 16 4
bc grid "$ROVER" --cells 16x16 --samples 9 -o "$TMP/s9.bell"
ref_ok "sample --samples 9: count/9 as recomputed in Python" sample "$TMP/s9.bell" 16 16 3

# center: the successor of each centre.
bc grid "$ROVER" --cells 16x16 --scheme center -o "$TMP/c.bell"
ref_ok "center: each centre's successor as recomputed in Python" center "$TMP/c.bell" 16 16

# interp: barycentric weights reproduce each node's image, sum to exactly 1.
bc grid "$ROVER" --cells 16x16 --scheme interp -o "$TMP/i.bell"
ref_ok "interp: weights sum to 1 and reproduce the node image (checked in Python)" interp "$TMP/i.bell" 16 16

# Read back: the written model is the model the TASK gives directly.
bc check "$TMP/s.bell"
expect_status "the written model checks" 0
bc solve "$TMP/s.bell" --json "$TMP/vb.json"
bc solve "$ROVER" --cells 16x16 --json "$TMP/vt.json"
expect_status "solve TASK --cells" 0
expect_eq "solve: TASK and its written model give the same optimum" \
  "$(jget "$TMP/vb.json" "d['value_initial']")" "$(jget "$TMP/vt.json" "d['value_initial']")"
bc grid "$ROVER" --cells 16x16 --format json -o "$TMP/s.json.model"
bc check "$TMP/s.json.model" --json "$TMP/sj.json"
expect_eq "grid --format json reads back with the same size" "$(jget "$TMP/sj.json" "d['model']['transitions']")" \
  "$(jget "$TMP/s.json" "d['model']['transitions']")"
cat "$ROVER" | "$BELLCHECK" grid - --cells 16x16 -o "$TMP/stdin.bell" >/dev/null 2>&1
if cmp -s "$TMP/stdin.bell" "$TMP/s.bell"; then pass "grid from standard input: the same model"
else fail "grid from standard input: the same model" "files differ"; fi

# check on a coarse center grid: the grid holds most cells in place.
bc check "$ROVER" --cells 8x8 --scheme center --json "$TMP/k.json"
expect_status "coarse center grid: not usable (no exit from stuck cells)" 2
expect_in "check names stuck cells" "$out" "cells are stuck"
expect_in "check hints at a finer grid or another scheme" "$out" "a finer grid than 8x8 or another --scheme"
"$PY" "$REF" stuck 8 8 | sort >"$TMP/stuck.want"
jget "$TMP/k.json" "'\n'.join(d['grid']['stuck'])" | sort >"$TMP/stuck.got"
if [ -s "$TMP/stuck.want" ] && cmp -s "$TMP/stuck.want" "$TMP/stuck.got"; then
  pass "stuck cells are exactly those Python finds ($(wc -l <"$TMP/stuck.want"))"
else fail "stuck cells are exactly those Python finds" "$(diff "$TMP/stuck.want" "$TMP/stuck.got" | head -5 | tr '\n' ' ')"; fi
bc check "$ROVER" --cells 64x64 --scheme interp --json "$TMP/k2.json"
expect_status "a fine interp grid is usable" 0
expect_eq "a fine interp grid has no stuck cell" "$(jget "$TMP/k2.json" "len(d['grid']['stuck'])")" "0"
expect_eq "check JSON of a plain model has grid null" "$(jget "$TMP/sj.json" "d['grid']")" "None"

# score TASK --q q.npy: the grid from the array's shape.
"$PY" -c "
import numpy as np
q = np.zeros((16, 16, 3)); q[:, :, 2] = 1.0
np.save('$TMP/q3.npy', q); np.save('$TMP/qflat.npy', q.reshape(256, 3)); np.save('$TMP/qbad.npy', np.zeros((16, 16, 2)))"
bc score "$ROVER" --q "$TMP/q3.npy" --json "$TMP/sc3.json"
expect_status "score TASK --q with a (16, 16, 3) array and no --cells" 0
expect_eq "score: the grid came from the array (257 states)" "$(jget "$TMP/sc3.json" "d['model']['states']")" "257"
bc score "$ROVER" --cells 16x16 --q "$TMP/qflat.npy" --json "$TMP/scf.json"
expect_status "score TASK --cells with a flat (256, 3) table" 0
if cmp -s "$TMP/sc3.json" "$TMP/scf.json"; then pass "score: identical JSON for the two shapes"; \
else fail "score: identical JSON for the two shapes" "differ"; fi
bc score "$ROVER" --q "$TMP/qbad.npy"
expect_status "score: a (16, 16, 2) array does not fit 3 actions" 2

# Errors.
bc grid "$ROVER"
expect_status "grid without --cells" 2
expect_in "grid without --cells says what to give" "$err" "--cells"
bc grid "$ROVER" --cells 16
expect_status "grid with one count for two variables" 2
expect_in "wrong count of cells named" "$err" "2 state variables (x, v)"
bc grid "$ROVER" --cells 16x16 --samples 10
expect_status "grid --samples not a square" 2
bc grid "$ROVER" --cells 16x16 --scheme centre
expect_status "grid --scheme unknown" 2
bc grid "$ROVER" --cells 16x16 --scheme center --samples 4
expect_status "grid --samples with the center scheme is refused" 2
bc grid "$ROVER" --cells 16x16 --noise-samples 4
expect_status "grid --noise-samples for a task without noise is refused" 2
bc grid "$ROOT/models/reservoir-release.task" --cells 8x4 --noise-samples 3 --json "$TMP/r.json"
expect_status "grid of the reservoir task (two noise variables, 3 strata each)" 0
expect_eq "reservoir: noise strata in the JSON report" "$(jget "$TMP/r.json" "d['grid']['noise_strata']")" "3"
bc check "$TMP/s.bell" --cells 4x4
expect_status "--cells with a model is refused" 2
expect_in "--cells with a model: says why" "$err" "apply to a continuous TASK"
cat >"$TMP/nan.task" <<'T'
discount 0.9
state x 0 1
action a 0 1
next x = x
reward log(x - a)
initial x = 0.5
T
bc grid "$TMP/nan.task" --cells 4  # sample: 8 points per cell, the first at (0.5/8) * 0.25
expect_status "a formula producing NaN while building the grid" 2
expect_in "the NaN message names formula, state and action" "$err" "\`reward\` (line 5) produced a NaN or an infinity at the state x = 0.015625 under action a:1 (a = 1)"
bc grid "$TMP/nan.task" --cells 4 -o "$TMP/nan.bell"
if [ -e "$TMP/nan.bell" ]; then fail "a failed grid leaves no file" "nan.bell exists"; else pass "a failed grid leaves no file"; fi
