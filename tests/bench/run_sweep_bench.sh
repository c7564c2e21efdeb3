#!/usr/bin/env bash
# Benchmarks `mirrorcheck sweep` over many op runs of the Tamarack sample against as many
# separate `mirrorcheck review` processes of the same run, measured side by side in the same
# run (target: the sweep costs at most 30 % of the separate reviews). Each run is the
# sample's whole results file (its op plot and the AC and .tf plots of its probes): the
# sweep reads N copies of it concatenated into one raw file (as ngspice's `set appendwrite`
# writes them), with `--ac` on the same file, so both sides review the same plots.
#
# Environment (all optional):
#   BENCH_SWEEP_RUNS=1000   runs
#   MIRRORCHECK=path        the mirrorcheck executable (default: build/mirrorcheck)
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
root=$(cd "$here/../.." && pwd)
runs=${BENCH_SWEEP_RUNS:-1000}
mc=${MIRRORCHECK:-$root/build/mirrorcheck}
sample="$root/samples/tamarack"
work="$here/work/sweep-$runs"

die() { echo "run_sweep_bench.sh: $*" >&2; exit 1; }
[[ $runs =~ ^[1-9][0-9]*$ ]] || die "BENCH_SWEEP_RUNS must be a positive integer"
[[ -x $mc ]] || die "no mirrorcheck at $mc (build it, or set MIRRORCHECK)"
[[ -n ${EPOCHREALTIME:-} ]] || die "needs bash 5 (EPOCHREALTIME)"

mkdir -p "$work"
if [[ ! -s $work/runs.raw ]]; then
    for ((k = 0; k < runs; k++)); do cat "$sample/bias_op.raw"; done > "$work/runs.raw.part"
    mv "$work/runs.raw.part" "$work/runs.raw"
fi

now() { echo "${EPOCHREALTIME/./}"; }  # microseconds

start=$(now)
status=0
"$mc" sweep "$sample/bias.cir" --op "$work/runs.raw" --ac "$work/runs.raw" --format json > "$work/sweep.json" || status=$?
sweep_us=$(( $(now) - start ))
(( status < 2 )) || die "sweep failed with status $status"
reviewed=$(python3 -c "import json,sys; print(json.load(open(sys.argv[1]))['summary']['runs'])" "$work/sweep.json")
[[ $reviewed == "$runs" ]] || die "the sweep reviewed $reviewed runs, expected $runs"

start=$(now)
for ((k = 0; k < runs; k++)); do
    status=0
    "$mc" review "$sample/bias.cir" --op "$sample/bias_op.raw" --format json > "$work/review.json" || status=$?
    (( status < 2 )) || die "review failed with status $status"
done
review_us=$(( $(now) - start ))

ratio=$(python3 -c "print(f'{$sweep_us / $review_us * 100:.1f}')")
printf 'runs:                     %d\n' "$runs"
python3 -c "print(f'one sweep:                {$sweep_us / 1e6:.2f} s ({$sweep_us / 1e3 / $runs:.2f} ms per run)')"
python3 -c "print(f'{$runs} review processes:    {$review_us / 1e6:.2f} s ({$review_us / 1e3 / $runs:.2f} ms per run)')"
printf 'sweep / reviews:          %s %% (target: at most 30 %%)\n' "$ratio"
python3 -c "import sys; sys.exit(0 if $sweep_us <= 0.30 * $review_us else 1)" || { echo "above the target"; exit 1; }
