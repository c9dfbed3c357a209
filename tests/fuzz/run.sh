#!/bin/sh
# run.sh — runs the libFuzzer targets of tests/fuzz/SEEDS for a set time each and says what they found.
# SPDX-License-Identifier: GPL-3.0-or-later
# Usage: tests/fuzz/run.sh FUZZ_BUILD SECONDS [TARGET...]   (`make fuzz` calls it)
# Environment: FUZZ_RUNS (stop each target after that many executions too),
# FUZZ_MAX_LEN (longest input, default 4096 bytes), FUZZ_TIMEOUT (seconds per input).
# Each target keeps its growing corpus in FUZZ_BUILD/corpus/NAME (reused by
# later runs, so a long campaign can be split); seeds are gathered afresh
# into FUZZ_BUILD/seeds/NAME.  A crash, a sanitizer report, a broken promise
# (fuzz.h) or an input running longer than FUZZ_TIMEOUT seconds is saved as
# FUZZ_BUILD/crashes/NAME-<kind>-<hash>; reproduce it with
#   FUZZ_BUILD/fuzz/fuzz_HARNESS FILE
# Prints one line per target with its executions; exits 1 if any target found something.
cd "$(dirname "$0")/../.." || exit 2
build=${1:?usage: run.sh FUZZ_BUILD SECONDS [TARGET...]}
seconds=${2:?usage: run.sh FUZZ_BUILD SECONDS [TARGET...]}
shift 2
timeout=${FUZZ_TIMEOUT:-10}
max_len=${FUZZ_MAX_LEN:-4096}
# FUZZ_RUNS=N also ends each target after N executions (a long campaign's goal).
runs=""; [ -n "${FUZZ_RUNS:-}" ] && runs="-runs=$FUZZ_RUNS"
mkdir -p "$build/crashes" "$build/logs" || exit 2
found=0; ran=0
while read -r name harness seeds; do
  case "$name" in ''|'#'*) continue ;; esac
  if [ $# -gt 0 ]; then
    want=0; for t in "$@"; do [ "$t" = "$name" ] && want=1; done
    [ "$want" = 1 ] || continue
  fi
  bin="$build/fuzz/fuzz_$harness"
  if [ ! -x "$bin" ]; then echo "fuzz: $name: no harness $bin" >&2; found=1; continue; fi
  corpus="$build/corpus/$name"; seeddir="$build/seeds/$name"
  rm -rf "$seeddir"; mkdir -p "$corpus" "$seeddir"
  for s in $seeds; do
    case "$s" in
      *.py) /usr/bin/python3 "$s" "$seeddir" </dev/null >&2 || { echo "fuzz: $name: seed generator $s failed" >&2; found=1; } ;;
      *) for f in $s; do [ -f "$f" ] && cp "$f" "$seeddir/"; done ;;
    esac
  done
  dict=""; [ -f "tests/fuzz/$name.dict" ] && dict="-dict=tests/fuzz/$name.dict"
  log="$build/logs/$name.log"
  # shellcheck disable=SC2086
  "$bin" -max_total_time="$seconds" $runs -timeout="$timeout" -max_len="$max_len" \
    -rss_limit_mb=2048 -print_final_stats=1 -artifact_prefix="$build/crashes/$name-" \
    $dict "$corpus" "$seeddir" </dev/null >"$log" 2>&1
  rc=$?
  execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -n 1)
  units=$(ls "$corpus" | wc -l)
  ran=$((ran + 1))
  if [ "$rc" -ne 0 ]; then
    found=1
    echo "FUZZ $name: FOUND a problem after ${execs:-?} executions (exit $rc); log $log"
    grep -E '^(==[0-9]+==ERROR|SUMMARY|fuzz: broken promise|.*runtime error)|Test unit written to' "$log" | head -n 8 | sed 's/^/    /'
    # The input itself, so that a finding in CI (where build-fuzz/ is lost) can be rebuilt with base64 -d.
    for f in $(sed -n 's/.*Test unit written to //p' "$log"); do
      [ -f "$f" ] && echo "    input $(basename "$f") (base64): $(head -c 3000 "$f" | base64 -w 0)"
    done
  else
    took=$(sed -n 's/^Done [0-9]* runs in \([0-9]*\) second.*/\1/p' "$log" | tail -n 1)
    rate=$(sed -n 's/^stat::average_exec_per_sec: *//p' "$log" | tail -n 1)
    echo "FUZZ $name: ${execs:-?} executions in ${took:-$seconds}s (${rate:-?}/s), corpus $units inputs, nothing found"
  fi
done < tests/fuzz/SEEDS
[ "$ran" -gt 0 ] || { echo "fuzz: no target ran" >&2; exit 2; }
exit "$found"
