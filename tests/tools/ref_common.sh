# ref_common.sh — shared setup of the reference tests (tests/ref/*.sh); sourced after tests/lib.sh.
# SPDX-License-Identifier: GPL-3.0-or-later
# Sets PY (the Debian python with numpy/scipy), TOOLS, MODELS, and defines
# solve_check, which runs one solve and compares it with expected values.
PY=${PY:-/usr/bin/python3}
TOOLS="$ROOT/tests/tools"
MODELS="$ROOT/models"
# A solver that never stops must fail the check, not hang the suite:
# every process of the test gets at most 600 s of CPU.
ulimit -t 600 2>/dev/null

# solve_check NAME MODEL METHOD EXPECTED TOL
#   bellcheck solve MODEL --method METHOD --json -; checks exit 0, then
#   compare_values.py checks values (to TOL), method, model summary,
#   value_initial and the value of the reported policy (see that script).
solve_check() {
  bc solve "$2" --method "$3" --json -
  expect_status "$1 exit" 0
  "$PY" "$TOOLS/compare_values.py" "$1" "$out" "$4" "$5" --method "$3" --model "$2"
}

# ref_values MODEL FILE: the reference optimum of MODEL (ref_solve.py) into FILE;
# one check, so a reference that cannot solve the model is a visible failure.
ref_values() {
  if "$PY" "$TOOLS/ref_solve.py" "$1" >"$2" 2>"$TMP/ref.err"; then
    pass "reference solves $(basename "$1")"
  else
    fail "reference solves $(basename "$1")" "$(tail -n 3 "$TMP/ref.err")"
  fi
}
