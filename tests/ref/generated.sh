# generated.sh — the generated textbook models in models/ are exactly what their generator scripts write.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"

# Source of these files: tests/tools/gen_gridworlds.py and tests/tools/gen_gambler.py
# (Sutton & Barto 2018, Examples 3.5, 4.1 and 4.3); a hand edit must be a failure.
"$PY" "$TOOLS/gen_gridworlds.py" "$TMP"
"$PY" "$TOOLS/gen_gambler.py" "$TMP/sutton-barto-4.3-gambler.bell"
for f in sutton-barto-3.5-gridworld sutton-barto-4.1-gridworld sutton-barto-4.3-gambler; do
  if cmp -s "$TMP/$f.bell" "$MODELS/$f.bell"; then pass "$f.bell is generated"
  else fail "$f.bell is generated" "differs from a fresh run of its generator"; fi
done


# The invented demo agent (tests/tools/gen_demo_drone.py, seeded): model and Q-table.
"$PY" "$TOOLS/gen_demo_drone.py" "$TMP/demo-yard-drone.bell" "$TMP/demo-yard-drone-q.csv"
for f in demo-yard-drone.bell demo-yard-drone-q.csv; do
  if cmp -s "$TMP/$f" "$MODELS/$f"; then pass "$f is generated"
  else fail "$f is generated" "differs from a fresh run of its generator"; fi
done
