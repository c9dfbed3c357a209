# pictures.sh — --svg, --html and --slice of solve and score: well-formed files, maps that agree with independent references, all-or-nothing output, usage errors.
. "$(dirname "$0")/../lib.sh"
PY=${PY:-/usr/bin/python3}
TOOLS="$ROOT/tests/tools"
MODELS="$ROOT/models"
export PYTHONPATH="$TOOLS"

# well_formed NAME FILE...: every file is well-formed XML (xmllint, Debian's libxml2-utils).
well_formed() {
  name=$1; shift
  if xmllint --noout "$@" 2>"$TMP/xmllint.err"; then pass "$name"; else fail "$name" "$(head -c 300 "$TMP/xmllint.err")"; fi
}
# py_check NAME: runs the Python on standard input; it prints "ok" or why not.
py_check() {
  res=$("$PY" - 2>&1)
  if [ "$res" = ok ]; then pass "$1"; else fail "$1" "$(printf '%s' "$res" | tail -n 5)"; fi
}

# --- solve on a task: files, well-formedness, the page's promises -------------------------
rover="$MODELS/crater-rover.task"
bc solve "$rover" --cells 24x24 --svg "$TMP/rover" --html "$TMP/rover.html" --policy-out "$TMP/rover-policy.csv" --quiet
expect_status "solve --svg --html: exit 0" 0
if [ "$(cd "$TMP/rover" 2>/dev/null && ls | tr '\n' ' ')" = "policy.svg value.svg " ]; then
  pass "solve --svg: policy.svg and value.svg, nothing else"
else
  fail "solve --svg: policy.svg and value.svg, nothing else" "$(ls -a "$TMP/rover" 2>&1 | tr '\n' ' ')"
fi
well_formed "solve --svg: SVG files well-formed" "$TMP/rover/policy.svg" "$TMP/rover/value.svg"
well_formed "solve --html: page well-formed" "$TMP/rover.html"
expect_in "html: the safety statement" "$TMP/rover.html" "It is not a proof about the physical system"
expect_in "html: the figures carry their proof kind" "$TMP/rover.html" '<span class="proof exact">exact</span>'
expect_in "html: pictures inline" "$TMP/rover.html" '<svg xmlns="http://www.w3.org/2000/svg"'
expect_in "html: a print style sheet" "$TMP/rover.html" "@media print"
expect_not_in "html: no script" "$TMP/rover.html" "<script"
if grep -Eq '(src|href)="(https?:)?//' "$TMP/rover.html" || grep -q 'url(' "$TMP/rover.html"; then
  fail "html: nothing loaded from the network" "an external reference"
else
  pass "html: nothing loaded from the network"
fi
expect_in "svg: axes named after the task's variables" "$TMP/rover/policy.svg" '>x</text>'
expect_in "svg: the y axis too" "$TMP/rover/value.svg" '>v</text>'

# The policy map shows exactly the policy of --policy-out, in the action palette
# of Okabe & Ito (2008): reverse, idle, forward are blue, orange, bluish green
# (RGB from memory).  Cell (i, j) of the picture is state c<i>_<j> (x across, v up).
py_check "policy map: every cell in its action's colour (24 x 24)" <<EOF
import csv, svg_cells
nx, ny, cells = svg_cells.cells("$TMP/rover/policy.svg")
colour = {"reverse": "#0072b2", "idle": "#e69f00", "forward": "#009e73"}
pol = {r[0]: r[1] for r in csv.reader(open("$TMP/rover-policy.csv")) if r[0] != "state"}
bad = [(i, j) for i in range(nx) for j in range(ny) if cells[(i, j)] != colour[pol["c%d_%d" % (i, j)]]]
print("ok" if (nx, ny) == (24, 24) and not bad else "size %dx%d, wrong cells %s" % (nx, ny, bad[:5]))
EOF

# --- V* heat map against the book ----------------------------------------------------------
# Sutton & Barto, Reinforcement Learning: An Introduction, 2nd ed. (2018),
# Figure 3.5: optimal values of the 5x5 gridworld, one decimal (from memory).
# The heat map must order the cells as the book does (viridis: lighter is higher),
# with the book's largest value (A, r0c1) and smallest (r4c4) at the two ends.
bc solve "$MODELS/sutton-barto-3.5-gridworld.bell" --svg "$TMP/sb" --slice c,r --quiet
expect_status "gridworld: solve --svg --slice c,r" 0
py_check "value map: cells ordered as Sutton & Barto's Figure 3.5" <<EOF
import svg_cells
rows = ["22.0 24.4 22.0 19.4 17.5", "19.8 22.0 19.8 17.8 16.0", "17.8 19.8 17.8 16.0 14.4",
        "16.0 17.8 16.0 14.4 13.0", "14.4 16.0 14.4 13.0 11.7"]
book = {(c, r): float(x) for r, row in enumerate(rows) for c, x in enumerate(row.split())}
nx, ny, cells = svg_cells.cells("$TMP/sb/value.svg")
def lum(h):
    v = [int(h[k:k + 2], 16) / 255 for k in (1, 3, 5)]
    v = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in v]
    return 0.2126 * v[0] + 0.7152 * v[1] + 0.0722 * v[2]
bad = [(a, b) for a in book for b in book if book[a] > book[b] + 0.15 and not lum(cells[a]) > lum(cells[b])]
ends = cells[(1, 0)] == "#fde725" and cells[(4, 4)] == "#440154"
print("ok" if not bad and ends else "order broken at %s, ends %s %s" % (bad[:3], cells[(1, 0)], cells[(4, 4)]))
EOF

# --- score: the agent map against an independent reference ----------------------------------
drone="$MODELS/demo-yard-drone.bell"
bc score "$drone" --q "$MODELS/demo-yard-drone-q.csv" --max-regret 5% --svg "$TMP/drone" --html "$TMP/drone.html" --quiet
expect_status "score --svg --html: the gate fails, pictures are written (exit 1)" 1
well_formed "score: SVG files and page well-formed" "$TMP/drone/agent.svg" "$TMP/drone/policy.svg" "$TMP/drone/value.svg" "$TMP/drone.html"
expect_in "score html: the failed gate" "$TMP/drone.html" "FAILED"
expect_in "score html: the verdict" "$TMP/drone.html" "Regret at the initial distribution"
"$PY" "$TOOLS/score_ref.py" "$drone" --qstar >"$TMP/qstar.txt" 2>"$TMP/qstar.err"
# Marked cells are those where the agent's greedy action is not optimal by
# Q* of the independent reference (tests/tools/score_ref.py); outlined cells are
# the states from which the greedy policy never reaches the pad (a graph search
# here, common practice).  Cell (i, j) is state x<i>y<j>.
py_check "agent map: marks where Q* says the action is not optimal, outlines the traps" <<EOF
import csv, svg_cells, ref_solve
m = ref_solve.parse(open("$drone").read())
qstar = {}
for line in open("$TMP/qstar.txt"):
    _, s, a, v = line.split()
    qstar.setdefault(s, {})[a] = float(v)
rows = list(csv.reader(open("$MODELS/demo-yard-drone-q.csv")))
acts = rows[0][1:]
greedy = {}
for r in rows[1:]:
    q = [float(x) for x in r[1:]]
    greedy[r[0]] = acts[q.index(min(q))]          # objective min, first on ties
wrong = {s for s, a in greedy.items() if qstar[s][a] > min(qstar[s].values()) + 1e-9 * max(1, abs(min(qstar[s].values())))}
# States that reach the terminal pad with probability 1 under the greedy policy:
succ = {}
for (s, a, _, out) in m.pairs:
    succ[(m.states[s], m.actions[a])] = [m.states[t] for t, p in out if p > 0]
term = {m.states[t] for t in m.terminal}
# a state finishes surely iff every state it can reach under the policy can reach a terminal state
def reach(s):
    seen, stack = {s}, [s]
    while stack:
        u = stack.pop()
        for t in ([] if u in term else succ[(u, greedy[u])]):
            if t not in seen:
                seen.add(t); stack.append(t)
    return seen
can = {s for s in greedy if any(t in term for t in reach(s))}
traps = {s for s in greedy if s not in term and not all(t in term or t in can for t in reach(s))}
name = lambda ij: "x%dy%d" % ij
marked = {name(c) for c in svg_cells.marks("$TMP/drone/agent.svg")}
outlined = {name(c) for c in svg_cells.traps("$TMP/drone/agent.svg")}
ok = marked == wrong and outlined == traps and traps
print("ok" if ok else "marked %s vs wrong %s; outlined %s vs traps %s" % (sorted(marked), sorted(wrong), sorted(outlined), sorted(traps)))
EOF

# --- all or nothing ---------------------------------------------------------------------------
mkdir -p "$TMP/keep"
echo mine >"$TMP/keep/notes.txt"
echo old >"$TMP/keep/policy.svg"
bc solve "$rover" --cells 8x8 --svg "$TMP/keep" --quiet
expect_status "--svg into an existing directory: exit 0" 0
if [ "$(cat "$TMP/keep/notes.txt")" = mine ] && [ "$(ls "$TMP/keep" | tr '\n' ' ')" = "notes.txt policy.svg value.svg " ] &&
   grep -q '<svg' "$TMP/keep/policy.svg"; then
  pass "--svg into an existing directory: its files replaced, others kept, no temporaries"
else
  fail "--svg into an existing directory: its files replaced, others kept, no temporaries" "$(ls "$TMP/keep" | tr '\n' ' ')"
fi
echo plain >"$TMP/afile"
bc solve "$rover" --cells 8x8 --svg "$TMP/afile" --quiet
expect_status "--svg onto a regular file: exit 3" 3
expect_in "--svg onto a regular file: says so" "$err" "not a directory"
if [ "$(cat "$TMP/afile")" = plain ]; then pass "--svg onto a regular file: the file is untouched"; else fail "--svg onto a regular file: the file is untouched" "changed"; fi
bc solve "$rover" --cells 8x8 --svg "$TMP/no/such/dir" --quiet
expect_status "--svg under a missing directory: exit 3" 3
if [ -e "$TMP/no" ] || ls "$TMP" | grep -q tmp; then fail "--svg under a missing directory: nothing left" "$(ls "$TMP")"; else pass "--svg under a missing directory: nothing left"; fi
bc solve "$rover" --cells 8x8 --html "$TMP/no/such/page.html" --svg "$TMP/svg-then-html" --quiet
expect_status "--html that cannot be written: exit 3" 3

# --- models that are no grid, strips, slices ---------------------------------------------------
bc solve "$MODELS/demo-warehouse-robot.bell" --svg "$TMP/wh" --quiet
expect_status "--svg on a model whose states are no grid: exit 2" 2
expect_in "--svg on a model whose states are no grid: says why" "$err" "not named like the others"
if [ -e "$TMP/wh" ]; then fail "--svg on a model that is no grid: nothing written" "dir exists"; else pass "--svg on a model that is no grid: nothing written"; fi
bc solve "$MODELS/demo-warehouse-robot.bell" --html "$TMP/wh.html" --quiet
expect_status "--html on a model that is no grid: exit 0" 0
expect_in "--html on a model that is no grid: the page says there are no pictures" "$TMP/wh.html" "No pictures"
well_formed "--html on a model that is no grid: well-formed" "$TMP/wh.html"

bc solve "$MODELS/queue-admission.bell" --svg "$TMP/q" --quiet
expect_status "strip: a model of one variable (q0..q5)" 0
well_formed "strip: well-formed" "$TMP/q/policy.svg" "$TMP/q/value.svg"
py_check "strip: six cells in one row" <<EOF
import svg_cells
nx, ny, c = svg_cells.cells("$TMP/q/policy.svg")
print("ok" if (nx, ny) == (6, 1) else "%dx%d" % (nx, ny))
EOF

cat >"$TMP/cube.task" <<'EOF'
# three variables, for slices (invented)
task 1
discount 9/10
state x 0 1
state y 0 2
state z 0 3
action u = {down: -1, up: 1}
next x = clamp(x + 0.1*u, 0, 1)
next y = y
next z = z
reward -x
initial x = 0.5
initial y = 0.5
initial z = 0.5
EOF
bc solve "$TMP/cube.task" --cells 6x5x4 --svg "$TMP/cube" --slice z,x --quiet
expect_status "slice: z across, x up, of three variables" 0
expect_in "slice: the picture says where y is held" "$TMP/cube/policy.svg" "y in cell 2 of 5 (0.8 to 1.2)"
py_check "slice: 4 x 6 cells drawn" <<EOF
import svg_cells
nx, ny, c = svg_cells.cells("$TMP/cube/value.svg")
print("ok" if (nx, ny) == (4, 6) else "%dx%d" % (nx, ny))
EOF
bc solve "$TMP/cube.task" --cells 6x5x4 --svg "$TMP/cube2" --slice x,w --quiet
expect_status "slice: an unknown variable is a usage error" 2
expect_in "slice: the message lists the variables" "$err" "(x, y, z)"
bc solve "$rover" --cells 8x8 --slice x,v --quiet
expect_status "--slice without --svg or --html: usage error" 2
bc solve "$rover" --cells 8x8 --html - --quiet
expect_status "--html -: usage error" 2
bc solve "$rover" --cells 8x8 --compare --svg "$TMP/cmp" --quiet
expect_status "--compare with --svg: usage error" 2

# A model name with markup and bad bytes keeps the page well-formed.
printf 'bell 1\nname a<b & "c" \377\ndiscount 1/2\nactions go\nx0 go 1 -> x1\nx1 go 2 -> x0\n' >"$TMP/odd.bell"
bc solve "$TMP/odd.bell" --html "$TMP/odd.html" --svg "$TMP/odd" --quiet
expect_status "odd name: solved" 0
well_formed "odd name: page and pictures well-formed" "$TMP/odd.html" "$TMP/odd/policy.svg"
printf 'state,action\nx0,go\nx1,go\n' >"$TMP/odd-policy.csv"
bc score "$TMP/odd.bell" --policy "$TMP/odd-policy.csv" --html "$TMP/odd-score.html" --quiet
expect_status "odd name: scored with a page" 0
well_formed "odd name: score page well-formed" "$TMP/odd-score.html"

# --- refine --svg: the convergence plot and trajectories, all or nothing -------------------
bc refine "$rover" --cells 8x8,16x16 --episodes 20 --svg "$TMP/refine-svg" --quiet
expect_status "refine --svg exit" 0
[ -f "$TMP/refine-svg/convergence.svg" ] && [ -f "$TMP/refine-svg/trajectories.svg" ] \
  && pass "refine --svg writes convergence.svg and trajectories.svg" \
  || fail "refine --svg writes convergence.svg and trajectories.svg" "$(ls "$TMP/refine-svg" 2>&1)"
well_formed "refine pictures are well-formed" "$TMP/refine-svg/convergence.svg" "$TMP/refine-svg/trajectories.svg"
: >"$TMP/not-a-dir"
bc refine "$rover" --cells 8x8,16x16 --episodes 20 --svg "$TMP/not-a-dir" --quiet
expect_status "refine --svg into a file is refused" 3
