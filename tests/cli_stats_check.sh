#!/usr/bin/env bash
# End-to-end test of the statistics subcommands (pvalue with a model, critical-value, power,
# interval, simulate): bad input gets one stderr line, the documented exit code
# (cli/exit_codes.h) and no output file; a few good runs give well-formed results that agree
# with each other. Expected codes are the project's own (sysexits.h values); common practice,
# no source.
# Usage: cli_stats_check.sh EDGELAW WORKDIR
set -u
here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
edgelaw=$(realpath "$1")
work=$2
rm -rf "$work"
mkdir -p "$work"
cd "$work" || exit 1
failures=0

printf '1,2,3\n4,5,6\n7,8,10\n2,1,0\n' > good.csv
printf '1,2,3\n4,5\n' > ragged.csv
printf 'a,b\n1,2\n3,oops\n' > text.csv
printf '1,2,3\n' > one.csv
printf '1,2\n2,1\n3,4\n' > notsquare.csv

# expect CODE DESCRIPTION ARGS...: one stderr line, the code, no out.* file (cli_expect.sh).
# shellcheck source=cli_expect.sh
source "$here/cli_expect.sh"

cov=(--model covariance --beta 1 --n 800 --p 200)
expect 65 "non-numeric CSV" pvalue --model covariance --beta 1 --data text.csv
expect 65 "ragged CSV" pvalue --model covariance --beta 1 --data ragged.csv
expect 65 "one sample" pvalue --model covariance --beta 1 --data one.csv
expect 65 "signal matrix not square" pvalue --model signal --data notsquare.csv
expect 66 "missing data file" pvalue --model covariance --data missing.csv
expect 64 "negative noise variance" pvalue "${cov[@]}" --eigenvalue 1900 --eigenvalue-of XtX --noise-variance -2
expect 64 "NaN eigenvalue" pvalue "${cov[@]}" --eigenvalue nan --eigenvalue-of XtX
expect 64 "eigenvalue without its matrix" pvalue "${cov[@]}" --eigenvalue 1900
expect 64 "spike below 1" pvalue "${cov[@]}" --eigenvalue 1900 --eigenvalue-of XtX --spike 0.5
expect 64 "beta zero" critical-value --model covariance --beta 0 --n 800 --p 200
expect 64 "alpha zero" critical-value "${cov[@]}" --alpha 0
expect 64 "alpha one" power "${cov[@]}" --alpha 1 --alternative 2
expect 64 "negative n" critical-value --model covariance --n -5 --p 3
expect 64 "p for the signal model" critical-value --model signal --n 100 --p 3
expect 64 "estimate without data" pvalue "${cov[@]}" --eigenvalue 1900 --eigenvalue-of XtX --noise-variance estimate
expect 64 "both data and eigenvalue" pvalue --model covariance --data good.csv --eigenvalue 3
expect 64 "inverted power range" power "${cov[@]}" --alternatives 2:1.5:5 --output out.csv
expect 64 "power without alternative" power "${cov[@]}"
expect 64 "direct model with --spike" interval --x 1 --spike 2
expect 64 "negative simulate count" pvalue "${cov[@]}" --eigenvalue 1900 --eigenvalue-of XtX --simulate -1
expect 64 "simulate with too few samples" simulate "${cov[@]}" --samples 10
expect 64 "simulate for the direct model" simulate --samples 1000
expect 73 "unwritable power curve" power "${cov[@]}" --alternatives 1.5:2:3 --output no/such/dir/out.csv
expect 66 "missing table" pvalue "${cov[@]}" --eigenvalue 1900 --eigenvalue-of XtX --table missing.h5

# Good runs. A power curve written atomically, with its header and 3 rows.
if "$edgelaw" power "${cov[@]}" --alternatives 1.5:2.5:3 --output curve.csv 2> stderr.txt > /dev/null &&
   [[ $(head -1 curve.csv) == "alternative,w,x,power,power_error,regime" && $(wc -l < curve.csv) -eq 4 ]]; then
  echo "ok   power curve written"
else
  echo "FAIL power curve: $(cat stderr.txt)"; failures=$((failures + 1))
fi
# The p-value at the level-0.05 critical eigenvalue is 0.05 (the two commands invert each other).
crit=$("$edgelaw" critical-value "${cov[@]}" --eigenvalue-of XtX --json 2>/dev/null |
       /usr/bin/python3 -c 'import json,sys; print(repr(json.load(sys.stdin)["critical_eigenvalue"]["value"]))')
p=$("$edgelaw" pvalue "${cov[@]}" --eigenvalue "$crit" --eigenvalue-of XtX --json 2>/dev/null |
    /usr/bin/python3 -c 'import json,sys; d=json.load(sys.stdin); print(d["p_value"]["value"], d["regime"], "caution" in d)')
if /usr/bin/python3 -c "import sys; v=float('$p'.split()[0]); sys.exit(0 if abs(v-0.05) < 1e-7 else 1)" && [[ $p == *"True" ]]; then
  echo "ok   pvalue at the critical value: $p"
else
  echo "FAIL pvalue at the critical value $crit: $p"; failures=$((failures + 1))
fi

echo "$failures failures"
[[ $failures -eq 0 ]]
