# library_example.sh — compiles the example program of docs/library.md against the built library and runs it.
# SPDX-License-Identifier: GPL-3.0-or-later
# The library is $BUILD/libbellcheck.a (tests/run.sh exports BUILD), linked
# with $BC_LIBS (the Makefile exports its LIBS); a library built with
# sanitizers needs the same flags at link time: BC_SANITIZE_FLAGS.
. "$(dirname "$0")/../lib.sh"
sed -n '/^```c$/,/^```$/p' "$ROOT/docs/library.md" | sed '1d;$d' | sed 's|<bellcheck.h>|"bellcheck.h"|' > "$TMP/example.c"
# shellcheck disable=SC2086
if cc -std=c11 ${BC_SANITIZE_FLAGS:-} -I"$ROOT/src" -I/usr/include/suitesparse -o "$TMP/example" "$TMP/example.c" \
     "${BUILD:-$ROOT/build}/libbellcheck.a" ${BC_LIBS:--lglpk -lumfpack -lamd -lcjson -lnettle -lflint -lgmp -lm -fopenmp} 2>"$TMP/cc.err"; then
  pass "library example compiles"
else
  fail "library example compiles" "$(head -c 400 "$TMP/cc.err")"
fi
# Puterman, Markov Decision Processes (1994), two-state example, discount 0.95:
# v*(s1) = -60/7 (from memory); the initial distribution of the bundled file decides value_initial.
"$TMP/example" "$ROOT/models/puterman-two-state.bell" > "$TMP/ex.out" 2>&1
expect_in "library example solves a model" "$TMP/ex.out" "V*(initial) ="
# Uniform initial distribution over s1, s2 (the format's default): (-60/7 - 20) / 2 = -100/7.
expect_in "library example value is -100/7" "$TMP/ex.out" "V*(initial) = -14.2857142857"
# The link line the document gives must name every library the Makefile links (LIBS).
doc_line=$(tr '\n' ' ' < "$ROOT/docs/library.md" | grep -o '`-lbellcheck[^`]*`' | head -n 1)
missing=""
for lib in ${BC_LIBS:--lglpk -lumfpack -lamd -lcjson -lnettle -lflint -lgmp -lm -fopenmp}; do
  case "$lib" in -l*|-fopenmp) case " $doc_line " in *" $lib "*|*" $lib\`"*) ;; *) missing="$missing $lib" ;; esac ;; esac
done
if [ -n "$doc_line" ] && [ -z "$missing" ]; then pass "library.md's link line names every library"
else fail "library.md's link line names every library" "missing:$missing (doc: $doc_line)"; fi
# Every public function of bellcheck.h is named in docs/library.md (so the document stays true).
if res=$("$PY" "$ROOT/tests/tools/library_names.py" "$ROOT/src/bellcheck.h" "$ROOT/docs/library.md" 2>&1); then
  pass "library.md names every public function"
else fail "library.md names every public function" "missing: $res"; fi
