# usage.sh — --help, --version and bad usage: exit statuses and where the usage text goes.
# SPDX-License-Identifier: GPL-3.0-or-later
# Contract: ../shared/design/OVERVIEW.md ("--help on every command"; exit 2 = bad usage;
# messages on standard error, reports on standard output).
. "$(dirname "$0")/../lib.sh"
M="$ROOT/models/puterman-two-state.bell"

# Help asked for is the output of the run: exit 0, usage on standard output.
bc --help
expect_status "bellcheck --help exit 0" 0
expect_in "bellcheck --help prints usage" "$out" "usage: bellcheck"
expect_in "bellcheck --help lists check" "$out" "check"
expect_in "bellcheck --help lists solve" "$out" "solve"
for cmd in check solve; do
  bc "$cmd" --help
  expect_status "$cmd --help exit 0" 0
  expect_in "$cmd --help prints usage" "$out" "usage: bellcheck $cmd"
  expect_in "$cmd --help names --json" "$out" "--json"
  # --help wins over everything else on the line, even a model that does not exist.
  bc "$cmd" "$TMP/no-such-model.bell" --help
  expect_status "$cmd MODEL --help exit 0" 0
done
bc solve --help
expect_in "solve --help names --method" "$out" "--method"
expect_in "solve --help names --values-out" "$out" "--values-out"
expect_in "solve --help names --policy-out" "$out" "--policy-out"

bc --version
expect_status "--version exit 0" 0
expect_in "--version prints the version" "$out" "0.1.0"

# Bad usage: exit 2, a message on standard error, nothing on standard output.
usage_error() { # NAME FRAGMENT ARGS...
  name=$1; frag=$2; shift 2
  bc "$@"
  expect_status "$name exit 2" 2
  expect_in "$name says why" "$err" "$frag"
  if [ -s "$out" ]; then fail "$name stdout empty" "$(head -c 200 "$out")"; else pass "$name stdout empty"; fi
}
usage_error "no command" "usage"
usage_error "unknown command" "frobnicate" frobnicate "$M"
usage_error "check unknown option" "--frob" check --frob "$M"
usage_error "solve unknown option" "--frob" solve "$M" --frob
usage_error "check without MODEL" "MODEL" check
usage_error "solve without MODEL" "MODEL" solve
usage_error "check two MODELs" "MODEL" check "$M" "$M"
usage_error "solve --method without value" "--method" solve "$M" --method
usage_error "solve --method unknown" "simplex" solve "$M" --method simplex
usage_error "check --json without file" "--json" check "$M" --json
usage_error "solve --values-out without file" "--values-out" solve "$M" --values-out
usage_error "solve --tol not a number" "abc" solve "$M" --tol abc
usage_error "solve --tol negative" "-1" solve "$M" --tol -1
usage_error "solve --max-iter not an integer" "2.5" solve "$M" --max-iter 2.5
usage_error "solve --show negative" "-3" solve "$M" --show -3

# A model file that does not exist is bad input: exit 2, the message names the file.
bc check "$TMP/no-such-model.bell"
expect_status "missing model file exit 2" 2
expect_in "missing model file named" "$err" "no-such-model.bell"

# A bad value of an option every command shares is reported under the command's name.
bc solve "$ROOT/models/puterman-two-state.bell" --threads 0
expect_status "--threads 0: exit 2" 2
expect_in "--threads 0: names the command" "$err" "bellcheck solve: --threads expects an integer in [1, 1024], got '0'"
bc check "$ROOT/models/puterman-two-state.bell" --max-memory 12X
expect_in "--max-memory 12X: names the command" "$err" "bellcheck check: --max-memory expects"
