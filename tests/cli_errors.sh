#!/usr/bin/env bash
# End-to-end test of bad input: each case must print exactly one line on stderr, exit with
# the code documented in cli/exit_codes.h and leave no output file (nor a temporary) behind.
# Expected codes are the project's own (sysexits.h values); common practice, no source.
# Usage: cli_errors.sh EDGELAW WORKDIR
set -u
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

# expect CODE DESCRIPTION ARGS...: runs edgelaw, checks code, one stderr line, no out.* file.
expect() {
  local code=$1 what=$2
  shift 2
  "$edgelaw" "$@" > stdout.txt 2> stderr.txt
  local got=$?
  local lines
  lines=$(wc -l < stderr.txt)
  local leftovers
  leftovers=$(ls -A | grep -E '^(\.)?out' | tr '\n' ' ')
  if [[ $got -ne $code || $lines -ne 1 || -n $leftovers ]]; then
    echo "FAIL $what: exit $got (want $code), $lines stderr lines (want 1), leftovers '$leftovers'"
    sed 's/^/  stderr: /' stderr.txt
    failures=$((failures + 1))
  else
    echo "ok   $what: exit $got: $(cat stderr.txt)"
  fi
}

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

# A missed accuracy target (a deliberately tiny grid: 16 to 64 angle intervals cannot reach
# 1e-9; measured error ~8e-3) fails with 70 and writes nothing...
coarse=("${tiny[@]}" --base-intervals 16 --max-levels 3 --target 1e-9)
"$edgelaw" table "${coarse[@]}" --output out.h5 > stdout.txt 2> stderr.txt
got=$?
if [[ $got -ne 70 || -e out.h5 ]] || ! tail -n 1 stderr.txt | grep -q "not reached"; then
  echo "FAIL unconverged: exit $got (want 70), file left: $([[ -e out.h5 ]] && echo yes || echo no)"
  failures=$((failures + 1))
else
  echo "ok   unconverged: exit 70, nothing written"
fi
# ...unless --keep-unconverged: then the file exists, says converged = 0, and stderr warns.
"$edgelaw" table "${coarse[@]}" --keep-unconverged --output kept.h5 > stdout.txt 2> stderr.txt
got=$?
flag=$(/usr/bin/python3 -c "import h5py; print(int(h5py.File('kept.h5')['/'].attrs['converged']))" 2>/dev/null)
if [[ $got -ne 0 || $flag != 0 ]] || ! grep -q "converged = 0" stderr.txt; then
  echo "FAIL keep-unconverged: exit $got, converged attribute '$flag'"
  failures=$((failures + 1))
else
  echo "ok   keep-unconverged: written with converged = 0 and a warning"
fi

# Help and version are not errors: stdout, exit 0.
"$edgelaw" --version > stdout.txt 2> stderr.txt
if [[ $? -ne 0 || ! -s stdout.txt || -s stderr.txt ]]; then echo "FAIL --version"; failures=$((failures + 1)); fi

if [[ $failures -ne 0 ]]; then
  echo "$failures failures"
  exit 1
fi
echo "all error cases passed"
