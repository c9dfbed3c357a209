# library_example.sh — compiles the example program of docs/library.md against the built library and runs it.
. "$(dirname "$0")/../lib.sh"
sed -n '/^```c$/,/^```$/p' "$ROOT/docs/library.md" | sed '1d;$d' | sed 's|<bellcheck.h>|"bellcheck.h"|' > "$TMP/example.c"
if cc -std=c11 -I"$ROOT/src" -I/usr/include/suitesparse -o "$TMP/example" "$TMP/example.c" \
     "$ROOT/build/libbellcheck.a" -lglpk -lumfpack -lamd -lcjson -lgmp -lm 2>"$TMP/cc.err"; then
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
