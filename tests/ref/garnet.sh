# garnet.sh — random Garnet MDPs (10 to 2000 states): every method of bellcheck against the independent reference solver.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"

# Each line: states actions branch discount seed objective.
# Garnet MDPs: Archibald, McKinnon & Thomas, On the generation of Markov
# decision processes, J. Oper. Res. Soc. (1995); generator tests/tools/garnet.py.
cases="10 3 2 0.9 1 max
50 4 3 0.99 2 max
200 5 4 0.9 3 min
500 3 5 0.99 4 max
2000 4 5 0.9 5 max
2000 3 8 0.99 6 min"

echo "$cases" | while read -r n m b g seed obj; do
  name="garnet-n$n-m$m-b$b-g$g-seed$seed-$obj"
  model="$TMP/$name.bell"
  "$PY" "$TOOLS/garnet.py" --states "$n" --actions "$m" --branch "$b" --discount "$g" \
    --seed "$seed" --objective "$obj" -o "$model"
  # V* from the independent reference solver (tests/tools/ref_solve.py: policy
  # iteration with sparse direct solves, then a Bellman backup; common practice).
  ref_values "$model" "$TMP/ref.json"
  for method in vi pi lp; do
    # Reference solver (tests/tools/ref_solve.py; common practice), to 1e-8.
    solve_check "$name $method" "$model" "$method" "$TMP/ref.json" 1e-8
  done
done
