# bench_garnet.sh — smoke test of the benchmark's Garnet generator (tests/bench/garnet.c): same model as tests/tools/garnet.py, and bellcheck reads it.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}
GARNET="${BUILD:-$(dirname "$BELLCHECK")}/bench/garnet" # BUILD: exported by tests/run.sh (BELLCHECK may be a wrapper)

if [ ! -x "$GARNET" ]; then
  fail "bench garnet built" "$GARNET missing (make builds it with make test)"
  exit 0
fi
pass "bench garnet built"

# Garnet MDPs (Archibald, McKinnon & Thomas, J. Oper. Res. Soc. 1995): the C
# generator consumes the same splitmix64 stream as tests/tools/garnet.py and
# must write the same lines (the leading comments name the generator).
for args in "--states 7 --actions 2 --branch 3 --discount 0.9 --seed 5" \
            "--states 40 --actions 3 --branch 4 --discount 0.99 --seed 11 --objective min --denominator 997"; do
  # shellcheck disable=SC2086
  "$GARNET" $args -o "$TMP/c.bell"; rc=$?
  # shellcheck disable=SC2086
  "$PY" "$ROOT/tests/tools/garnet.py" $args -o "$TMP/py.bell"
  if [ "$rc" -eq 0 ] && [ "$(grep -v '^#' "$TMP/c.bell")" = "$(grep -v '^#' "$TMP/py.bell")" ] \
     && [ -s "$TMP/c.bell" ]; then
    pass "bench garnet matches garnet.py ($args)"
  else
    fail "bench garnet matches garnet.py ($args)" "exit $rc; $(diff "$TMP/c.bell" "$TMP/py.bell" | head -c 300)"
  fi
done

# bellcheck reads it: 7 states x 2 actions x 3 successors.
"$GARNET" --states 7 --actions 2 --branch 3 --discount 0.9 --seed 5 -o "$TMP/g.bell"
bc check "$TMP/g.bell" --json -
expect_status "bench garnet model checks" 0
"$PY" - "$out" <<'PYEOF'
import json, sys
r = json.load(open(sys.argv[1]))["model"]
ok = (r.get("states"), r.get("pairs"), r.get("transitions")) == (7, 14, 42)
print(("PASS" if ok else "FAIL") + " bench garnet model has 7 states, 14 pairs, 42 transitions" + ("" if ok else ": %r" % r))
PYEOF

# Bad arguments are refused (exit 2), nothing is written.
"$GARNET" --states 3 --actions 1 --branch 5 -o "$TMP/bad.bell" 2>"$TMP/err"; rc=$?
if [ "$rc" -eq 2 ] && [ ! -e "$TMP/bad.bell" ]; then pass "bench garnet refuses B > N"; else fail "bench garnet refuses B > N" "exit $rc"; fi
