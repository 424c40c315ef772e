#!/usr/bin/env python3
"""Interoperability check of the table format: h5py, xarray (h5netcdf), ncdump and R's hdf5r
read the files the C++ writer produced, see labelled axes and units, and get the same numbers
as the C++ reader. Run by ctest; exits non-zero with a message on the first failure."""
import argparse
import json
import math
import os
import shutil
import subprocess
import sys
import warnings

import h5py
import numpy as np
import xarray as xr
from scipy.stats import norm

# Any warning from xarray/h5netcdf/h5py is a failure: downstream users must get a clean read.
warnings.simplefilter("error")


def fail(msg):
    print("tables_python_check: FAIL: " + msg)
    sys.exit(1)


def check(cond, msg):
    if not cond:
        fail(msg)


def family(x, w, beta_shift=0.0):
    """The closed-form family of tests/tables_family.cpp, written again independently."""
    t = 1.0 if math.isinf(w) else math.tanh(w / 2)
    return -1.2 - 0.6 * t + beta_shift, 1.0 - 0.1 * t


def as_w(v):
    return math.inf if v == "inf" else v


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--fixture", required=True)
    ap.add_argument("--workdir", required=True)
    ap.add_argument("--ncdump", default="")
    ap.add_argument("--rscript", default="")
    args = ap.parse_args()
    shutil.rmtree(args.workdir, ignore_errors=True)
    subprocess.run([args.fixture, args.workdir], check=True)
    with open(os.path.join(args.workdir, "reader_values.json")) as fh:
        ref = json.load(fh)
    law, sweep = ref["law"], ref["sweep"]

    # --- h5py: dimension scales, attribute types (common practice, no source) ---
    with h5py.File(law, "r") as f:
        check(f["cdf"].shape == (82, 701), "cdf shape %s" % (f["cdf"].shape,))
        check(f["cdf"].dims[0][0].name == "/w" and f["cdf"].dims[1][0].name == "/x",
              "cdf dimension scales are not (w, x)")
        check(f["quantile"].dims[1][0].name == "/probability", "quantile second axis is not probability")
        check(isinstance(f.attrs["title"], str), "title is not text in h5py: %r" % type(f.attrs["title"]))
        check(f.attrs["edgelaw_schema_version"] == 1 and np.issubdtype(f.attrs["edgelaw_schema_version"].dtype, np.integer),
              "schema version is not the integer 1")
        check(f["cdf"].fletcher32, "cdf has no fletcher32 checksum")
        check(not any(k.startswith("_") for k in f.attrs), "a file attribute starts with '_'")
        check(np.isinf(f["w"][-1]) and f["w"][-1] > 0, "last w is not +inf")
        check(f["cdf"].attrs["units"] == "1", "cdf units")

    # --- xarray with the h5netcdf engine: labelled axes, units, values ---
    with xr.open_dataset(law, engine="h5netcdf") as ds:
        check(ds["cdf"].dims == ("w", "x"), "cdf dims %s" % (ds["cdf"].dims,))
        check(ds["quantile"].dims == ("w", "probability"), "quantile dims %s" % (ds["quantile"].dims,))
        check(ds["mean"].dims == ("w",), "mean dims")
        for name in ["cdf", "survival", "density", "log_cdf", "log_survival", "cdf_error", "quantile", "mean"]:
            check("units" in ds[name].attrs and "long_name" in ds[name].attrs, name + " lacks units/long_name")
        check(ds.attrs["Conventions"] == "CF-1.8", "Conventions")
        check(isinstance(ds.attrs["history"], str) and "tables_fixture" in ds.attrs["history"], "history")
        check(ds.attrs["setting_method"] == "closed form", "string setting")
        check(int(ds.attrs["setting_base_intervals"]) == 400, "integer setting")
        check(math.isinf(float(ds["w"][-1])), "xarray lost the +inf w")
        # Node values equal what the C++ reader returns (bit-identical; common practice, no source).
        for p in ref["points"]:
            w = as_w(p["w"])
            if p["x"] in ds["x"].values and w in ds["w"].values:
                v = float(ds["cdf"].sel(x=p["x"], w=w))
                check(v == p["cdf"], "xarray cdf(%g, %g) = %r, C++ %r" % (p["x"], w, v, p["cdf"]))
        # Labelled selection of the +inf row works.
        row = ds["cdf"].sel(w=np.inf)
        check(row.dims == ("x",), "selecting w=inf")
        # Exact closed form against the stored table (erfc-based values; scipy as reference).
        m, s = family(0.0, np.inf)
        check(np.max(np.abs(row.values - norm.cdf(ds["x"].values, m, s))) < 1e-15, "stored +inf row vs scipy")
        # Stored quantiles against scipy's Gaussian inverse; 1e-7: Hermite at x step 0.02
        # errs ~1e-10 in the cdf, divided by densities >= 4e-4 at p = 1e-4.
        for j, w in enumerate(ds["w"].values):
            m, s = family(0.0, float(w))
            exact = norm.ppf(ds["probability"].values, m, s)
            got = ds["quantile"].values[j]
            check(np.nanmax(np.abs(got - exact)) < 1e-7, "stored quantile at w=%g" % w)

    # Off-node C++ reader values against scipy (independent reference): the reader's own
    # error estimate must cover the difference (plus 1e-12, the level below which the
    # estimates are indicative only; see tables_test.cpp). Fixture grid: x step 0.02,
    # w step 0.05.
    worst = 0.0
    for p in ref["points"]:
        w = as_w(p["w"])
        m, s = family(0.0, w)
        exact = norm.cdf(p["x"], m, s)
        check(abs(p["cdf"] - exact) <= p["cdf_error"] + 1e-12,
              "C++ cdf(%g, %g) = %r vs scipy %r beyond the error estimate %g" % (p["x"], w, p["cdf"], exact, p["cdf_error"]))
        check(abs(p["survival"] - norm.sf(p["x"], m, s)) <= p["survival_error"] + 1e-12, "survival %r" % p)
        check(abs(p["density"] - norm.pdf(p["x"], m, s)) <= p["density_error"] + 1e-12, "density %r" % p)
        worst = max(worst, abs(p["cdf"] - exact))
    for q in ref["quantiles"]:
        m, s = family(0.0, as_w(q["w"]))
        check(abs(q["quantile"] - norm.ppf(q["probability"], m, s)) <= q["quantile_error"] + 1e-12, "quantile %r" % q)
    print("tables_python_check: C++ reader vs scipy max |cdf error| at off-node points: %.3g" % worst)

    # --- sweep file: a leading beta axis ---
    with xr.open_dataset(sweep, engine="h5netcdf") as ds:
        check(ds["cdf"].dims == ("beta", "w", "x"), "sweep cdf dims %s" % (ds["cdf"].dims,))
        check(ds["mean"].dims == ("beta", "w"), "sweep mean dims")
        check(list(ds["beta"].values) == [1.0, 2.0, 4.0], "sweep betas")
        m, s = family(0.0, -1.0, 0.2 / 4.0)
        got = ds["cdf"].sel(beta=4.0, w=-1.0).values
        check(np.max(np.abs(got - norm.cdf(ds["x"].values, m, s))) < 1e-15, "sweep slice beta=4")

    # --- ncdump (netCDF-C) ---
    if not args.ncdump:
        fail("ncdump not found (Debian package netcdf-bin)")
    out = subprocess.run([args.ncdump, "-h", law], capture_output=True, text=True)
    check(out.returncode == 0, "ncdump -h failed: " + out.stderr.strip())
    for needle in ["w = 82 ;", "x = 701 ;", "probability = 17 ;", "double cdf(w, x) ;", "cdf:units = \"1\" ;",
                   "edgelaw_schema_version = 1 ;", ":title = "]:
        check(needle in out.stdout, "ncdump -h lacks %r" % needle)
    out = subprocess.run([args.ncdump, "-v", "w", law], capture_output=True, text=True)
    check(out.returncode == 0 and "Infinity" in out.stdout, "ncdump does not show w = Infinity")
    out = subprocess.run([args.ncdump, "-h", sweep], capture_output=True, text=True)
    check(out.returncode == 0 and "double cdf(beta, w, x) ;" in out.stdout, "ncdump -h on the sweep file")

    # --- R hdf5r (if installed) ---
    if args.rscript:
        code = ("suppressMessages(library(hdf5r)); f <- H5File$new('%s', mode='r'); "
                "d <- f[['cdf']]$read(); a <- h5attr(f, 'title'); v <- h5attr(f, 'edgelaw_schema_version'); "
                "cat(dim(d), '|', a, '|', v, '|', sprintf('%%.17g', d[1, 82]), '\\n'); f$close_all()") % law
        out = subprocess.run([args.rscript, "-e", code], capture_output=True, text=True)
        check(out.returncode == 0, "R hdf5r failed: " + out.stderr.strip()[-300:])
        parts = [p.strip() for p in out.stdout.split("|")]
        # R is column-major: hdf5r reverses the dimensions, so cdf is 701 x 82 and
        # d[1, 82] is x[0] on the +inf row.
        with h5py.File(law, "r") as f:
            expect = f["cdf"][81, 0]
            title = f.attrs["title"]
        check(parts[0] == "701 82", "R dims %r" % parts[0])
        check(parts[1] == title, "R title %r" % parts[1])
        check(parts[2] == "1", "R schema version %r" % parts[2])
        check(float(parts[3]) == expect, "R value %r vs %r" % (parts[3], expect))
        print("tables_python_check: R hdf5r reads the file (dims %s)" % parts[0])
    else:
        print("tables_python_check: Rscript not found; R check skipped")
    print("tables_python_check: OK")


if __name__ == "__main__":
    main()
