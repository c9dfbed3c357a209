#!/bin/sh
# demo.sh — the demo: check, solve and cross-check the bundled warehouse-robot model (an invented scenario).
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
echo "Wrote $OUT/solution.json and $OUT/policy.csv."
echo "Note: a bound proven here covers the model, not the physical robot it describes."
