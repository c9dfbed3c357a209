#!/bin/sh
# demo.sh — the demo: check, solve and cross-check an invented model, then grade an invented learned agent.
set -e
cd "$(dirname "$0")/.."
BC=build/bellcheck
MODEL=models/demo-warehouse-robot.bell
OUT=build/demo
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
echo "Wrote $OUT/solution.json, $OUT/policy.csv and $OUT/score.json."
echo "Note: a bound proven here covers the model, not the physical machine it describes."
