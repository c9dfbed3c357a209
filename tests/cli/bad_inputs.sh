# bad_inputs.sh — runs bellcheck on every file of tests/bad/ (`check FILE` unless EXPECT says otherwise) and compares with tests/bad/EXPECT.
# SPDX-License-Identifier: GPL-3.0-or-later
# One PASS/FAIL line per file (exit status and message checked together), plus
# one check that EXPECT and the directory list the same files.  The expected
# positions and words come from the format spec (../shared/design/model-format.md,
# "Errors": file, line and column, what was expected and what was found).
. "$(dirname "$0")/../lib.sh"
BAD="$ROOT/tests/bad"
EXPECT="$BAD/EXPECT"

# has_line FILE PARTS: some line of FILE holds every "|"-separated part (case-insensitive).
has_line() {
  awk -v parts="$2" 'BEGIN { n = split(tolower(parts), p, "|") }
    { l = tolower($0); ok = 1
      for (i = 1; i <= n; i++) if (index(l, p[i]) == 0) { ok = 0; break }
      if (ok) { found = 1; exit } }
    END { exit found ? 0 : 1 }' "$1"
}

rows="$TMP/rows"
grep -v '^#' "$EXPECT" | grep -v '^[[:space:]]*$' >"$rows"
cd "$BAD" || exit 2
while IFS="$(printf '\t')" read -r file want frag args; do
  name="bad $file"
  if [ ! -f "$file" ]; then fail "$name" "no such file in tests/bad"; continue; fi
  # The optional fourth column is the command line, {} standing for the file.
  [ -n "$args" ] || args='check {}'
  # shellcheck disable=SC2046
  bc $(printf '%s\n' "$args" | sed "s|{}|$file|g")
  if [ "$status" -ne "$want" ]; then
    fail "$name" "exit $status, expected $want; stderr: $(head -c 300 "$err")"; continue
  fi
  where="$err"
  if [ "$want" -eq 0 ]; then cat "$out" "$err" >"$TMP/both"; where="$TMP/both"; fi
  if has_line "$where" "$frag"; then pass "$name"
  else fail "$name" "no line with '$frag' in: $(head -c 400 "$where" | tr '\n' '~')"; fi
done <"$rows"

# Every row names a file and every file has a row.
cut -f1 "$rows" | sort >"$TMP/listed"
ls -1 | grep -v '^EXPECT$' | sort >"$TMP/present"
if cmp -s "$TMP/listed" "$TMP/present"; then pass "bad EXPECT lists exactly the files"
else fail "bad EXPECT lists exactly the files" "$(diff "$TMP/listed" "$TMP/present" | grep '^[<>]' | tr '\n' ' ')"; fi
n=$(wc -l <"$rows")
if [ "$n" -ge 60 ]; then pass "bad corpus has >= 60 files ($n)"; else fail "bad corpus has >= 60 files" "$n rows"; fi
