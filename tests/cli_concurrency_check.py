#!/usr/bin/env python3
"""End-to-end test of concurrent use: (1) two sweeps writing different files at the same time
give the same numbers, bit for bit, as one sweep run alone, and a second sweep to the same
file is refused while the first runs; (2) a reader opening a table again
and again while another process keeps replacing it always sees one complete table, either the
old or the new one, never an error or a mixture.

Why (2) must hold: writers publish with rename(2), which replaces the name atomically (POSIX),
and readers open the name once; HDF5 file locking is off (tables/FORMAT.md), so a reader never
waits on or fails because of a writer.
"""
import os
import shutil
import subprocess
import sys
import time

import h5py
import numpy as np

from cli_check_common import check, failures, setup

TINY = ["--x-min", "-3", "--x-max", "1", "--x-step", "0.5", "--w-min", "0", "--w-max", "1",
        "--w-step", "1", "--target", "1e-6"]
# Two versions of the same table that differ in every digit beyond the error estimate: the
# coarsest angle grid changes the Richardson extrapolation.
VERSION = {"A": ["--base-intervals", "100"], "B": ["--base-intervals", "64"]}



def contents(path):
    out = {}
    with h5py.File(path, "r") as f:
        for name, ds in f.items():
            out[name] = np.array(ds[()])
    return out


def identical(a, b):
    return a.keys() == b.keys() and all(np.array_equal(a[k], b[k], equal_nan=True) for k in a)


def main():
    edgelaw = setup()

    # (1) Two sweeps at once, each to its own file, against one run alone.
    sweep = [edgelaw, "sweep", "--betas", "2,3", *TINY, "--base-intervals", "100", "--threads", "1"]
    r = subprocess.run(sweep + ["--output", "alone.h5"], capture_output=True, text=True)
    check(r.returncode == 0, "sweep alone exits 0")
    procs = [subprocess.Popen(sweep + ["--output", f"together{k}.h5"], stdout=subprocess.DEVNULL,
                              stderr=subprocess.PIPE, text=True) for k in (1, 2)]
    codes = [p.wait(timeout=300) for p in procs]
    check(codes == [0, 0], f"two sweeps at once exit 0 ({codes})")
    alone = contents("alone.h5")
    for k in (1, 2):
        check(identical(alone, contents(f"together{k}.h5")), f"concurrent sweep {k} == sweep alone, bit for bit")
        check(not os.path.exists(f"together{k}.h5.parts"), f"concurrent sweep {k} removed its checkpoint folder")

    # (1b) Two sweeps at once to the same file: the second finds the first's lock on the
    # checkpoint folder and refuses at once (exit 73, one line, nothing of its own written);
    # the first finishes untouched and equals the sweep alone. Without the lock both shared
    # FILE.parts/ and the first to finish deleted it under the other's assembly.
    first = subprocess.Popen(sweep + ["--output", "same.h5"], stdout=subprocess.DEVNULL,
                             stderr=subprocess.PIPE, text=True)
    deadline = time.time() + 60
    while not os.path.exists("same.h5.parts/.lock") and time.time() < deadline and first.poll() is None:
        time.sleep(0.01)
    second = subprocess.run(sweep + ["--output", "same.h5"], capture_output=True, text=True)
    first_code = first.wait(timeout=300)
    err = second.stderr.strip().splitlines()
    check(second.returncode == 73 and len(err) == 1 and "another sweep is writing same.h5" in err[0],
          f"second sweep to the same file refused (exit {second.returncode}, stderr {err})")
    check(first_code == 0 and identical(alone, contents("same.h5")),
          f"first sweep to the same file finished (exit {first_code}) and == sweep alone")
    check(not os.path.exists("same.h5.parts"), "first sweep removed the shared checkpoint folder")

    # (2) Reader while another process replaces the table.
    with open("points.csv", "w") as f:
        f.write("beta,x,w\n2,-1.25,0.5\n2,0.3,inf\n")
    expected = {}
    for v, args in VERSION.items():
        r = subprocess.run([edgelaw, "table", "--beta", "2", *TINY, *args, "--output", f"{v}.h5"],
                           capture_output=True, text=True)
        check(r.returncode == 0, f"table version {v} written")
        expected[v] = subprocess.run([edgelaw, "evaluate", "--input", "points.csv", "--table", f"{v}.h5"],
                                     capture_output=True, text=True).stdout
    check(expected["A"] != expected["B"], "the two versions give different values")
    shutil.copy("A.h5", "shared.h5")

    # The replacing process: edgelaw table writing B, A, B, ... over shared.h5.
    script = "; ".join(
        f"{' '.join([edgelaw, 'table', '--beta', '2', *TINY, *VERSION['BA'[k % 2]], '--output', 'shared.h5'])} >/dev/null 2>&1"
        for k in range(4))
    writer = subprocess.Popen(["bash", "-c", script])
    seen = {"A": 0, "B": 0}
    bad = []
    while writer.poll() is None or sum(seen.values()) < 20:
        r = subprocess.run([edgelaw, "evaluate", "--input", "points.csv", "--table", "shared.h5"],
                           capture_output=True, text=True)
        match = [v for v in expected if r.returncode == 0 and r.stdout == expected[v]]
        if match:
            seen[match[0]] += 1
        else:
            bad.append((r.returncode, r.stderr.strip()))
        if writer.poll() is not None and sum(seen.values()) >= 20:
            break
        time.sleep(0.02)  # leave the writer its share of a small machine
    writer.wait()
    check(writer.returncode == 0, "replacing process exits 0")
    check(not bad, f"every read is a complete old or new table ({seen['A']} A, {seen['B']} B, {len(bad)} bad: {bad[:3]})")
    check(seen["A"] > 0 and seen["B"] > 0, f"the reader saw both versions ({seen})")
    check(not [n for n in os.listdir(".") if ".tmp" in n], "no temporaries left")

    print("%d failures" % len(failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
