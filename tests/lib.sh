# lib.sh — helpers for command-line tests: run bellcheck, check status and output.
# SPDX-License-Identifier: GPL-3.0-or-later
# Each check prints one line "PASS name" or "FAIL name: why".
: "${BELLCHECK:?BELLCHECK must name the binary}"
ROOT=$(cd "$(dirname "$0")/../.." && pwd)
TMP=$(mktemp -d "${TMPDIR:-/tmp}/bc-cli.XXXXXX")
trap 'rm -rf "$TMP"' EXIT

# bc ARGS...: runs bellcheck; sets $status, $out (stdout file), $err (stderr file).
bc() {
  out="$TMP/stdout"; err="$TMP/stderr"
  "$BELLCHECK" "$@" >"$out" 2>"$err"; status=$?
}
pass() { echo "PASS $1"; }
fail() { echo "FAIL $1: $2"; }
# expect_status NAME CODE
expect_status() {
  if [ "$status" -eq "$2" ]; then pass "$1"; else fail "$1" "exit $status, expected $2; stderr: $(head -c 300 "$err")"; fi
}
# expect_in NAME FILE TEXT: FILE contains TEXT (fixed string)
expect_in() {
  if grep -qF -- "$3" "$2"; then pass "$1"; else fail "$1" "'$3' not in $(basename "$2"): $(head -c 300 "$2")"; fi
}
# expect_not_in NAME FILE TEXT
expect_not_in() {
  if grep -qF -- "$3" "$2"; then fail "$1" "'$3' unexpectedly in $(basename "$2")"; else pass "$1"; fi
}
