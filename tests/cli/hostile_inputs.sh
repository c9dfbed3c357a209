# hostile_inputs.sh — inputs that are not plain files or lie about themselves (directories, unreadable files, standard input, huge numbers and lines, NPY headers that lie), --max-memory, Ctrl-C.
# SPDX-License-Identifier: GPL-3.0-or-later
# Companion of tests/bad/ (whose files are fixed); these cases need a special
# path, a pipe, or a file too large to commit.  Expected statuses and words
# come from docs/limits.md and docs/format-agents.md, written before running.
. "$(dirname "$0")/../lib.sh"
MODEL="$ROOT/models/puterman-two-state.bell" # states s1 s2; pairs s1:a11 a12, s2:a21

# ---- not a file ---------------------------------------------------------
mkdir "$TMP/dir"
bc check "$TMP/dir"
expect_status "a directory as the model: exit 2" 2
expect_in "a directory as the model: says so" "$err" "is a directory"
bc score "$MODEL" --q "$TMP/dir"
expect_status "a directory as the Q-table: exit 2" 2
expect_in "a directory as the Q-table: says so" "$err" "is a directory"
bc check "$TMP/no-such-file.bell"
expect_status "a missing file: exit 2" 2
expect_in "a missing file: cannot open" "$err" "no-such-file.bell: error: cannot open"

# A file that opens but cannot be read: /proc/self/mem fails with EIO at offset 0.
if [ -r /proc/self/mem ]; then
  bc check /proc/self/mem
  expect_status "a read error: exit 2" 2
  expect_in "a read error: cannot read" "$err" "/proc/self/mem: error: cannot read"
fi

# An unreadable file.  Root reads through any mode bits, so as root the
# command runs as the unprivileged user 65534 (setpriv); the check is left
# out (no PASS, no FAIL) only when that user cannot run the binary.
mkdir "$TMP/locked" && chmod 755 "$TMP" "$TMP/locked"
cp "$MODEL" "$TMP/locked/secret.bell" && chmod 000 "$TMP/locked/secret.bell"
as_user=""
if [ "$(id -u)" = 0 ]; then
  if command -v setpriv >/dev/null && setpriv --reuid=65534 --regid=65534 --clear-groups test -x "$BELLCHECK"; then
    as_user="setpriv --reuid=65534 --regid=65534 --clear-groups"
  else
    as_user=none
  fi
fi
if [ "$as_user" != none ]; then
  $as_user "$BELLCHECK" check "$TMP/locked/secret.bell" >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
  err="$TMP/stderr"
  expect_status "an unreadable file: exit 2" 2
  expect_in "an unreadable file: permission denied" "$err" "secret.bell: error: cannot open: Permission denied"
else
  echo "NOTE unreadable-file check left out: running as root and user 65534 cannot run $BELLCHECK"
fi
chmod 700 "$TMP"

# ---- standard input -------------------------------------------------------
"$BELLCHECK" check - <"$MODEL" >"$TMP/stdout" 2>"$TMP/stderr"; status=$?; out="$TMP/stdout"
expect_status "a model on standard input: exit 0" 0
expect_in "a model on standard input: named <stdin>" "$out" "<stdin>"
printf '{"format": "bell-json", "version": 1, "discount": "1/2",\r\n "transitions": [{"state": "a", "action": "go", "reward": "1", "next": [["a"]]}]}' |
  "$BELLCHECK" check - >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "a JSON model (CRLF, no final newline) on standard input: exit 0" 0
: | "$BELLCHECK" check - >"$TMP/stdout" 2>"$TMP/stderr"; status=$?; err="$TMP/stderr"
expect_status "empty standard input: exit 2" 2
expect_in "empty standard input: says empty" "$err" "<stdin>: error: the file is empty"
printf 'bell 1\ndiscount 0.9\na go 1 -> a\000\n' | "$BELLCHECK" check - >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "a NUL byte on standard input: exit 2" 2
expect_in "a NUL byte on standard input: position" "$err" "<stdin>:3:12: error:"
printf 'state,action\r\ns1,a11\r\ns2,a21' | "$BELLCHECK" score "$MODEL" --policy - >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "a CSV policy (CRLF, no final newline) on standard input: exit 0" 0

# ---- numbers and lines beyond the limits (docs/limits.md) -----------------
digits=$(head -c 1000000 /dev/zero | tr '\0' '7')
printf 'bell 1\ndiscount 0.9\na go %s -> a\n' "$digits" >"$TMP/million.bell"
bc check "$TMP/million.bell"
expect_status "a number of a million digits: exit 2" 2
expect_in "a number of a million digits: refused by its length" "$err" "million.bell:3:6: error:"
expect_in "a number of a million digits: says digits" "$err" "4096 digits"
printf 'bell 1\ndiscount 0.9\na go 1e%s -> a\n' "$digits" >"$TMP/exp.bell"
bc check "$TMP/exp.bell"
expect_status "an exponent of a million digits: exit 2" 2
expect_in "an exponent of a million digits: says exponent" "$err" "exponent out of range"
printf '{"format": "bell-json", "version": 1, "discount": "0.9", "transitions": [{"state": "a", "action": "go", "reward": "%s", "next": [["a"]]}]}' "$digits" >"$TMP/million.json"
bc check "$TMP/million.json"
expect_status "a JSON string number of a million digits: exit 2" 2
expect_in "a JSON string number of a million digits: says digits" "$err" "4096 digits"

# One line of 20000 successors (about 250 KB) is valid: lines have no length limit.
awk 'BEGIN { printf "bell 1\ndiscount 0.9\nstates"; for (i = 0; i < 20000; i++) printf " s%d", i;
  printf "\ns0 go 0 ->"; for (i = 0; i < 20000; i++) printf " s%d 1/20000", i; printf "\n";
  for (i = 1; i < 20000; i++) printf "s%d go 1 -> s0\n", i }' >"$TMP/wide.bell"
bc check "$TMP/wide.bell" --quiet
expect_status "a line of 20000 successors is accepted" 0

# ---- NPY headers that lie (numpy.lib.format layout, bytes written by hand) --
# npy FILE HEADER DATA_BYTES: version 1.0, header padded with blanks to a 16-byte multiple.
npy() {
  h="$2"; while [ $(( (10 + ${#h} + 1) % 16 )) -ne 0 ]; do h="$h "; done; h="$h
"
  n=${#h}
  { printf '\223NUMPY\001\000'; printf "\\$(printf %03o $((n % 256)))\\$(printf %03o $((n / 256)))"
    printf '%s' "$h"; head -c "$3" /dev/zero; } >"$1"
}
npy "$TMP/short.npy" "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }" 40
bc score "$MODEL" --q "$TMP/short.npy"
expect_status "NPY data shorter than the shape: exit 2" 2
expect_in "NPY data shorter than the shape: truncated, 48 needed, 40 held" "$err" "needs 48 bytes of data, the file holds 40"
npy "$TMP/long.npy" "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }" 56
bc score "$MODEL" --q "$TMP/long.npy"
expect_status "NPY data longer than the shape: exit 2" 2
expect_in "NPY data longer than the shape: refused" "$err" "the header does not describe the data"
npy "$TMP/huge.npy" "{'descr': '<f8', 'fortran_order': False, 'shape': (4294967296, 4294967296), }" 48
bc score "$MODEL" --q "$TMP/huge.npy"
expect_status "NPY shape overflowing the address space: exit 2" 2
expect_in "NPY shape overflowing the address space: too large" "$err" "too large for this machine"
printf '\223NUMPY\001\000\377\177{}' >"$TMP/hlen.npy"
bc score "$MODEL" --q "$TMP/hlen.npy"
expect_status "NPY header length past the end: exit 2" 2
expect_in "NPY header length past the end: says so" "$err" "runs past the end of the file"
npy "$TMP/pol.npy" "{'descr': '<i8', 'fortran_order': False, 'shape': (3,), }" 24
bc score "$MODEL" --policy "$TMP/pol.npy"
expect_status "NPY policy of the wrong shape: exit 2" 2
expect_in "NPY policy of the wrong shape: expected against found" "$err" "expected (2,)"

# ---- --max-memory ---------------------------------------------------------
big="$ROOT/models/sutton-barto-4.3-gambler.bell" # about 85 KB
bc check "$big" --max-memory 64K
expect_status "--max-memory below the file size: exit 2" 2
expect_in "--max-memory below the file size: names the limit" "$err" "more than the memory limit of 64.0 KiB (--max-memory)"
bc check "$big" --max-memory 1M --quiet
expect_status "--max-memory above the file size: exit 0" 0
"$BELLCHECK" check - --max-memory 64K <"$big" >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "--max-memory on a pipe: exit 2" 2
expect_in "--max-memory on a pipe: names the limit" "$err" "memory limit"
# 37 bytes of table and 8000 blank lines, plus the final NUL the reader adds: 8038 bytes = 7.8496 KiB, printed 7.8 KiB
{ printf 'state,a11,a12,a21\ns1,1.5,2,\ns2,,,-20\n'; head -c 8000 /dev/zero | tr '\0' '\n'; } >"$TMP/padded.csv"
# The boundary: a reading holds the file and one byte more (a final NUL).
size=$(wc -c <"$MODEL")
cat "$MODEL" | "$BELLCHECK" check - --max-memory $((size + 1)) --quiet >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "--max-memory of the size + 1 on a pipe: accepted" 0
cat "$MODEL" | "$BELLCHECK" check - --max-memory "$size" --quiet >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "--max-memory of the size on a pipe: refused" 2
bc check "$MODEL" --max-memory "$size"
expect_status "--max-memory of the size on a file: refused" 2
expect_in "--max-memory of the size on a file: needs size + 1" "$err" "needs $((size + 1)) bytes, more than the memory limit of $size bytes"
bc score "$MODEL" --q "$TMP/padded.csv" --max-memory 4K
expect_status "--max-memory refuses an agent file over the limit: exit 2" 2
expect_in "--max-memory refuses an agent file over the limit: names it" "$err" "padded.csv: error: holding the file needs 7.8 KiB"
for bad in 0 -5 12X 1.5M "" 99999999999T; do
  bc check "$MODEL" --max-memory "$bad"
  expect_status "--max-memory '$bad' is a usage error" 2
  expect_in "--max-memory '$bad' says what it expects" "$err" "--max-memory expects a positive number of bytes"
done
for cmd in check solve score; do
  bc "$cmd" --help
  expect_in "$cmd --help lists --max-memory" "$out" "--max-memory BYTES"
done

# ---- --max-memory beyond reading: the grid builder, the builder, the exact solver ----
# The estimates are those of docs/limits.md, worked out by hand here.
# crater-rover on 2x2 cells: 4 cells and `stop` (17 bytes each), 4 x 3 pairs with one
# successor each (24 + 12 bytes), 16 sample points (24 bytes each): 85 + 432 + 384 = 901 bytes.
task="$ROOT/models/crater-rover.task"
bc grid "$task" --cells 2x2 --max-memory 900 -o "$TMP/g.bell"
expect_status "--max-memory one byte below a grid model's estimate: exit 2" 2
expect_in "--max-memory refuses a grid model: says the estimate" "$err" "the grid model of 2x2 cells (4 cells x 3 actions, counting one successor each) needs 901 bytes, more than the memory limit of 900 bytes (--max-memory)"
if [ -e "$TMP/g.bell" ]; then fail "--max-memory refuses a grid model: no output" "g.bell written"; else pass "--max-memory refuses a grid model: no output"; fi
bc grid "$task" --cells 2x2 --max-memory 901 -o "$TMP/g.bell"
expect_status "--max-memory at a grid model's estimate: exit 0" 0
# 4096x4096 cells: 16777217 states, 50331648 pairs: 2097152401 bytes = 1.95 GiB, refused at once.
bc grid "$task" --cells 4096x4096 --max-memory 100M -o "$TMP/g.bell"
expect_status "--max-memory refuses a 4096x4096 grid before building it: exit 2" 2
expect_in "--max-memory refuses a 4096x4096 grid: 2.0 GiB" "$err" "needs 2.0 GiB, more than the memory limit of 100.0 MiB"
# A model whose file fits the limit but whose arrays do not: Garnet 20000 x 4 x 5 (a 7.5 MB
# file; 80000 pairs and 400000 transitions need at least 17 x 20000 + 24 x 80000 + 12 x 400000
# bytes = 6.7 MiB, and the builder refuses when its arrays would double past 8 MiB).
"$BUILD/bench/garnet" --states 20000 --actions 4 --branch 5 --discount 0.99 --seed 1 -o "$TMP/g20k.bell"
bc check "$TMP/g20k.bell" --max-memory 8M --quiet
expect_status "--max-memory below the built model's arrays: exit 2" 2
expect_in "--max-memory below the built model's arrays: the builder says so" "$err" "growing the model to"
expect_in "--max-memory below the built model's arrays: names the option" "$err" "more than the memory limit of 8.0 MiB (--max-memory)"
bc check "$TMP/g20k.bell" --max-memory 20M --quiet
expect_status "--max-memory above the built model's arrays: exit 0" 0
# Exact evaluation of Garnet 300 x 4 x 5 (auto: the sparse factor outgrows its budget, then
# dense lifting): 300 x 300 entries x 16 bytes = 1440000 bytes = 1.4 MiB.
"$BUILD/bench/garnet" --states 300 --actions 4 --branch 5 --discount 0.99 --seed 1 -o "$TMP/g300.bell"
bc solve "$TMP/g300.bell" --proof exact --max-memory 1M --show 0 --json "$TMP/g300.json"
expect_status "--max-memory refuses dense exact evaluation: exit 3" 3
expect_in "--max-memory refuses dense exact evaluation: says why" "$err" "exact evaluation by dense lifting (300 equations, 90000 matrix entries) needs 1.4 MiB, more than the memory limit of 1.0 MiB (--max-memory)"
if [ -e "$TMP/g300.json" ]; then fail "--max-memory refuses dense exact evaluation: no output" "json written"; else pass "--max-memory refuses dense exact evaluation: no output"; fi
bc solve "$TMP/g300.bell" --proof exact --max-memory 2M --show 0
expect_status "--max-memory above dense exact evaluation: exit 0" 0

# ---- Ctrl-C during a long solve (SIGINT): the best proven bound, exit 130, no output ----
# tests/tools/interrupt.py runs the command with SIGINT at its default and sends the signal
# once it has used 1 s of CPU time, when it is surely solving (reading these models takes a
# few hundredths of a second); a command still running two minutes later is killed (201).
interrupt() { # interrupt DIR ARGS...: runs bellcheck ARGS in DIR, Ctrl-C after 1 s of CPU
  dir=$1; shift
  (cd "$dir" && "$PY" "$ROOT/tests/tools/interrupt.py" cpu "$BELLCHECK" "$@"); status=$?
  out="$TMP/stdout"; err="$TMP/stderr"
}
expect_run_empty() { # NAME: the command left nothing in $TMP/run, not even a temporary file
  if [ -z "$(ls -A "$TMP/run")" ]; then pass "$1"; else fail "$1" "$(ls -A "$TMP/run")"; fi
}
# A 100 x 100 grid world at discount 0.9999 (tests/bench/gridworld): value iteration needs far
# more than a minute for a bound of 1e-12, so the signal always comes during the solve.
"$BUILD/bench/gridworld" --width 100 --height 100 --discount 0.9999 -o "$TMP/slow.bell"
mkdir "$TMP/run"
interrupt "$TMP/run" solve ../slow.bell --method vi --tol 1e-12 --json out.json --values-out v.csv --policy-out p.csv
expect_status "Ctrl-C during value iteration: exit 130" 130
expect_in "Ctrl-C during value iteration: says so" "$err" "bellcheck solve: interrupted (Ctrl-C) during vi after"
expect_in "Ctrl-C during value iteration: the best proven bound" "$err" "the best bound proven so far is max |V - V*| <="
expect_in "Ctrl-C during value iteration: no output" "$err" "no output file was written"
expect_run_empty "Ctrl-C during value iteration: no file, not even a temporary one"
interrupt "$TMP/run" solve ../slow.bell --method pi --tol 1e-12 --json out.json
expect_status "Ctrl-C during policy iteration: exit 130" 130
expect_in "Ctrl-C during policy iteration: the best proven bound" "$err" "during pi after"
expect_run_empty "Ctrl-C during policy iteration: no file"
# refine: a 512x512 grid of the crater rover takes seconds to build (2.4 million transitions);
# two episodes keep grid 1's simulation (itself interruptible, below) far under the 1 s of CPU.
interrupt "$TMP/run" refine "$task" --cells 8x8,512x512 --episodes 2 --json out.json
expect_status "Ctrl-C during refine: exit 130" 130
expect_in "Ctrl-C during refine: names the grid" "$err" "bellcheck refine: interrupted (Ctrl-C) during grid 2 of the study"
expect_run_empty "Ctrl-C during refine: no file"

# ---- tasks and certificates: odd but valid, and empty -------------------------
printf '\357\273\277task 1\r\ndiscount\t0.9\r\nstate x 0 1\r\naction\tu = {a: 1}\r\nnext x =\tx\r\nreward 1\r\ninitial x = 0' |
  "$BELLCHECK" check - --cells 4 >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "a task (BOM, CRLF, tabs, no final newline) on standard input: exit 0" 0
printf '  \n# only a comment\n' >"$TMP/blank.task"
bc check "$TMP/blank.task" --cells 4
expect_status "a task of blanks and comments: exit 2" 2
expect_in "a task of blanks and comments: empty, no line" "$err" "blank.task: error: the file is empty: expected a task"
"$BELLCHECK" certify "$MODEL" --proof exact -o "$TMP/pt.cert" >"$TMP/stdout" 2>"$TMP/stderr"
tr -d '\n' <"$TMP/pt.cert" | "$BELLCHECK" verify "$MODEL" - >"$TMP/stdout" 2>"$TMP/stderr"; status=$?
expect_status "a certificate on one line (no final newline) on standard input: holds" 0
: | "$BELLCHECK" verify "$MODEL" - >"$TMP/stdout" 2>"$TMP/stderr"; status=$?; err="$TMP/stderr"
expect_status "an empty certificate on standard input: exit 2" 2
expect_in "an empty certificate on standard input: says empty" "$err" "<stdin>: error: the file is empty: expected a certificate"
# certify: the crater rover on 64x64 cells solves in a fraction of a second, then its exact
# proof (discount 1) takes far longer; Ctrl-C comes during the proof.
interrupt "$TMP/run" certify "$task" --cells 64x64 -o cert.json --json report.json
expect_status "Ctrl-C during certify's proof: exit 130" 130
expect_in "Ctrl-C during certify's proof: after the solve, with its bound" "$err" "bellcheck certify: interrupted (Ctrl-C) during the work after the solve"
expect_in "Ctrl-C during certify's proof: no certificate" "$err" "no output file was written"
expect_run_empty "Ctrl-C during certify: no file"
# grid: building the 512x512 model takes seconds; Ctrl-C stops it between cells.
interrupt "$TMP/run" grid "$task" --cells 512x512 -o g.bell --json g.json
expect_status "Ctrl-C during grid: exit 130" 130
expect_in "Ctrl-C during grid: the builder stopped" "$err" "stopped on request while building the grid model"
expect_in "Ctrl-C during grid: says so" "$err" "bellcheck grid: interrupted (Ctrl-C) during the construction of the model; no output file was written"
expect_run_empty "Ctrl-C during grid: no file"
# rollout: 10^8 episodes of the hand walk (five steps each) take minutes on two threads; every
# thread stops before its next episode.
printf 'state,action\n' >"$TMP/walk.csv"
for c in 0 1 2 3 4 5 6 7 8 9; do printf 'c%s,step\n' "$c" >>"$TMP/walk.csv"; done
interrupt "$TMP/run" rollout "$ROOT/tests/tasks/hand-walk.task" --cells 10 --policy ../walk.csv \
  --episodes 100000000 --threads 2 --json out.json
expect_status "Ctrl-C during rollout: exit 130" 130
expect_in "Ctrl-C during rollout: says so" "$err" "bellcheck rollout: interrupted (Ctrl-C) during the simulation after"
expect_in "Ctrl-C during rollout: how many episodes ran" "$err" " of 100000000 episodes; no output file was written"
expect_not_in "Ctrl-C during rollout: no report" "$out" "mean return"
expect_run_empty "Ctrl-C during rollout: no file, not even a temporary one"
# refine simulates each grid's policy the same way: 10^8 episodes of the reservoir.
interrupt "$TMP/run" refine "$ROOT/models/reservoir-release.task" --cells 10x5,20x10 --episodes 100000000 --json out.json
expect_status "Ctrl-C during refine's simulation: exit 130" 130
expect_in "Ctrl-C during refine's simulation: names it" "$err" "bellcheck refine: interrupted (Ctrl-C) during grid 1 of the study (simulation: stopped on request after"
expect_run_empty "Ctrl-C during refine's simulation: no file"
# Reading: a .bell model that never ends, from a named pipe (tests/tools/endless_bell.py);
# the reader looks at the request before every read, and only a stop request ends it.
mkfifo "$TMP/endless.bell"
for cmd in check solve; do
  "$PY" "$ROOT/tests/tools/endless_bell.py" >"$TMP/endless.bell" & gen=$!
  interrupt "$TMP/run" "$cmd" ../endless.bell --json out.json
  kill "$gen" 2>/dev/null; wait "$gen" # it has ended already, unless $cmd never opened the pipe
  expect_status "Ctrl-C while $cmd reads a model: exit 130" 130
  expect_in "Ctrl-C while $cmd reads a model: the reader stopped" "$err" "../endless.bell: error: stopped on request while reading the model ("
  expect_in "Ctrl-C while $cmd reads a model: says so" "$err" "bellcheck $cmd: interrupted (Ctrl-C) during the construction of the model"
  expect_run_empty "Ctrl-C while $cmd reads a model: no file"
done
# A wait on standard input that sends nothing (an agent, a certificate or a task given as `-`
# from a terminal or a silent pipe) ends on Ctrl-C too; interrupt.py sends the signal once
# the process is blocked reading the pipe.
interrupt_idle() { # interrupt_idle DIR ARGS...: bellcheck ARGS in DIR, stdin a silent pipe
  mkdir -p "$1"; rm -rf "${1:?}"/*; dir=$1; shift
  (cd "$dir" && "$PY" "$ROOT/tests/tools/interrupt.py" pipe "$BELLCHECK" "$@"); status=$?
  out="$TMP/stdout"; err="$TMP/stderr"
}
idle_checks() { # idle_checks COMMAND: the checks of one interrupted wait
  expect_status "Ctrl-C while $1 waits on standard input: exit 130" 130
  expect_in "Ctrl-C while $1 waits on standard input: the reading stopped" "$err" "<stdin>: error: stopped on request while reading"
  expect_in "Ctrl-C while $1 waits on standard input: says so" "$err" "bellcheck $1: interrupted (Ctrl-C) during"
  expect_run_empty "Ctrl-C while $1 waits on standard input: no file"
}
interrupt_idle "$TMP/run" score "$ROOT/models/puterman-two-state.bell" --q - --json out.json
idle_checks score
interrupt_idle "$TMP/run" verify "$ROOT/models/puterman-two-state.bell" - --json out.json
idle_checks verify
interrupt_idle "$TMP/run" rollout "$ROOT/tests/tasks/hand-walk.task" --cells 10 --policy - --json out.json
idle_checks rollout
# verify: the exact check of tests/tools/wide_exact_model.py (1000 states and a terminal
# one, 300 successors, rewards with 50-digit denominators) sums fractions of thousands of
# digits for seconds, while reading the model and the certificate takes hundredths of a second.
"$PY" "$ROOT/tests/tools/wide_exact_model.py" 1000 300 50 1 >"$TMP/wide.bell"
"$BELLCHECK" certify "$TMP/wide.bell" --proof exact -o "$TMP/wide.cert" --quiet 2>"$TMP/stderr"
expect_in "the wide model's certificate is exact" "$TMP/wide.cert" '"kind": "exact"'
interrupt "$TMP/run" verify ../wide.bell ../wide.cert --json out.json
expect_status "Ctrl-C during verify: exit 130" 130
expect_in "Ctrl-C during verify: during the exact check" "$err" "bellcheck verify: interrupted (Ctrl-C) during the check of the certificate (stopped on request after "
expect_in "Ctrl-C during verify: part-way through the states" "$err" " of 1001 states); no output file was written"
expect_not_in "Ctrl-C during verify: no verdict" "$out" "HOLDS"
expect_run_empty "Ctrl-C during verify: no file"
