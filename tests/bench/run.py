# run.py — `make bench`: generates the benchmark models, measures bellcheck and the numpy/scipy baseline on them, prints the table and writes $BUILD/bench.md.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Environment:
  BUILD=build          where the binaries are and the results go
  BENCH_QUICK=1        small models only (a smoke test of the benchmark, under a minute)
  BENCH_BIG=1          adds a 10,000,000-state Garnet model, 2 actions x 3 successors
                       (minutes, a 1.5 GB file, several GB of memory)
  BENCH_REPEAT=K       bellcheck end-to-end runs per model (median; default 3, quick 1;
                       models beyond ONCE_STATES states are parsed and run once)
  BENCH_THREADS=T      --threads for bellcheck (default 1; the 10^7-state row of BENCH_BIG
                       always uses every core: its target is for this machine)
  BENCH_BASELINE_MAX=N largest model (states) the baseline runs on in the scaling
                       table (default 100000; the baseline needs minutes beyond)
  BENCH_BASELINE_SECONDS=S  stop the baseline after S seconds and project its time
                       to the stopping rule from its observed rate (default: no cap)

Every figure comes from this one run on this machine.  Per model:
  parse MB/s      file bytes / median time of bc_read_bell_text on the buffer (probe)
  sweep           median time of one Jacobi sweep (probe), against the limit
                  sweep bytes / triad bandwidth
  bellcheck       wall time of `bellcheck solve FILE --tol 1e-6 --show 0`:
                  read, parse, checks, solve with a proven bound, report
                  (median of BENCH_REPEAT), its iterations and peak memory
  baseline        tests/bench/baseline.py: scipy value iteration to a proven
                  1e-6, its loop alone timed, its iterations and peak memory
"""
import json
import os
import re
import statistics
import subprocess
import sys
import time

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
BUILD = os.path.join(ROOT, os.environ.get("BUILD", "build"))
BIN = os.path.join(BUILD, "bench")
WORK = os.path.join(BUILD, "bench", "work")
QUICK = os.environ.get("BENCH_QUICK") == "1"
BIG = os.environ.get("BENCH_BIG") == "1"
REPEAT = int(os.environ.get("BENCH_REPEAT", "1" if QUICK else "3"))
THREADS = int(os.environ.get("BENCH_THREADS", "1"))
BASELINE_MAX = int(os.environ.get("BENCH_BASELINE_MAX", "100000"))
BASELINE_SECONDS = os.environ.get("BENCH_BASELINE_SECONDS")  # cap; the rest is projected
TOL = "1e-6"
# Beyond this many states a model is parsed once by the probe and solved once
# end to end (the 10,000,000-state model takes minutes per run).
ONCE_STATES = 5000000
# The crater-rover task needs `bellcheck grid` (the task feature); its row runs once that exists.
ROVER_TASK = os.path.join(ROOT, "tests", "bench", "crater-rover.task")


def run_rusage(cmd):
    """Runs cmd through `probe run` (see probe.c: a child of this large Python
    process would report its size as peak memory); returns (wall seconds,
    peak RSS bytes, exit status, stdout, stderr)."""
    res = os.path.join(WORK, "run.json")
    with open(os.path.join(WORK, "stdout"), "w+b") as fo, open(os.path.join(WORK, "stderr"), "w+b") as fe:
        p = subprocess.run([os.path.join(BIN, "probe"), "run", res] + cmd, stdout=fo, stderr=fe)
        fo.seek(0)
        fe.seek(0)
        out, err = fo.read().decode(), fe.read().decode()
    if p.returncode != 0:
        return 0.0, 0, 126, out, err + "\nprobe run failed"
    r = json.load(open(res))
    return r["seconds"], int(r["peak_bytes"]), r["status"], out, err


def ensure_model(name, gen_cmd):
    path = os.path.join(WORK, name + ".bell")
    if not os.path.exists(path):
        tmp = path + ".tmp"
        subprocess.run(gen_cmd + ["-o", tmp], check=True)
        os.rename(tmp, path)
    return path


def garnet(n, g, m=4, b=5, seed=1):
    name = "garnet-%d-%dx%d-g%s" % (n, m, b, g)
    return name, ensure_model(name, [os.path.join(BIN, "garnet"), "--states", str(n), "--actions", str(m),
                                     "--branch", str(b), "--discount", g, "--seed", str(seed)])


def grid(w, g):
    name = "grid-%dx%d-g%s" % (w, w, g)
    return name, ensure_model(name, [os.path.join(BIN, "gridworld"), "--width", str(w), "--height", str(w),
                                     "--discount", g])


def probe(path, dump, once=False):
    env = dict(os.environ, BENCH_PARSE_REPEAT="1") if once else None
    r = subprocess.run([os.path.join(BIN, "probe"), "model", path] + ([dump] if dump else []),
                       check=True, capture_output=True, text=True, env=env)
    return json.loads(r.stdout)


def bellcheck(path, once=False, threads=None):
    # --proof off: the figure is the solver's own proven bound (MacQueen-Porteus
    # or policy iteration's, with the rounding allowance); the default
    # proof pass on top is timed once, in its own column.
    base = [os.path.join(BUILD, "bellcheck"), "solve", path, "--tol", TOL, "--show", "0"]
    threads = THREADS if threads is None else threads
    if threads > 1:
        base += ["--threads", str(threads)]
    cmd = base + ["--proof", "off"]
    walls, peaks, res = [], [], {}
    for _ in range(1 if once else REPEAT):
        wall, peak, rc, out, err = run_rusage(cmd)
        if rc != 0:
            return {"error": "exit %d: %s" % (rc, err.strip()[:200])}
        walls.append(wall)
        peaks.append(peak)
    m = re.search(r"^method (\w+) .*?: (\w[\w ]*), (\d+) ", out, re.M)
    bd = re.search(r"proven \|V - V[^|]*\| <= (\S+?)[ ;)\n]", out)
    v = re.search(r"initial distribution: (\S+)", out)
    res["seconds"] = statistics.median(walls)
    res["peak_bytes"] = max(peaks)
    res["method"] = m.group(1) if m else "?"
    res["iterations"] = int(m.group(3)) if m else -1
    res["value_initial"] = float(v.group(1)) if v else float("nan")
    res["bound"] = float(bd.group(1)) if bd else float("nan")
    # One more run writes the JSON report, for the value at the initial
    # state in full precision (the text shows 10 digits); outside the quick
    # run it also times the default proof pass.
    res["proof_seconds"] = None
    js = os.path.join(WORK, "report.json")
    wall, peak, rc, out, err = run_rusage(base + (["--proof", "off"] if QUICK else []) + ["--json", js])
    if rc == 0:
        res["value_initial"] = json.load(open(js))["value_initial"]
        if not QUICK:
            res["proof_seconds"] = wall
    if os.path.exists(js):
        os.remove(js)
    msg = out.splitlines()[2].strip() if len(out.splitlines()) > 2 else ""
    res["message"] = msg
    return res


def baseline(dump):
    cmd = ["/usr/bin/python3", os.path.join(ROOT, "tests", "bench", "baseline.py"), dump, "--tol", TOL]
    if BASELINE_SECONDS:
        cmd += ["--max-seconds", BASELINE_SECONDS]
    wall, peak, rc, out, err = run_rusage(cmd)
    if rc != 0:
        return {"error": err.strip()[-200:]}
    r = json.loads(out)
    r["peak_bytes"] = peak
    return r


def measure(name, path, bw, with_baseline):
    dump = os.path.join(WORK, "dump-" + name) if with_baseline else None
    once = name.startswith("garnet-") and int(name.split("-")[1]) > ONCE_STATES
    pr = probe(path, dump, once)
    bc = bellcheck(path, once, os.cpu_count() if once else None)
    if once:
        name += " (%d threads)" % os.cpu_count()
    bl = baseline(dump) if with_baseline else None
    if dump:
        for ext in ("meta", "spstart", "tstart", "succ", "prob", "reward", "initial"):
            os.remove(dump + "." + ext)
    limit = pr["sweep_bytes"] / (bw * 1e9)
    row = {"model": name, "states": pr["n_states"], "pairs": pr["n_pairs"], "trans": pr["n_trans"],
           "mb": pr["bytes"] / 1e6, "parse_mbs": pr["bytes"] / 1e6 / pr["parse_seconds"],
           "sweep_ms": pr["sweep_seconds"] * 1e3, "limit_ms": limit * 1e3,
           "sweep_ratio": pr["sweep_seconds"] / limit,
           "array_bytes": pr["sweep_bytes"], "bc": bc, "bl": bl}
    print_row(row)
    return row


def fmt_mem(b):
    return "%.0f MB" % (b / 1e6) if b is not None else "-"


def row_cells(r):
    bc, bl = r["bc"], r["bl"]
    if "error" in bc:
        bc_cells = ["error: " + bc["error"], "", "", "", ""]
    else:
        bc_cells = ["%.3f s" % bc["seconds"], "%s %d" % (bc["method"], bc["iterations"]),
                    fmt_mem(bc["peak_bytes"]), "%.2g" % bc["bound"],
                    "-" if bc["proof_seconds"] is None else "%.2f s" % bc["proof_seconds"]]
    if bl is None:
        bl_cells, ratio, agree = ["-", "-", "-"], "-", "-"
    elif "error" in bl:
        bl_cells, ratio, agree = ["error", "", ""], "-", "-"
    else:
        secs = bl["seconds"] if bl["converged"] else bl.get("projected_seconds") or float("nan")
        bl_cells = [("%.2f s" if bl["converged"] else "stopped at %.0f s, projected %%.0f s" % bl["seconds"]) % secs,
                    "%d" % bl["iterations"], fmt_mem(bl["peak_bytes"])]
        ratio = "1/%.0f" % (secs / bc["seconds"]) if "seconds" in bc else "-"
        agree = "%.1e" % abs(bl["value_initial"] - bc.get("value_initial", float("nan"))) \
            if bl["converged"] else "-"
    return [r["model"], "%d" % r["states"], "%.0f" % r["mb"], "%.0f" % r["parse_mbs"],
            "%.1f / %.1f ms (%.2fx)" % (r["sweep_ms"], r["limit_ms"], r["sweep_ratio"])] + bc_cells + \
        [fmt_mem(r["array_bytes"])] + bl_cells + [ratio, agree]


HEAD = ["model", "states", "file MB", "parse MB/s", "sweep / limit", "bellcheck end to end", "method, iterations",
        "bellcheck peak", "proven bound", "with default proof", "sweep arrays", "baseline solve", "baseline iterations",
        "baseline peak", "bellcheck / baseline", "|V0 difference|"]


def print_row(r):
    print("  " + " | ".join(row_cells(r)), flush=True)


def table(rows):
    lines = ["| " + " | ".join(HEAD) + " |", "|" + "---|" * len(HEAD)]
    for r in rows:
        lines.append("| " + " | ".join(row_cells(r)) + " |")
    return "\n".join(lines)


def rover_slot(bw):
    """The crater-rover task on a 512 x 512 grid (discount 1), once `bellcheck grid` exists.
    Returns (row or None, note)."""
    # ---- CRATER-ROVER SLOT: runs when `build/bellcheck grid` exists ----
    exe = os.path.join(BUILD, "bellcheck")
    if QUICK:
        return None, "crater-rover 512 x 512: not in the quick run."
    r = subprocess.run([exe, "grid", "--help"], capture_output=True, text=True)
    if r.returncode != 0:
        return None, "crater-rover 512 x 512: skipped, `bellcheck grid` does not exist yet."
    cells = "512x512"
    path = os.path.join(WORK, "crater-rover-%s.bell" % cells)
    wall, peak, rc, out, err = run_rusage([exe, "grid", ROVER_TASK, "--cells", cells, "-o", path])
    if rc != 0:
        return None, "crater-rover %s: `bellcheck grid` failed: %s" % (cells, err.strip()[:300])
    # Discount 1: the baseline stops when the change is below the tolerance,
    # which proves nothing (bellcheck's answer carries a proven bound).
    row = measure("crater-rover-" + cells, path, bw, True)
    return row, "crater-rover %s: `bellcheck grid` built the model in %.1f s (peak %s); " \
        "at discount 1 the baseline stops when max |V' - V| <= 1e-6, which proves nothing " \
        "(bellcheck's bound is proven)." % (cells, wall, fmt_mem(peak))


def main():
    os.makedirs(WORK, exist_ok=True)
    started = time.strftime("%Y-%m-%d %H:%M")
    st = json.loads(subprocess.run([os.path.join(BIN, "probe"), "stream", "64" if QUICK else "256"],
                                   check=True, capture_output=True, text=True).stdout)
    bw = st["bandwidth_gbs"]
    print("memory bandwidth (triad, best of 7): %.2f GB/s" % bw)
    print("  " + " | ".join(HEAD), flush=True)
    if QUICK:
        main_models = [garnet(2000, "0.99"), garnet(2000, "0.999"), grid(30, "0.999")]
        scale = [garnet(n, "0.99") for n in (1000, 4000)]
        disc = [garnet(4000, g) for g in ("0.9", "0.9999")]
    else:
        main_models = [garnet(200000, "0.99"), garnet(200000, "0.999"), grid(200, "0.999")]
        scale = [garnet(n, "0.99") for n in (10000, 100000, 1000000)]
        disc = [garnet(100000, g) for g in ("0.9", "0.999", "0.9999")] + \
            [grid(100, g) for g in ("0.99", "0.999", "0.9999")]
    if BIG:
        # 2 actions x 3 successors: with 4 x 5 the file alone would be 4.4 GB
        # and the exact rationals of bellcheck's model would not fit 16 GiB.
        scale.append(garnet(10000000, "0.99", m=2, b=3))
    rows = [measure(n, p, bw, True) for n, p in main_models]
    rover_row, rover = rover_slot(bw)
    if rover_row:
        rows.append(rover_row)
    srows = [measure(n, p, bw, int(n.split("-")[1]) <= BASELINE_MAX) for n, p in scale]
    drows = [measure(n, p, bw, False) for n, p in disc]
    text = ["# bellcheck benchmark", "",
            "Run of %s on this machine (%d cores, %s), `make bench%s`; bellcheck with %d thread(s), "
            "tolerance %s, median of %d end-to-end runs (one beyond %d states); baseline run once." %
            (started, os.cpu_count(), "triad %.2f GB/s" % bw, " BENCH_QUICK=1" if QUICK else "",
             THREADS, TOL, REPEAT, ONCE_STATES), "",
            "## Targets", "", table(rows), ""]
    text += [rover, ""]
    text += ["## Growth with the number of states (Garnet, 4 actions, 5 successors unless the "
             "name says otherwise, discount 0.99)", "",
             table(srows), "", "## Growth with the discount", "", table(drows), "",
             "Columns: sweep = one Jacobi Bellman sweep on one thread against sweep arrays / triad "
             "bandwidth; bellcheck end to end = `bellcheck solve FILE --tol %s --show 0` wall time "
             "with `--proof off` (read, parse, checks, solve with its own proven bound); with default "
             "proof = the same run with the default proof pass and a JSON report (run once; "
             "not in the quick run); baseline = scipy sparse value iteration "
             "(tests/bench/baseline.py), loop alone; |V0 difference| = the two answers at the "
             "initial state." % TOL, ""]
    out = os.path.join(BUILD, "bench.md")
    with open(out, "w") as f:
        f.write("\n".join(text))
    print("\n".join(text))
    print("written to %s" % os.path.relpath(out, ROOT))


if __name__ == "__main__":
    main()
