# gridworld-4.1.sh — Sutton & Barto's 4x4 gridworld (Example 4.1): V* is minus the distance to the nearest terminal corner.
# SPDX-License-Identifier: GPL-3.0-or-later
. "$(dirname "$0")/../lib.sh"
. "$ROOT/tests/tools/ref_common.sh"
model="$MODELS/sutton-barto-4.1-gridworld.bell"

# Sutton & Barto, Reinforcement Learning: An Introduction, 2nd ed. (2018),
# Example 4.1: reward -1 per move until a terminal corner, undiscounted, so the
# optimal value is minus the number of moves on a shortest path to a corner.
# Computed here by breadth-first search on the grid, without the model file.
"$PY" - "$TMP/bfs.json" <<'PYEOF'
import json, sys
from collections import deque
size, corners = 4, [(0, 0), (3, 3)]
dist = {c: 0 for c in corners}
queue = deque(corners)
while queue:
    r, c = queue.popleft()
    for dr, dc in ((1, 0), (-1, 0), (0, 1), (0, -1)):
        n = (r + dr, c + dc)
        if 0 <= n[0] < size and 0 <= n[1] < size and n not in dist:
            dist[n] = dist[(r, c)] + 1
            queue.append(n)
assert len(dist) == size * size
json.dump({"r%dc%d" % k: -d for k, d in dist.items()}, open(sys.argv[1], "w"))
PYEOF

for method in vi pi lp; do
  # Sutton & Barto (2018), Example 4.1: V*(s) = -(moves to the nearest corner), by BFS.
  solve_check "gridworld-4.1 $method" "$model" "$method" "$TMP/bfs.json" 1e-8
done
