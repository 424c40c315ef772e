#!/usr/bin/env python3
"""End-to-end test of edgelaw sweep/merge/evaluate --table on tiny grids.

Checks: (1) a sweep killed with SIGKILL after its first finished slice and restarted with
the same arguments writes the same numbers as an uninterrupted run, and removes its
checkpoint folder; (2) two parts merged equal the unsplit sweep; (3) evaluate --table
agrees with evaluate (a solve) within the sum of both error estimates. Identity is exact
(every variable, bit for bit, and the settings), since both routes assemble the final file
from the same deterministic slices (common practice, no source).
"""
import os
import signal
import subprocess
import sys
import time

import h5py
import numpy as np

from cli_check_common import check, failures, setup

GRID = ["--x-min", "-3", "--x-max", "1", "--x-step", "0.5", "--w-min", "0", "--w-max", "1",
        "--w-step", "1", "--target", "1e-6", "--base-intervals", "100"]
BETAS = "2,3,4"



def run(edgelaw, *args):
    r = subprocess.run([edgelaw, *args], capture_output=True, text=True)
    if r.returncode != 0:
        print(r.stderr)
    check(r.returncode == 0, "edgelaw " + " ".join(args[:3]) + " ... exits 0")
    return r


def contents(path):
    """Every dataset and the setting_* attributes (history differs by design)."""
    out = {}
    with h5py.File(path, "r") as f:
        for name, ds in f.items():
            out[name] = np.array(ds[()])
        out["settings"] = {k: f.attrs[k] for k in f.attrs if k.startswith("setting_")}
        out["title"] = f.attrs["title"]
        out["converged"] = int(f.attrs["converged"])
    return out


def same(a, b, what):
    keys_ok = set(a) == set(b)
    check(keys_ok, what + ": same variables")
    for k in sorted(set(a) & set(b)):
        if k in ("settings",):
            ok = a[k].keys() == b[k].keys() and all(np.array_equal(a[k][s], b[k][s]) for s in a[k])
        elif isinstance(a[k], np.ndarray):
            ok = a[k].shape == b[k].shape and np.array_equal(a[k], b[k], equal_nan=True)
        else:
            ok = a[k] == b[k]
        if not ok:
            check(False, what + ": " + k + " identical")
    check(True, what + ": compared " + str(len(a)) + " entries")


def main():
    edgelaw = setup()

    # Uninterrupted reference run.
    run(edgelaw, "sweep", "--betas", BETAS, *GRID, "--output", "full.h5")
    check(not os.path.exists("full.h5.parts"), "checkpoint folder removed after success")
    full = contents("full.h5")
    check(list(full["beta"]) == [2.0, 3.0, 4.0], "sweep file has betas 2, 3, 4")
    check(full["converged"] == 1, "sweep file says converged = 1")

    # Killed after the first slice, then resumed. One thread, so slices finish one by one.
    proc = subprocess.Popen([edgelaw, "sweep", "--betas", BETAS, *GRID, "--threads", "1",
                             "--output", "resumed.h5"], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    deadline = time.time() + 120
    finished = []
    while time.time() < deadline and proc.poll() is None:
        if os.path.isdir("resumed.h5.parts"):
            finished = [n for n in os.listdir("resumed.h5.parts") if n.endswith(".h5") and not n.startswith(".")]
            if finished:
                break
        time.sleep(0.02)
    killed_midway = proc.poll() is None and len(finished) >= 1
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait()
    check(killed_midway, "killed with %d finished slice(s) before the end" % len(finished))
    check(not os.path.exists("resumed.h5"), "no final file after the kill")
    r = run(edgelaw, "sweep", "--betas", BETAS, *GRID, "--threads", "1", "--output", "resumed.h5")
    check("reused from" in r.stderr, "restart reports reused slices")
    check(not os.path.exists("resumed.h5.parts"), "checkpoint folder removed after the resumed run")
    same(full, contents("resumed.h5"), "resumed == uninterrupted")

    # A checkpoint slice made for another target is not reused: a law file for beta 2 on the
    # same grid at target 1e-7, planted where the sweep looks for its beta 2 slice.
    os.makedirs("other.h5.parts")
    other_grid = [g if g != "1e-6" else "1e-7" for g in GRID]
    run(edgelaw, "table", "--beta", "2", *other_grid, "--output", "other.h5.parts/beta_2.h5")
    r = run(edgelaw, "sweep", "--betas", "2", *GRID, "--output", "other.h5")
    check("setting target_error differs" in r.stderr and "reused from" not in r.stderr,
          "checkpoint for another target is solved again")
    check(contents("other.h5")["settings"]["setting_target_error"] == 1e-6, "and the file has the new target")

    # Split into two parts, merged in the "wrong" order.
    run(edgelaw, "sweep", "--betas", BETAS, *GRID, "--part", "1/2", "--output", "part1.h5")
    run(edgelaw, "sweep", "--betas", BETAS, *GRID, "--part", "2/2", "--output", "part2.h5")
    check(list(contents("part1.h5")["beta"]) == [2.0, 4.0], "part 1/2 holds betas 2 and 4")
    run(edgelaw, "merge", "--output", "merged.h5", "part2.h5", "part1.h5")
    same(full, contents("merged.h5"), "merged == unsplit")
    r = subprocess.run([edgelaw, "merge", "--output", "bad.h5", "part1.h5"], capture_output=True, text=True)
    check(r.returncode == 65 and "missing" in r.stderr and not os.path.exists("bad.h5"),
          "merge of an incomplete set fails with 65 and writes nothing")
    r = subprocess.run([edgelaw, "merge", "--output", "bad.h5", "part1.h5", "part2.h5", "part1.h5"],
                       capture_output=True, text=True)
    check(r.returncode == 65 and "more than one part" in r.stderr and not os.path.exists("bad.h5"),
          "merge with a duplicated beta fails with 65 and writes nothing")

    # evaluate --table against evaluate by solving: within the sum of the two error estimates.
    with open("points.csv", "w") as f:
        f.write("beta,x,w\n2,-2.5,inf\n2,-1.25,0.5\n2,0.3,inf\n2,-1,0\n2,0.75,1\n")
    run(edgelaw, "table", "--beta", "2", "--x-min", "-3", "--x-max", "1", "--x-step", "0.05",
        "--w-min", "-1", "--w-max", "2", "--w-step", "0.25", "--target", "1e-7", "--base-intervals", "100",
        "--output", "law.h5")
    t = run(edgelaw, "evaluate", "--input", "points.csv", "--table", "law.h5").stdout.splitlines()
    s = run(edgelaw, "evaluate", "--input", "points.csv", "--target", "1e-7").stdout.splitlines()
    check(t[0] == s[0] == "beta,x,w,cdf,survival,cdf_error,survival_error", "same output columns")
    for lt, ls in zip(t[1:], s[1:]):
        vt = [float(v) for v in lt.split(",")]
        vs = [float(v) for v in ls.split(",")]
        for k, name in ((3, "cdf"), (4, "survival")):
            tol = vt[k + 2] + vs[k + 2]
            check(abs(vt[k] - vs[k]) <= tol and tol < 1e-5,
                  "%s at %s: table %.12g, solve %.12g, |diff| %.1e <= %.1e" % (name, ls.split(",")[:3], vt[k], vs[k],
                                                                       abs(vt[k] - vs[k]), tol))

    print("%d failures" % len(failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
