#!/usr/bin/env bash
# End-to-end test of bad input: each case must print exactly one line on stderr, exit with
# the code documented in cli/exit_codes.h and leave no output file (nor a temporary) behind.
# Expected codes are the project's own (sysexits.h values); common practice, no source.
# Usage: cli_errors.sh EDGELAW WORKDIR
set -u
here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
edgelaw=$(realpath "$1")
work=$2
rm -rf "$work"
mkdir -p "$work"
cd "$work" || exit 1
failures=0

printf 'beta,x,w\n2,-1,inf\n2,0,1\n' > good.csv
printf 'beta,x,w\n2,-1,inf\n2,0\n' > ragged.csv
printf 'beta,x,w\n2,-1,inf\n2,zero,1\n' > text.csv
printf 'beta,x,w\n2,-1,inf\n' > one.csv
printf 'not an hdf5 file\n' > fake.h5

# shellcheck source=cli_expect.sh
source "$here/cli_expect.sh"

tiny=(--x-min -1 --x-max 0 --x-step 0.5 --w-min 0 --w-max 1 --w-step 1)
expect 64 "beta zero" table --beta 0 "${tiny[@]}" --output out.h5
expect 64 "beta negative" table --beta -2 "${tiny[@]}" --output out.h5
expect 64 "beta NaN" table --beta nan "${tiny[@]}" --output out.h5
expect 64 "beta not a number" table --beta two "${tiny[@]}" --output out.h5
expect 64 "x range inverted" table --x-min 1 --x-max -1 --output out.h5
expect 64 "w range inverted" table --w-min 2 --w-max -2 --output out.h5
expect 64 "x step zero" table --x-step 0 --output out.h5
expect 64 "w step negative" table --w-step -0.1 --output out.h5
expect 64 "target 1e-20" table --target 1e-20 "${tiny[@]}" --output out.h5
expect 64 "unknown option" table --colour red --output out.h5
expect 73 "output folder missing" table "${tiny[@]}" --output missing-folder/out.h5
expect 73 "output is a folder" table "${tiny[@]}" --output .
expect 66 "evaluate input missing" evaluate --input missing.csv --output out.csv
expect 65 "evaluate ragged CSV" evaluate --input ragged.csv --output out.csv
expect 65 "evaluate non-numeric field" evaluate --input text.csv --output out.csv
expect 66 "evaluate table missing" evaluate --input good.csv --table missing.h5 --output out.csv
expect 65 "evaluate table not HDF5" evaluate --input good.csv --table fake.h5 --output out.csv
expect 73 "evaluate output folder missing" evaluate --input one.csv --output missing-folder/out.csv
expect 64 "quantile probability 1" quantile --probability 1 --table fake.h5
expect 64 "quantile probability NaN" quantile --probability nan
expect 64 "pvalue w not a number" pvalue --x 0 --w big
expect 64 "pvalue x infinite" pvalue --x inf
expect 64 "sweep without betas" sweep "${tiny[@]}" --output out.h5
expect 64 "sweep beta list bad" sweep --betas 1,two "${tiny[@]}" --output out.h5
expect 64 "sweep beta zero" sweep --betas 0,2 "${tiny[@]}" --output out.h5
expect 64 "sweep part out of range" sweep --betas 1,2 --part 3/2 "${tiny[@]}" --output out.h5
expect 64 "sweep range inverted" sweep --beta-min 4 --beta-max 1 --beta-count 3 "${tiny[@]}" --output out.h5
expect 73 "sweep output folder missing" sweep --betas 1,2 "${tiny[@]}" --output missing-folder/out.h5
expect 66 "merge part missing" merge --output out.h5 missing.h5
expect 65 "merge part not HDF5" merge --output out.h5 fake.h5

# Non-finite values, empty ranges, absurd or negative sizes, levels outside (0, 1).
expect 64 "beta infinite" table --beta inf "${tiny[@]}" --output out.h5
expect 64 "beta below the supported range" table --beta 0.01 "${tiny[@]}" --output out.h5
expect 64 "x min infinite" table --x-min -inf --x-max 1 --output out.h5
expect 64 "x step NaN" table --x-step nan --output out.h5
expect 64 "w max NaN" table --w-max nan --output out.h5
expect 64 "x range empty" table --x-min 1 --x-max 1 --output out.h5
expect 64 "x step absurdly small" table --x-step 1e-12 --output out.h5
expect 64 "target NaN" table --target nan "${tiny[@]}" --output out.h5
expect 64 "target infinite" table --target inf "${tiny[@]}" --output out.h5
expect 64 "base intervals negative" table --base-intervals -5 "${tiny[@]}" --output out.h5
expect 64 "base intervals absurd" table --base-intervals 1000000000 "${tiny[@]}" --output out.h5
expect 64 "max levels absurd" table --max-levels 40 "${tiny[@]}" --output out.h5
expect 64 "max levels negative" table --max-levels -1 "${tiny[@]}" --output out.h5
expect 64 "max levels absurd with a base grid" table --base-intervals 100 --max-levels 40 "${tiny[@]}" --output out.h5
expect 64 "max levels negative with a base grid" table --base-intervals 100 --max-levels -3 "${tiny[@]}" --output out.h5
expect 64 "memory budget negative" table --max-memory -5 "${tiny[@]}" --output out.h5
expect 64 "memory budget NaN" table --max-memory nan "${tiny[@]}" --output out.h5
expect 64 "time budget zero" table --max-time 0 "${tiny[@]}" --output out.h5
expect 64 "time budget NaN" evaluate --input good.csv --max-time nan --output out.csv
expect 64 "quantile probability 0" quantile --probability 0
expect 64 "quantile probability above 1" quantile --probability 1.5
expect 64 "quantile probability negative" quantile --probability -0.05
expect 64 "quantile probability infinite" quantile --probability inf
expect 64 "quantile beta negative" quantile --beta -1 --probability 0.5
expect 64 "quantile w minus infinity" quantile --w -inf --probability 0.5
expect 64 "pvalue x NaN" pvalue --x nan
expect 64 "pvalue beta NaN" pvalue --beta nan --x 0
expect 64 "pvalue target zero" pvalue --x 0 --target 0
expect 64 "sweep beta count zero" sweep --beta-min 1 --beta-max 2 --beta-count 0 "${tiny[@]}" --output out.h5
expect 64 "sweep beta count negative" sweep --beta-min 1 --beta-max 2 --beta-count -3 "${tiny[@]}" --output out.h5
expect 64 "sweep beta count absurd" sweep --beta-min 1 --beta-max 2 --beta-count 2000000000 "${tiny[@]}" --output out.h5
expect 64 "sweep beta infinite" sweep --betas 1,inf "${tiny[@]}" --output out.h5
expect 64 "sweep beta list NaN" sweep --betas nan "${tiny[@]}" --output out.h5
expect 64 "sweep beta list empty item" sweep --betas 1,,2 "${tiny[@]}" --output out.h5
expect 64 "sweep threads negative" sweep --betas 1,2 --threads -1 "${tiny[@]}" --output out.h5
expect 64 "sweep part zero" sweep --betas 1,2 --part 0/2 "${tiny[@]}" --output out.h5
expect 64 "sweep part malformed" sweep --betas 1,2 --part 1/2x "${tiny[@]}" --output out.h5

# Resource bounds: refused up front with the estimate, before any solving (exit 69).
expect 69 "table grid over the memory budget" table --x-step 0.0001 --w-step 0.001 --output out.h5
expect 69 "table over a lowered memory budget" table --max-memory 1 --output out.h5
expect 69 "sweep over the memory budget" sweep --betas 1,2,4 --threads 3 --x-step 0.001 --w-step 0.01 --max-memory 1000 --output out.h5
expect 69 "evaluate solve over the memory budget" evaluate --input good.csv --max-memory 0.0001 --output out.csv
if ! grep -q "MiB" stderr.txt; then echo "FAIL budget message names no estimate"; failures=$((failures + 1)); fi
# The default table is estimated at 2.6 s before any work (solver/time_budget.cpp).
expect 69 "table over a 1 s time budget" table --max-time 1 --output out.h5
expect 69 "sweep over a 1 s time budget per beta" sweep --betas 1,2 --max-time 1 --output out.h5
if ! grep -q "estimated to take at least [0-9.]* s" stderr.txt; then echo "FAIL time budget message names no estimate"; failures=$((failures + 1)); fi

# Bad or unreadable inputs, unwritable outputs.
printf '' > empty.csv
printf 'beta,x,w\n' > header.csv
printf 'beta,x,w\n2,nan,1\n' > nan.csv
printf 'beta,x,w\ninf,0,1\n' > betainf.csv
printf 'beta,x,w\n0,0,1\n' > betazero.csv
printf 'beta,x,w\n2,0,-inf\n' > wminusinf.csv
printf 'beta,x\n2,0\n' > header2.csv
printf '\x00\xff\xfe binary\n' > binary.csv
printf '' > empty.h5
mkdir -p folder.csv folder.h5
expect 65 "evaluate empty CSV" evaluate --input empty.csv --output out.csv
expect 65 "evaluate header only" evaluate --input header.csv --output out.csv
expect 65 "evaluate NaN field" evaluate --input nan.csv --output out.csv
expect 65 "evaluate infinite beta" evaluate --input betainf.csv --output out.csv
expect 65 "evaluate beta zero" evaluate --input betazero.csv --output out.csv
expect 65 "evaluate w minus infinity" evaluate --input wminusinf.csv --output out.csv
expect 65 "evaluate wrong header" evaluate --input header2.csv --output out.csv
expect 65 "evaluate binary input" evaluate --input binary.csv --output out.csv
expect 66 "evaluate input is a folder" evaluate --input folder.csv --output out.csv
expect 66 "evaluate table is a folder" evaluate --input good.csv --table folder.h5 --output out.csv
expect 65 "evaluate zero-length table" evaluate --input good.csv --table empty.h5 --output out.csv
expect 73 "evaluate output is a folder" evaluate --input one.csv --table fake.h5 --output folder.csv
expect 73 "evaluate output under a file" evaluate --input one.csv --output good.csv/out.csv
expect 65 "quantile zero-length table" quantile --probability 0.5 --table empty.h5
expect 66 "pvalue table missing" pvalue --x 0 --table missing.h5
expect 73 "table output under a file" table "${tiny[@]}" --output good.csv/out.h5
expect 73 "merge output folder missing" merge --output missing-folder/out.h5 fake.h5
# Permissions do not bind root: as root (CI containers) the cases run as the user nobody
# through setpriv (util-linux), when nobody can reach the binary and this folder.
as_user=""
if [[ $(id -u) -eq 0 ]] && command -v setpriv > /dev/null; then
  printf '#!/bin/sh\nexec setpriv --reuid=65534 --regid=65534 --clear-groups "%s" "$@"\n' "$edgelaw" > as-nobody.sh
  chmod 755 as-nobody.sh
  chmod 777 .  # nobody must be able to enter this folder (its files stay root's)
  if ./as-nobody.sh --version > /dev/null 2>&1; then as_user="$PWD/as-nobody.sh"; fi
fi
if [[ $(id -u) -ne 0 || -n $as_user ]]; then
  printf 'beta,x,w\n2,0,1\n' > locked.csv
  chmod 000 locked.csv
  mkdir -p locked
  chmod 555 locked
  real_edgelaw=$edgelaw
  [[ -n $as_user ]] && edgelaw=$as_user
  expect 66 "evaluate input unreadable${as_user:+ (as nobody)}" evaluate --input locked.csv --output out.csv
  expect 73 "table output folder read-only${as_user:+ (as nobody)}" table "${tiny[@]}" --output locked/out.h5
  edgelaw=$real_edgelaw
  chmod 755 locked
  rmdir locked
else
  echo "skip permission cases (running as root, and the user nobody cannot run $edgelaw here)"
fi

# A missed accuracy target (a deliberately tiny grid: 16 to 64 angle intervals cannot reach
# 1e-9; measured error ~8e-3) fails with 70 and writes nothing...
coarse=("${tiny[@]}" --base-intervals 16 --max-levels 3 --target 1e-9)
"$edgelaw" table "${coarse[@]}" --output out.h5 > stdout.txt 2> stderr.txt
got=$?
if [[ $got -ne 70 || -e out.h5 ]] || ! tail -n 1 stderr.txt | grep -q "not reached.*entries over the target, w in \[0, inf\], x in \[-1, 0\]"; then
  echo "FAIL unconverged: exit $got (want 70), file left: $([[ -e out.h5 ]] && echo yes || echo no)"
  failures=$((failures + 1))
else
  echo "ok   unconverged: exit 70, the region over the target named, nothing written"
fi
# ...unless --keep-unconverged: then the file exists, says converged = 0, marks the failed
# entries (here all 9) in within_target, and stderr warns.
"$edgelaw" table "${coarse[@]}" --keep-unconverged --output kept.h5 > stdout.txt 2> stderr.txt
got=$?
flag=$(/usr/bin/python3 -c "import h5py; f = h5py.File('kept.h5'); print(int(f['/'].attrs['converged']), int((f['within_target'][...] == 0).sum()))" 2>/dev/null)
if [[ $got -ne 0 || $flag != "0 9" ]] || ! grep -q "converged = 0 and those entries marked 0 in within_target" stderr.txt; then
  echo "FAIL keep-unconverged: exit $got, converged attribute '$flag'"
  failures=$((failures + 1))
else
  echo "ok   keep-unconverged: written with converged = 0, the failed entries marked, and a warning"
fi

# Solver trouble: a request whose estimate cannot meet the target on the grids allowed (beta
# = 1e4 with a 16-interval base and 3 levels: measured estimate 1.4e-2 against 1e-3) fails
# with 70, the reason and the estimate, and writes nothing. (A CVODE failure proper, which
# this coarse-grid case used to provoke before the sixth-order scheme, exits the same way
# with CVODE's reason; no command-line case reproduces one now.)
"$edgelaw" table --beta 1e4 --x-min -1 --x-max 1 --x-step 0.5 --w-min 0 --w-max 1 --w-step 1 --target 1e-3 \
  --base-intervals 16 --max-levels 3 --output out.h5 > stdout.txt 2> stderr.txt
got=$?
if [[ $got -ne 70 || -e out.h5 ]] || ! grep -q "accuracy target 0.001 not reached (max estimated error" stderr.txt; then
  echo "FAIL solver trouble: exit $got (want 70), file left: $([[ -e out.h5 ]] && echo yes || echo no)"
  sed 's/^/  stderr: /' stderr.txt
  failures=$((failures + 1))
else
  echo "ok   solver trouble: exit 70: $(tail -1 stderr.txt)"
fi
rm -f out.h5

# A damaged copy of a real table: truncated and bit-flipped are refused with 65, never used.
half=$(( $(stat -c %s kept.h5) / 2 ))
head -c "$half" kept.h5 > truncated.h5
/usr/bin/python3 - <<'PY'
import h5py, numpy as np
data = bytearray(open("kept.h5", "rb").read())
with h5py.File("kept.h5", "r") as f:
    row = np.ascontiguousarray(f["cdf"][0]).tobytes()
at = data.find(row)  # the first cdf row's bytes, stored in one checksummed chunk
assert at >= 0
data[at + 3] ^= 0x04
open("flipped.h5", "wb").write(bytes(data))
PY
expect 65 "evaluate truncated table" evaluate --input good.csv --table truncated.h5 --output out.csv
expect 65 "evaluate bit-flipped table" evaluate --input good.csv --table flipped.h5 --output out.csv
expect 65 "quantile bit-flipped table" quantile --probability 0.5 --table flipped.h5

# Help and version are not errors: stdout, exit 0.
"$edgelaw" --version > stdout.txt 2> stderr.txt
if [[ $? -ne 0 || ! -s stdout.txt || -s stderr.txt ]]; then echo "FAIL --version"; failures=$((failures + 1)); fi

if [[ $failures -ne 0 ]]; then
  echo "$failures failures"
  exit 1
fi
echo "all error cases passed"
