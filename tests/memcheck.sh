#!/bin/sh
# memcheck.sh — runs the whole test suite under a memory checker and fails on any report it makes.
# SPDX-License-Identifier: GPL-3.0-or-later
# Usage: tests/memcheck.sh sanitize BUILD "FLAGS"   (`make test-sanitize`)
#        tests/memcheck.sh valgrind BUILD           (`make test-valgrind`)
# sanitize: BUILD holds a bellcheck and unit tests built with FLAGS
#   (AddressSanitizer + UndefinedBehaviorSanitizer, no recovery); FLAGS is
#   passed on as BC_SANITIZE_FLAGS for tests that compile against the library.
# valgrind: every bellcheck run of the command-line and reference tests goes
#   through memcheck (a BELLCHECK wrapper); unit tests run natively.  The
#   pools libgomp and FLINT keep until exit are suppressed (tests/valgrind.supp).
#   valgrind computes with round-to-nearest whatever rounding mode is set, so
#   checks of interval enclosures can fail under it without a memory error.
# Reports are written to files, never mixed into the output the tests check:
# any report file that is not empty is a failure, even if every test passed
# (a test expecting exit 1 would not notice a checker's exit status).
cd "$(dirname "$0")/.." || exit 2
mode=${1:?usage: memcheck.sh sanitize|valgrind BUILD [FLAGS]}
build=${2:?usage: memcheck.sh sanitize|valgrind BUILD [FLAGS]}
case $build in /*) ;; *) build=$PWD/$build ;; esac
logs=$(mktemp -d "${TMPDIR:-/tmp}/bc-memcheck.XXXXXX") || exit 2
trap 'rm -rf "$logs"' EXIT
trap 'exit 130' INT TERM # so that the EXIT trap cleans up after an interrupted run too
start=$(date +%s)
case $mode in
  sanitize)
    export BC_SANITIZE_FLAGS="${3:?usage: memcheck.sh sanitize BUILD FLAGS}"
    export ASAN_OPTIONS="log_path=$logs/asan:detect_leaks=1:abort_on_error=0:exitcode=86"
    export UBSAN_OPTIONS="log_path=$logs/ubsan:print_stacktrace=1:halt_on_error=1:exitcode=86"
    export LSAN_OPTIONS="log_path=$logs/lsan"
    BUILD=$build tests/run.sh; rc=$? ;;
  valgrind)
    command -v valgrind >/dev/null || { echo "memcheck: valgrind is not installed" >&2; exit 2; }
    real=$build/bellcheck
    [ -x "$real" ] || { echo "memcheck: no $real" >&2; exit 2; }
    cat >"$logs/bellcheck" <<WRAP
#!/bin/sh
exec valgrind -q --error-exitcode=99 --leak-check=full --track-origins=yes \\
  --suppressions="$PWD/tests/valgrind.supp" --log-file="$logs/vg.%p" "$real" "\$@"
WRAP
    chmod +x "$logs/bellcheck"
    BELLCHECK=$logs/bellcheck BUILD=$build tests/run.sh; rc=$? ;;
  *) echo "memcheck: unknown mode '$mode'" >&2; exit 2 ;;
esac
reports=0
for f in "$logs"/asan* "$logs"/ubsan* "$logs"/lsan* "$logs"/vg.*; do
  [ -s "$f" ] || continue
  reports=$((reports + 1))
  echo "---- $mode report $(basename "$f"):"
  head -n 40 "$f"
done
echo "memcheck ($mode): $reports report(s), tests exit $rc, $(( $(date +%s) - start )) s"
[ "$rc" -eq 0 ] && [ "$reports" -eq 0 ]
