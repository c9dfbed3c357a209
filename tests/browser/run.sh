#!/bin/sh
# run.sh — `make test-browser`: renders the HTML reports with Debian's headless chromium and checks the screenshots; ends with "N passed, N failed".
# SPDX-License-Identifier: GPL-3.0-or-later
cd "$(dirname "$0")/../.." || exit 2
: "${BELLCHECK:=build/bellcheck}"
export BELLCHECK
PY=/usr/bin/python3
out=$(mktemp -d "${TMPDIR:-/tmp}/bc-browser.XXXXXX") || exit 2
trap 'rm -rf "$out"' EXIT
log="$out/log"
: >"$log"
note() { echo "$1" | tee -a "$log"; }

# Debian's package installs the command as chromium; running as root needs --no-sandbox.
browser=$(command -v chromium || command -v chromium-browser)
[ -n "$browser" ] || note "FAIL browser: chromium is not installed (build-aux/deps.sh browser)"

# shot NAME PAGE W H COLOURS...: a screenshot of PAGE at W x H, then the image checks.
shot() {
  name=$1 page=$2 w=$3 h=$4; shift 4
  [ -n "$browser" ] || return
  timeout 120 "$browser" --headless --no-sandbox --disable-gpu --hide-scrollbars --no-first-run \
    --user-data-dir="$out/profile" --window-size="$w,$h" --screenshot="$out/$name.png" \
    "file://$page" >"$out/$name.err" 2>&1
  if [ -s "$out/$name.png" ]; then note "PASS $name: rendered"; else
    note "FAIL $name: chromium wrote no image: $(tail -n 3 "$out/$name.err")"; return; fi
  "$PY" tests/browser/png_check.py "$name" "$out/$name.png" "$w" "$h" "$@" | tee -a "$log"
}

# The score page of the demo drone: its maps are drawn in the action colours of
# Okabe & Ito (2008): south orange #e69f00, east bluish green #009e73 (RGB from memory).
"$BELLCHECK" score models/demo-yard-drone.bell --q models/demo-yard-drone-q.csv --quiet \
  --html "$out/score.html"
[ $? -eq 0 ] && note "PASS score page written" || note "FAIL score page written"
shot score-page "$out/score.html" 1024 2400 '#009e73:2000' '#e69f00:2000'

# The solve page of the crater rover: the V* map in viridis (its top colour
# #fde725, van der Walt & Smith 2015) beside the policy map.
"$BELLCHECK" solve models/crater-rover.task --cells 30x30 --quiet --html "$out/solve.html"
[ $? -eq 0 ] && note "PASS solve page written" || note "FAIL solve page written"
shot solve-page "$out/solve.html" 1024 2000 '#009e73:2000' '#0072b2:2000' '#fde725:200'

# The refine page of the crater rover: only its two pictures draw in pure black
# (#000000: the plots' frames, the trajectories' end squares and start circles;
# text and table lines are #1a1a1a and #bbbbbb), and only pictures are framed in
# #dddddd (the page's style sheet).  Measured without the pictures: no black
# pixel and about 150 of #dddddd; with them about 3,400 and 5,700.
"$BELLCHECK" refine models/crater-rover.task --cells 8x8,16x16,32x32 --episodes 200 --quiet \
  --html "$out/refine.html"
[ $? -eq 0 ] && note "PASS refine page written" || note "FAIL refine page written"
shot refine-page "$out/refine.html" 1024 2600 '#000000:1500' '#dddddd:3000'

# Printed: the print style sheet yields a whole PDF (header, end marker, more than a blank page's bytes).
if [ -n "$browser" ]; then
  timeout 120 "$browser" --headless --no-sandbox --disable-gpu --no-first-run --user-data-dir="$out/profile" \
    --print-to-pdf="$out/score.pdf" "file://$out/score.html" >"$out/pdf.err" 2>&1
  size=$(wc -c <"$out/score.pdf" 2>/dev/null || echo 0)
  if head -c 5 "$out/score.pdf" 2>/dev/null | grep -q '%PDF-' && tail -c 32 "$out/score.pdf" | grep -aq '%%EOF' &&
     [ "$size" -gt 20000 ]; then
    note "PASS score page printed to PDF"
  else
    note "FAIL score page printed to PDF: $(tail -n 3 "$out/pdf.err")"
  fi
fi
p=$(grep -c '^PASS' "$log"); f=$(grep -c '^FAIL' "$log")
echo "$p passed, $f failed"
[ "$f" -eq 0 ]
