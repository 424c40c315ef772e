#!/usr/bin/env bash
# Build and run the benchmarks; prints the Markdown for BENCHMARKS.md on stdout.
#
#   bash scripts/bench.sh            # everything, about 12 minutes on 2 quiet cores
#   bash scripts/bench.sh --quick    # smaller versions of every part, about 3 minutes
#   bash scripts/bench.sh --only fredholm,montecarlo,growth,profile,sweep,table
#
# EDGELAW_BUILD_DIR=dir uses an existing build folder (only the bench targets are rebuilt);
# without it scripts/build.sh sets up and builds build/.
set -euo pipefail
cd "$(dirname "$0")/.."
quick=0
only="table,fredholm,montecarlo,growth,profile,sweep"
while [ $# -gt 0 ]; do
  case "$1" in
    --quick) quick=1 ;;
    --only) only="$2"; shift ;;
    *) echo "usage: bash scripts/bench.sh [--quick] [--only part,...]" >&2; exit 64 ;;
  esac
  shift
done
want() { case ",$only," in *",$1,"*) return 0 ;; *) return 1 ;; esac; }

build="${EDGELAW_BUILD_DIR:-build}"
if [ -z "${EDGELAW_BUILD_DIR:-}" ]; then
  bash scripts/build.sh >&2
else
  cmake --build "$build" --target edgelaw default_table_bench fredholm_table_bench monte_carlo_bench cost_growth_bench >&2
fi
bench="$build/bench"
q=(); [ "$quick" = 1 ] && q=(--quick)
scratch="$(mktemp -d)"
trap 'rm -rf "$scratch"' EXIT

echo "Machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | xargs), $(awk '/MemTotal/ {printf "%.0f GiB", $2/1048576}' /proc/meminfo), $(. /etc/os-release && echo "$PRETTY_NAME"), $(date -u +%Y-%m-%dT%H:%MZ); load average at start $(cut -d' ' -f1-3 /proc/loadavg)."
echo

if want table; then
  echo "### Default table, moments on (\`$bench/default_table_bench 1e-8 1e-10\`)"
  echo
  "$bench/default_table_bench" 1e-8 1e-10
  echo
fi

if want fredholm; then
  echo "### edgelaw against Fredholm determinants (\`$bench/fredholm_table_bench ${q[*]}\`)"
  echo
  "$bench/fredholm_table_bench" "${q[@]}"
  echo
fi

if want montecarlo; then
  echo "### Monte Carlo against the table (\`$bench/monte_carlo_bench ${q[*]}\`)"
  echo
  "$bench/monte_carlo_bench" "${q[@]}"
  echo
fi

if want growth; then
  echo "### Cost growth of one grid level (\`$bench/cost_growth_bench ${q[*]}\`)"
  echo
  "$bench/cost_growth_bench" "${q[@]}"
  echo
fi

if want profile; then
  echo "### Profile of one level (800 intervals, one run: survival, then cdf)"
  echo
  if perf stat -e instructions true >/dev/null 2>&1; then
    perf record -q -o "$scratch/perf.data" -- "$bench/cost_growth_bench" --single 800 >/dev/null 2>&1
    echo "\`perf record $bench/cost_growth_bench --single 800\`, share of samples by part:"
    echo
    echo "| part | share |"
    echo "|---|---|"
    perf report -q -i "$scratch/perf.data" --stdio --sort symbol 2>/dev/null | awk '
      /%/ { p = $1; sub("%", "", p); s = $0
            if (s ~ /bandGBTRS/) k = "band triangular solves (SUNDlsMat_bandGBTRS)"
            else if (s ~ /bandGBTRF/) k = "band LU factorisations (SUNDlsMat_bandGBTRF)"
            else if (s ~ /jacobian|SUNMatZero|SUNMatScaleAddI|SUNMatCopy|bandCopy|bandScale/) k = "Jacobian assembly and matrix copies"
            else if (s ~ /Dky|_Function_handler|point_weights/) k = "dense output and interpolation to (x, w)"
            else if (s ~ /KolmogorovOperator::rhs/) k = "right-hand side (KolmogorovOperator::rhs)"
            else if (s ~ /N_V|\[\.\] 0x0|cv[A-Z]|CVode/) k = "CVODE internals (vector kernels, norms, Nordsieck history)"
            else if (s ~ /exp|erf|log|pow|sin|cos/) k = "libm"
            else k = "other"
            share[k] += p }
      END { for (k in share) printf "| %s | %.1f%% |\n", k, share[k] }' | sort -t'|' -k3 -gr
  else
    echo "perf not available; run valgrind --tool=callgrind $bench/cost_growth_bench --single 200"
  fi
  echo
  # I/O: the same solve with and without the HDF5 write.
  t0=$(date +%s.%N)
  "$build/cli/edgelaw" table --beta 2 --target 1e-8 --output "$scratch/t.h5" >"$scratch/table.out" 2>"$scratch/table.err"
  t1=$(date +%s.%N)
  echo "\`edgelaw table --beta 2 --target 1e-8\` (solve, moments, quantile table and HDF5 write): $(echo "$t1 $t0" | awk '{printf "%.1f", $1 - $2}') s wall, file $(du -k "$scratch/t.h5" | cut -f1) KiB; its own report:"
  echo
  sed 's/^/    /' "$scratch/table.out"
  echo
fi

if want sweep; then
  # The issue's sweep: 64 betas evenly spaced in [1, 4] on the default grid, 2 concurrent betas
  # on the 2 cores; and 8 of them with 1 and with 2 concurrent betas for the parallel efficiency
  # (a lone solve runs its finest grid on a second thread; concurrent betas do not).
  if [ "$quick" = 1 ]; then runs="2:2 2:1"; target=1e-6; else runs="64:2 8:2 8:1"; target=1e-8; fi
  echo "### Sweeps: betas evenly spaced in [1, 4], default grid, target $target"
  echo
  echo "| command | betas | wall s | CPU s | CPU / (2 cores x wall) | peak RSS MiB | load at start | load at end |"
  echo "|---|---|---|---|---|---|---|---|"
  for run in $runs; do
    count=${run%%:*}; threads=${run##*:}
    load0=$(cut -d' ' -f1-3 /proc/loadavg)
    cmd="edgelaw sweep --beta-min 1 --beta-max 4 --beta-count $count --threads $threads --target $target"
    if /usr/bin/time -f "%e %U %S %M" -o "$scratch/time" "$build/cli/edgelaw" sweep --beta-min 1 --beta-max 4 \
        --beta-count "$count" --threads "$threads" --target "$target" --output "$scratch/sweep.h5" >/dev/null 2>"$scratch/sweep.err"; then
      read -r wall user sys rss <"$scratch/time"
      echo "| \`$cmd\` | $count | $wall | $(echo "$user $sys" | awk '{printf "%.1f", $1 + $2}') | $(echo "$user $sys $wall" | awk '{printf "%.2f", ($1 + $2) / (2 * $3)}') | $((rss / 1024)) | $load0 | $(cut -d' ' -f1-3 /proc/loadavg) |"
      echo "$count $threads $wall" >>"$scratch/sweeps"
    else
      echo "| \`$cmd\` | $count | failed: $(tail -1 "$scratch/sweep.err") | | | | $load0 | |"
    fi
    rm -rf "$scratch/sweep.h5" "$scratch/sweep.h5.parts"
  done
  echo
  if [ -s "$scratch/sweeps" ]; then
    awk '$2 == 2 { c2 = $1; w2 = $3 } $2 == 1 { w1 = $3 }
         $2 == 2 && $1 == 64 { w64 = $3 }
         END { if (w64 > 0) printf "64 betas: %.0f s wall (%.1f s per beta).", w64, w64 / 64
               else if (w2 > 0) printf "64 betas scaled from the 2-thread run: %.0f s wall (%.0f s per beta).", 64 * w2 / c2, w2 / c2
               if (w1 > 0 && w2 > 0) printf " Speedup of 2 concurrent betas over 1: %.2f (parallel efficiency %.0f%%).", w1 / w2, 50 * w1 / w2
               print "" }' "$scratch/sweeps"
    echo
  fi
fi
echo "Load average at end: $(cut -d' ' -f1-3 /proc/loadavg)."
