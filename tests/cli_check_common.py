"""Shared by the Python end-to-end checks (cli_*_check.py): the ok/FAIL report and the
command line (--edgelaw BINARY --workdir FOLDER) with a fresh working folder."""
import argparse
import os
import shutil

failures = []


def check(ok, what):
    print(("ok   " if ok else "FAIL ") + what, flush=True)
    if not ok:
        failures.append(what)


def setup():
    """Parses the arguments, empties and enters the working folder; returns the binary's path."""
    ap = argparse.ArgumentParser()
    ap.add_argument("--edgelaw", required=True)
    ap.add_argument("--workdir", required=True)
    a = ap.parse_args()
    edgelaw = os.path.abspath(a.edgelaw)
    shutil.rmtree(a.workdir, ignore_errors=True)
    os.makedirs(a.workdir)
    os.chdir(a.workdir)
    return edgelaw
