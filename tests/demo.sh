#!/bin/sh
# demo.sh — the demo: check, solve and cross-check an invented model, grade an invented learned agent, then the rover pipeline (train, grade, simulate, refine).
# SPDX-License-Identifier: GPL-3.0-or-later
set -e
cd "$(dirname "$0")/.."
B=${BUILD:-build}
BC=$B/bellcheck
MODEL=models/demo-warehouse-robot.bell
OUT=$B/demo
mkdir -p "$OUT"
echo "== bellcheck check $MODEL"
$BC check "$MODEL"
echo
echo "== bellcheck solve $MODEL --show 9"
$BC solve "$MODEL" --show 9 --json "$OUT/solution.json" --policy-out "$OUT/policy.csv"
echo
echo "== bellcheck solve --compare $MODEL   (three independent methods)"
$BC solve --compare "$MODEL"
echo
echo "== bellcheck score models/demo-yard-drone.bell --q models/demo-yard-drone-q.csv --max-regret 5%"
echo "   (grading a drone's learned Q-table; the gate is meant to fail: exit status 1)"
set +e
$BC score models/demo-yard-drone.bell --q models/demo-yard-drone-q.csv --max-regret 5% --top 8 \
    --json "$OUT/score.json"
status=$?
set -e
[ "$status" -eq 1 ] || { echo "demo: expected the gate to fail (exit 1), got $status" >&2; exit 1; }
echo
echo "== the rover pipeline (models/rover-pipeline): a learner, its grade, its simulation"
echo "== $B/models/rover-qlearn models/crater-rover.task 32x32 $OUT/rover-q.npy --episodes 5000 --seed 7"
echo "   (tabular Q-learning on a 32x32 grid of the crater rover, learning from the task's own dynamics)"
"$B/models/rover-qlearn" models/crater-rover.task 32x32 "$OUT/rover-q.npy" --episodes 5000 --seed 7
echo
echo "== bellcheck score models/crater-rover.task --q $OUT/rover-q.npy --top 3"
echo "   (graded against the proven optimum of the 32x32 grid model; the grid comes from the array's shape)"
$BC score models/crater-rover.task --q "$OUT/rover-q.npy" --top 3 --json "$OUT/rover-score.json"
echo
echo "== bellcheck rollout models/crater-rover.task --q $OUT/rover-q.npy --episodes 2000 --against 64x64 --threads 2"
echo "   (the same table driving the rover in the task itself, beside the optimal policy of a finer grid)"
$BC rollout models/crater-rover.task --q "$OUT/rover-q.npy" --episodes 2000 --against 64x64 --threads 2 \
    --json "$OUT/rover-rollout.json"
echo
echo "== bellcheck refine models/crater-rover.task --cells 16x16,32x32,64x64"
echo "   (each grid's proven optimum, how it converges, and its policy simulated in the task:"
echo "   does a finer grid give a better controller?)"
$BC refine models/crater-rover.task --cells 16x16,32x32,64x64 --json "$OUT/rover-refine.json" \
    --html "$OUT/rover-refine.html"
echo
echo "Wrote $OUT/solution.json, $OUT/policy.csv, $OUT/score.json, $OUT/rover-q.npy,"
echo "$OUT/rover-score.json, $OUT/rover-rollout.json and $OUT/rover-refine.json."
echo "Note: a bound proven here covers the model, not the physical machine it describes."
echo
echo "== pictures: the drone's grading and the crater rover's optimum as one-file HTML pages and SVG maps"
set +e
$BC score models/demo-yard-drone.bell --q models/demo-yard-drone-q.csv --max-regret 5% --quiet \
    --html "$OUT/drone-report.html" --svg "$OUT/drone-pictures"
status=$?
set -e
[ "$status" -eq 1 ] || { echo "demo: expected the gate to fail (exit 1), got $status" >&2; exit 1; }
$BC solve models/crater-rover.task --cells 40x40 --quiet --html "$OUT/rover-report.html" \
    --svg "$OUT/rover-pictures"
echo "Wrote $OUT/drone-report.html and $OUT/rover-report.html (open them in a browser; they print"
echo "too), the maps in $OUT/drone-pictures/ and $OUT/rover-pictures/, and the refinement study's"
echo "page $OUT/rover-refine.html."
