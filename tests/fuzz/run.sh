#!/usr/bin/env bash
# Builds every libFuzzer target of tests/fuzz (clang-14, ASan + UBSan, leak detection) in
# the fuzz build folder and runs each for SECONDS, two or more at a time (one per core).
# Prints one line per target: name, executions, coverage, crashes; exits 1 on any crash,
# leak, hang or sanitizer report, after printing the input that caused it (hex) and the
# report, so a CI log alone is enough to reproduce it. A unit running past 30 s is a hang
# (wall time, so generous: a loaded CI machine, or fuzzers sharing cores, slows each unit).
#
#   tests/fuzz/run.sh SECONDS [TARGET ...]
#
# Environment: MIRRORCHECK_SHARED (default ../shared beside the checkout: the corpus the
# seeds come from), MIRRORCHECK_FUZZ_BUILD (default build-fuzz), FUZZ_JOBS (default: cores).
# The corpus each target grows is kept in $MIRRORCHECK_FUZZ_BUILD/corpus/TARGET, so a
# second run goes on from the first.
set -euo pipefail
seconds=${1:?usage: tests/fuzz/run.sh SECONDS [TARGET ...]}
shift
root=$(cd "$(dirname "$0")/../.." && pwd)
shared=${MIRRORCHECK_SHARED:-$root/../shared}
build=${MIRRORCHECK_FUZZ_BUILD:-$root/build-fuzz}
jobs=${FUZZ_JOBS:-$(nproc)}
all_targets=(fuzz_raw_binary fuzz_raw_ascii fuzz_listing fuzz_netlist fuzz_review_plots fuzz_waivers)
targets=("$@")
[ ${#targets[@]} -gt 0 ] || targets=("${all_targets[@]}")

launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)
cmake -S "$root" -B "$build" -DMIRRORCHECK_FUZZ=ON -DCMAKE_CXX_COMPILER=clang++-14 \
  -DCMAKE_BUILD_TYPE=RelWithDebInfo "${launcher[@]}" >/dev/null
cmake --build "$build" -j"$jobs" --target fuzz_all >/dev/null

# Seeds: the samples, the test fixtures and the shared corpus, files under 256 KB.
# find_seeds DIR... -- NAME-PATTERN...
seed_files() {
  local dirs=() names=()
  while [ "$1" != "--" ]; do dirs+=("$1"); shift; done
  shift
  for n in "$@"; do names+=(-o -name "$n"); done
  find "${dirs[@]}" -type f -size -256k \( "${names[@]:1}" \) 2>/dev/null || true
}
collect_seeds() {
  local target=$1 out=$build/seeds/$1
  rm -rf "$out" && mkdir -p "$out"
  local data=$root/tests/data corpus=$shared/corpus
  case $target in
    fuzz_raw_binary|fuzz_raw_ascii|fuzz_review_plots)
      seed_files "$root/samples" "$data" "$corpus" -- '*.raw' ;;
    fuzz_listing)
      seed_files "$root/samples" "$data/listing" "$corpus" -- '*show*.txt' '*.txt' '*.out' '*.log' ;;
    fuzz_netlist)
      seed_files "$root/samples" "$data" "$root/tests/fuzz/seeds/netlist" "$corpus" -- \
        '*.cir' '*.sp' '*.spice' '*.net' '*.lib' '*.mod' '*.inc' ;;
    fuzz_waivers)
      seed_files "$root/samples" "$data/waivers" -- 'waivers*.txt' '*.txt' ;;
  esac | while read -r f; do cp "$f" "$out/$(echo "$f" | md5sum | cut -c1-16)-$(basename "$f")"; done
}
dictionary() {
  case $1 in
    fuzz_raw_*|fuzz_review_plots) echo raw ;;
    fuzz_listing) echo listing ;;
    fuzz_netlist) echo netlist ;;
    fuzz_waivers) echo waivers ;;
  esac
}
max_len() {
  case $1 in
    fuzz_review_plots) echo 262144 ;;
    fuzz_raw_*) echo 65536 ;;
    *) echo 16384 ;;
  esac
}

run_target() {
  local target=$1 log=$build/logs/$1.log
  mkdir -p "$build/corpus/$target" "$build/artifacts/$target" "$build/logs"
  rm -f "$build/artifacts/$target"/*
  collect_seeds "$target"
  # Leaks are reported at exit (libFuzzer's -detect_leaks) and UBSan stops at the first report.
  ASAN_OPTIONS=detect_leaks=1:abort_on_error=1:symbolize=1 \
  UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
    "$build/tests/fuzz/$target" -max_total_time="$seconds" -timeout=30 -rss_limit_mb=2048 \
      -max_len="$(max_len "$target")" -dict="$root/tests/fuzz/dict/$(dictionary "$target").dict" \
      -artifact_prefix="$build/artifacts/$target/" -print_final_stats=1 \
      "$build/corpus/$target" "$build/seeds/$target" >"$log" 2>&1 || echo "exit $?" >>"$log"
}

start=$(date +%s)
running=0
for t in "${targets[@]}"; do
  run_target "$t" &
  running=$((running + 1))
  if [ "$running" -ge "$jobs" ]; then wait -n || true; running=$((running - 1)); fi
done
wait

failed=0
printf '%-18s %12s %10s %10s %8s\n' target executions coverage corpus crashes
for t in "${targets[@]}"; do
  log=$build/logs/$t.log
  execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -1 || true)
  cov=$( (grep -o 'cov: [0-9]*' "$log" || true) | tail -1 | cut -d' ' -f2)
  corp=$( (grep -o 'corp: [0-9]*' "$log" || true) | tail -1 | cut -d' ' -f2)
  # crash-, leak-, timeout- and oom- inputs are findings; slow-unit- ones (over 10 s) are not.
  crashes=$(find "$build/artifacts/$t" -type f ! -name 'slow-unit-*' | wc -l)
  bad=$crashes
  grep -q '^exit ' "$log" && [ "$bad" -eq 0 ] && bad=1  # died without leaving an input
  printf '%-18s %12s %10s %10s %8s\n' "$t" "${execs:-?}" "${cov:-?}" "${corp:-?}" "$crashes"
  if [ "$bad" -gt 0 ]; then
    failed=1
    echo "---- $t: report (from $log)"
    grep -v '^#[0-9]' "$log" | tail -60
    for a in "$build/artifacts/$t"/*; do
      [ -f "$a" ] || continue
      case $(basename "$a") in slow-unit-*) continue ;; esac
      echo "---- $t: input $(basename "$a") ($(stat -c %s "$a") bytes), hex; reproduce with: $build/tests/fuzz/$t FILE"
      od -An -tx1 -v "$a" | head -200
    done
  fi
done
echo "fuzzing done in $(( $(date +%s) - start )) s"
exit $failed
