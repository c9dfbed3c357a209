#!/bin/sh
# run.sh — runs every test (unit binaries, command-line scripts, reference checks)
# SPDX-License-Identifier: GPL-3.0-or-later
# and ends with "N passed, N failed".  Each test prints lines "PASS name" or
# "FAIL name ..."; a test program that exits non-zero without printing a FAIL
# line counts as one failure, so a crash is never silent.
cd "$(dirname "$0")/.." || exit 2
BUILD=${BUILD:-build}
case $BUILD in /*) ;; *) BUILD=$PWD/$BUILD ;; esac
export BUILD # tests that link the library find it here (tests/cli/library_example.sh)
export BELLCHECK="${BELLCHECK:-$BUILD/bellcheck}"
export PY=/usr/bin/python3
log=$(mktemp -d "${TMPDIR:-/tmp}/bc-tests.XXXXXX") || exit 2
trap 'rm -rf "$log"' EXIT
passed=0; failed=0
run_one() { # name command...
  name=$1; shift
  out="$log/out"
  "$@" >"$out" 2>"$log/err"; rc=$?
  p=$(grep -c '^PASS ' "$out"); f=$(grep -c '^FAIL ' "$out")
  grep '^FAIL ' "$out" | sed "s|^|[$name] |"
  if [ "$rc" -ne 0 ] && [ "$f" -eq 0 ]; then
    echo "FAIL [$name] exited with status $rc"; sed 's/^/    /' "$log/err" | tail -n 15
    f=1
  fi
  if [ "$p" -eq 0 ] && [ "$f" -eq 0 ]; then
    echo "FAIL [$name] ran no check"; f=1
  fi
  passed=$((passed + p)); failed=$((failed + f))
  printf '%-40s %4d passed, %d failed\n' "$name" "$p" "$f"
}
for t in "$BUILD"/tests/test_*; do
  [ -x "$t" ] && run_one "unit/$(basename "$t")" "$t"
done
for t in tests/cli/*.sh tests/ref/*.sh; do
  [ -f "$t" ] && run_one "${t#tests/}" sh "$t"
done
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
