#!/usr/bin/env bash
# Benchmarks the raw-file reader against `cat` and against ngspice's own `load`, on a
# large binary raw file and its ASCII twin made here with ngspice. See README.md.
#
# Environment (all optional):
#   BENCH_POINTS=500000   points of the transient (the files are ~330 and ~950 bytes/point)
#   BENCH_FAST_RUNS=5     runs of the fast measurements (cat, bench_raw)
#   BENCH_SLOW_RUNS=3     runs of the slow ones (ngspice)
#   BENCH_RAW_EXE=path    use this bench_raw instead of building one in build-bench/
#   NGSPICE=ngspice       the simulator
# The files are kept in tests/bench/work/ and reused; delete them to regenerate (they
# are regenerated anyway when BENCH_POINTS changes).
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
root=$(cd "$here/../.." && pwd)
work="$here/work"
points=${BENCH_POINTS:-500000}
fast_runs=${BENCH_FAST_RUNS:-5}
slow_runs=${BENCH_SLOW_RUNS:-3}
ngspice=${NGSPICE:-ngspice}
sections=38

die() { echo "run_raw_bench.sh: $*" >&2; exit 1; }

for n in "$points" "$fast_runs" "$slow_runs"; do
    [[ $n =~ ^[1-9][0-9]*$ ]] || die "counts must be positive integers, got '$n'"
done
command -v "$ngspice" > /dev/null || die "ngspice not found (set NGSPICE)"
[[ -n ${EPOCHREALTIME:-} ]] || die "needs bash 5 (EPOCHREALTIME)"

# ---- bench_raw --------------------------------------------------------------------------

if [[ -n ${BENCH_RAW_EXE:-} ]]; then
    bench_raw=$BENCH_RAW_EXE
    [[ -x $bench_raw ]] || die "BENCH_RAW_EXE=$bench_raw is not executable"
else
    echo "== building bench_raw (Release) in $root/build-bench"
    cmake -S "$root" -B "$root/build-bench" -DCMAKE_BUILD_TYPE=Release > "$work.cmake.log" 2>&1 \
        || { cat "$work.cmake.log" >&2; die "cmake configure failed"; }
    if ! cmake --build "$root/build-bench" --target bench_raw -j2 >> "$work.cmake.log" 2>&1; then
        tail -n 30 "$work.cmake.log" >&2
        grep -q "No rule to make target 'bench_raw'\|unknown target" "$work.cmake.log" \
            && echo "(is 'add_subdirectory(bench EXCLUDE_FROM_ALL)' in tests/CMakeLists.txt?)" >&2
        die "building bench_raw failed (log: $work.cmake.log)"
    fi
    rm -f "$work.cmake.log"
    bench_raw="$root/build-bench/tests/bench/bench_raw"
fi

# ---- the raw files ----------------------------------------------------------------------

mkdir -p "$work"
bin="$work/rc_ladder_bin.raw"
asc="$work/rc_ladder_ascii.raw"
stamp="$work/rc_ladder.points"

make_files() {
    # A ${sections}-section RC ladder driven by a pulse; nodes in, n1..n38, the time and
    # i(vin) make 41 vectors. `.option interp` puts the output on the fixed 1 ns grid of
    # `tran 1n`, so tstop = points ns gives points+1 points. (`ngspice -b -r` together with
    # interp writes more rows than its header announces in ngspice 39, so the files are
    # written from a control block instead.)
    local deck="$work/rc_ladder.cir"
    {
        echo "* rc ladder for the raw-reader benchmark"
        echo "vin in 0 pulse(0 1 1u 50n 50n 4u 10u)"
        local prev=in k
        for ((k = 1; k <= sections; k++)); do
            echo "r$k $prev n$k 1k"
            # Slightly different capacitors so that no two nodes carry the same wave.
            echo "c$k n$k 0 $((100 + 5 * k))f"
            prev="n$k"
        done
        echo ".option interp"
        echo ".control"
        echo "tran 1n ${points}n"
        echo "write rc_ladder_bin.tmp"
        echo "set filetype=ascii"
        echo "write rc_ladder_ascii.tmp"
        echo "quit 0"
        echo ".endc"
        echo ".end"
    } > "$deck"
    echo "== making the raw files with ngspice ($points points; takes a minute or so)"
    rm -f "$bin" "$asc" "$stamp"
    (cd "$work" && "$ngspice" -b rc_ladder.cir > rc_ladder.log 2>&1) \
        || { tail -n 20 "$work/rc_ladder.log" >&2; die "ngspice failed (log: $work/rc_ladder.log)"; }
    [[ -s $work/rc_ladder_bin.tmp && -s $work/rc_ladder_ascii.tmp ]] \
        || die "ngspice wrote no raw files (log: $work/rc_ladder.log)"
    mv "$work/rc_ladder_bin.tmp" "$bin"
    mv "$work/rc_ladder_ascii.tmp" "$asc"
    echo "$points" > "$stamp"
}

if [[ -s $bin && -s $asc && -f $stamp && $(cat "$stamp") == "$points" ]]; then
    echo "== reusing $bin and $asc (delete them to regenerate)"
else
    make_files
fi

# ---- ngspice decks ------------------------------------------------------------------------

# `load` then quit; and an empty control block, for ngspice's own startup time.
for f in "$bin" "$asc"; do
    printf '* load only\n.control\nload %s\nquit 0\n.endc\n.end\n' "$f" > "$f.load.cir"
done
empty_deck="$work/empty.cir"
printf '* startup only\n.control\nquit 0\n.endc\n.end\n' > "$empty_deck"

# ngspice reports a failed load only in its output; check once, untimed, that each file
# loads with all its points.
expected=$((points + 1))
for f in "$bin" "$asc"; do
    check="$work/check.cir"
    printf '* check\n.control\nload %s\nlet npts = length(time)\necho "points=$&npts"\nquit 0\n.endc\n.end\n' \
        "$f" > "$check"
    out=$("$ngspice" -b "$check" 2>&1) || true
    grep -q "points=$expected\$" <<< "$out" || { echo "$out" >&2; die "ngspice did not load $f with $expected points"; }
    rm -f "$check"
done

# ---- timing helpers -------------------------------------------------------------------------

now() { echo "${EPOCHREALTIME/,/.}"; }

# median_of v1 v2 ...: the median of the numbers.
median_of() { printf '%s\n' "$@" | sort -g | awk '{ v[NR] = $1 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }

# time_runs N cmd...: runs cmd N times (output discarded) and prints the median wall time
# and all the times. Fails if the command fails.
time_runs() {
    local n=$1 i t0 t1
    shift
    local times=()
    for ((i = 0; i < n; i++)); do
        t0=$(now)
        "$@" > /dev/null 2>&1 || die "failed: $*"
        t1=$(now)
        times+=("$(awk -v a="$t0" -v b="$t1" 'BEGIN { printf "%.4f", b - a }')")
    done
    echo "$(median_of "${times[@]}") ${times[*]}"
}

cat_file() { cat "$1" > /dev/null; }

# bench_raw FILE [--reuse-memory]: bench_raw times itself (only read_raw, not process
# start); prints its median, its allocation baseline and the checksum.
bench() {
    local out l
    out=$("$bench_raw" "$@" --runs "$fast_runs") || die "bench_raw failed on $1"
    while IFS= read -r l; do echo "    $l"; done <<< "$out" >&2
    local line
    line=$(grep '^RESULT ' <<< "$out")
    local med alloc sum
    med=$(sed -n 's/.* median_s=\([^ ]*\).*/\1/p' <<< "$line")
    alloc=$(sed -n 's/.* alloc_s=\([^ ]*\).*/\1/p' <<< "$line")
    sum=$(sed -n 's/.* checksum=\([^ ]*\).*/\1/p' <<< "$line")
    echo "$med $alloc $sum"
}

# ---- measurements -----------------------------------------------------------------------------

size_mb() { awk -v b="$(stat -c %s "$1")" 'BEGIN { printf "%.1f", b / 1e6 }'; }
bin_mb=$(size_mb "$bin")
asc_mb=$(size_mb "$asc")

echo "== warming the page cache: reading each file once before timing"
cat "$bin" "$asc" > /dev/null
if command -v fincore > /dev/null; then
    fincore "$bin" "$asc" | sed 's/^/    /'
fi

echo "== machine: $(nproc) cores, load average $(cut -d' ' -f1-3 /proc/loadavg); ngspice: $("$ngspice" -v 2>&1 | grep -o 'ngspice-[0-9.]*' | head -n 1)"
echo "== timing (median of $fast_runs runs for cat and bench_raw, $slow_runs for ngspice)"

read -r cat_start cat_start_all <<< "$(time_runs "$fast_runs" cat_file /dev/null)"
read -r cat_bin cat_bin_all <<< "$(time_runs "$fast_runs" cat_file "$bin")"
read -r cat_asc cat_asc_all <<< "$(time_runs "$fast_runs" cat_file "$asc")"
echo "  cat startup (/dev/null): $cat_start_all"
echo "  cat binary: $cat_bin_all"
echo "  cat ascii:  $cat_asc_all"
echo "  bench_raw binary:"
read -r our_bin alloc_bin sum_bin <<< "$(bench "$bin")"
echo "  bench_raw ascii:"
read -r our_asc alloc_asc sum_asc <<< "$(bench "$asc")"
echo "  bench_raw binary --reuse-memory:"
read -r reuse_bin _ _ <<< "$(bench "$bin" --reuse-memory)"
echo "  bench_raw ascii --reuse-memory:"
read -r reuse_asc _ _ <<< "$(bench "$asc" --reuse-memory)"
read -r ng_start ng_start_all <<< "$(time_runs "$slow_runs" "$ngspice" -b "$empty_deck")"
read -r ng_bin ng_bin_all <<< "$(time_runs "$slow_runs" "$ngspice" -b "$bin.load.cir")"
read -r ng_asc ng_asc_all <<< "$(time_runs "$slow_runs" "$ngspice" -b "$asc.load.cir")"
echo "  ngspice startup:     $ng_start_all"
echo "  ngspice load binary: $ng_bin_all"
echo "  ngspice load ascii:  $ng_asc_all"

[[ $sum_bin == "$sum_asc" ]] && sums="equal" || sums="DIFFERENT"
echo "  checksums: binary $sum_bin, ascii $sum_asc ($sums)"

# ---- report -----------------------------------------------------------------------------------

awk -v bin_mb="$bin_mb" -v asc_mb="$asc_mb" \
    -v cat_start="$cat_start" -v cat_bin="$cat_bin" -v cat_asc="$cat_asc" \
    -v our_bin="$our_bin" -v our_asc="$our_asc" -v alloc_bin="$alloc_bin" -v alloc_asc="$alloc_asc" \
    -v reuse_bin="$reuse_bin" -v reuse_asc="$reuse_asc" \
    -v ng_start="$ng_start" -v ng_bin="$ng_bin" -v ng_asc="$ng_asc" '
function row(what, mb, s) { printf "  %-40s %9.3f s %9.1f MB/s\n", what, s, mb / s }
function ratio(what, a, b, target) { printf "  %-58s %7.2f x   %s\n", what, a / b, target }
BEGIN {
    ng_bin_c = ng_bin - ng_start; ng_asc_c = ng_asc - ng_start
    cat_bin_c = cat_bin - cat_start; cat_asc_c = cat_asc - cat_start
    print ""
    printf "== results (binary %.1f MB, ascii %.1f MB; warm page cache; medians)\n", bin_mb, asc_mb
    printf "  %-40s %9.3f s\n", "cat startup (cat /dev/null)", cat_start
    row("cat binary (whole process)", bin_mb, cat_bin)
    row("cat ascii (whole process)", asc_mb, cat_asc)
    row("cat binary - startup", bin_mb, cat_bin_c)
    row("cat ascii - startup", asc_mb, cat_asc_c)
    row("read_raw binary (bench_raw)", bin_mb, our_bin)
    row("read_raw ascii (bench_raw)", asc_mb, our_asc)
    row("  of which allocating output, binary", bin_mb, alloc_bin)
    row("  of which allocating output, ascii", asc_mb, alloc_asc)
    row("read_raw binary, memory reused", bin_mb, reuse_bin)
    row("read_raw ascii, memory reused", asc_mb, reuse_asc)
    printf "  %-40s %9.3f s\n", "ngspice startup (empty control block)", ng_start
    row("ngspice load binary (whole process)", bin_mb, ng_bin)
    row("ngspice load ascii (whole process)", asc_mb, ng_asc)
    row("ngspice load binary - startup", bin_mb, ng_bin_c)
    row("ngspice load ascii - startup", asc_mb, ng_asc_c)
    print ""
    print "== ratios"
    ratio("binary: read_raw / cat", our_bin, cat_bin, (our_bin / cat_bin <= 3 ? "ok" : "MISSED") " (target <= 3)")
    ratio("binary: read_raw / (cat - startup)", our_bin, cat_bin_c, (our_bin / cat_bin_c <= 3 ? "ok" : "MISSED") " (target <= 3)")
    ratio("binary: (read_raw - allocating output) / (cat - startup)", our_bin - alloc_bin, cat_bin_c, "(reader work only)")
    ratio("binary: read_raw, memory reused / (cat - startup)", reuse_bin, cat_bin_c, "(reader work only)")
    ratio("ascii:  read_raw / (cat - startup)", our_asc, cat_asc_c, "")
    ratio("ascii:  ngspice load / read_raw", ng_asc, our_asc, (ng_asc / our_asc >= 10 ? "ok" : "MISSED") " (target >= 10)")
    ratio("ascii:  (ngspice load - startup) / read_raw", ng_asc_c, our_asc, (ng_asc_c / our_asc >= 10 ? "ok" : "MISSED") " (target >= 10)")
    ratio("binary: ngspice load / read_raw", ng_bin, our_bin, "")
    ratio("binary: (ngspice load - startup) / read_raw", ng_bin_c, our_bin, "")
    ratio("ascii:  ngspice load / read_raw, memory reused", ng_asc, reuse_asc, "")
    ratio("read_raw: ascii / binary", our_asc, our_bin, "")
}'
