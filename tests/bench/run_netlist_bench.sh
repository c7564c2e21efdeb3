#!/usr/bin/env bash
# Benchmarks the netlist reader (read, includes, flatten) against ngspice reading the same
# deck and against `cat`, on a generated flat netlist of a million elements and on a
# hierarchical one (1,000 instances of a 1,000-element subcircuit). See README.md.
#
# Environment (all optional):
#   BENCH_BLOCKS=250000    mirror blocks of the flat deck (4 elements each: I, M, M, V)
#   BENCH_FAST_RUNS=3      runs of the fast measurements (cat, bench_netlist)
#   BENCH_SLOW_RUNS=1      runs of ngspice
#   BENCH_NETLIST_EXE=path use this bench_netlist instead of building one in build-bench/
#   NGSPICE=ngspice        the simulator
# The decks are kept in tests/bench/work/netlist-<blocks>/ and reused.
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
root=$(cd "$here/../.." && pwd)
blocks=${BENCH_BLOCKS:-250000}
fast_runs=${BENCH_FAST_RUNS:-3}
slow_runs=${BENCH_SLOW_RUNS:-1}
ngspice=${NGSPICE:-ngspice}
work="$here/work/netlist-$blocks"

die() { echo "run_netlist_bench.sh: $*" >&2; exit 1; }
for n in "$blocks" "$fast_runs" "$slow_runs"; do
    [[ $n =~ ^[1-9][0-9]*$ ]] || die "counts must be positive integers, got '$n'"
done
((blocks % 250 == 0)) || die "BENCH_BLOCKS must be a multiple of 250 (the subcircuit holds 250 blocks)"
command -v "$ngspice" > /dev/null || die "ngspice not found (set NGSPICE)"
[[ -x /usr/bin/time ]] || die "needs /usr/bin/time (Debian package time)"

if [[ -n ${BENCH_NETLIST_EXE:-} ]]; then
    bench=$(realpath "$BENCH_NETLIST_EXE")
    [[ -x $bench ]] || die "BENCH_NETLIST_EXE=$bench is not executable"
else
    echo "== building bench_netlist (Release) in $root/build-bench"
    cmake -S "$root" -B "$root/build-bench" -DCMAKE_BUILD_TYPE=Release > /dev/null
    cmake --build "$root/build-bench" --target bench_netlist -j2 > /dev/null
    bench="$root/build-bench/tests/bench/bench_netlist"
fi

mkdir -p "$work"
cd "$work"

# One block: a reference current into a diode-connected NMOS, an output NMOS, the output
# held by a source. The flat deck repeats it `blocks` times; the hierarchical deck puts 250
# blocks (1,000 elements) into a subcircuit and instantiates it blocks/250 times.
header() {
    echo "* $1"
    echo ".model nch nmos level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7"
    echo "vdd vdd 0 1.8"
}
block_lines() {  # block_lines COUNT
    awk -v n="$1" 'BEGIN { for (i = 0; i < n; ++i)
        printf "ir%d vdd g%d 20u\nma%d g%d g%d 0 0 nch w=4u l=1u\nmb%d o%d g%d 0 0 nch w=4u l=1u\nvo%d o%d 0 1.5\n", i, i, i, i, i, i, i, i, i, i }'
}
if [[ ! -s flat.cir || ! -s hier.cir ]]; then
    { header "flat: $blocks mirror blocks"; block_lines "$blocks"; echo ".end"; } > flat.cir
    {
        header "hierarchical: $((blocks / 250)) instances of a 1,000-element subcircuit"
        echo ".subckt blk vdd"
        block_lines 250
        echo ".ends blk"
        awk -v n="$((blocks / 250))" 'BEGIN { for (i = 0; i < n; ++i) printf "x%d vdd blk\n", i }'
        echo ".end"
    } > hier.cir
    echo "set num_threads=1" > .spiceinit
fi

seconds() { awk '/^elapsed/ { print $2 }' "$1"; }
peak_mb() { awk '/^peak/ { printf "%.0f", $2 / 1024 }' "$1"; }
timed() {  # timed OUT command...: wall seconds and peak RSS into OUT
    local out=$1; shift
    /usr/bin/time -f "elapsed %e
peak %M" -o "$out" "$@"
}
median() { sort -g | awk '{ a[NR] = $1 } END { print a[int((NR + 1) / 2)] }'; }
# ngspice -b exits 1 on a deck without analyses ("no simulations run") after reading it;
# an error while reading shows in its log.
ngspice_read_ok() { ! grep -qi "error" "$1" && grep -q "^Circuit:" "$1"; }
runs_of() {  # runs_of N NAME command...: median wall seconds of N runs; peak into NAME.peak
    local n=$1 name=$2; shift 2
    local times=() peak=0
    for ((r = 1; r <= n; ++r)); do
        if ! timed "$name.time" "$@" > "$name.out" 2>&1; then
            [[ $name == ngspice-* ]] && ngspice_read_ok "$name.out" || die "$name failed: $(tail -3 "$name.out")"
        fi
        times+=("$(seconds "$name.time")")
        local p; p=$(peak_mb "$name.time"); ((p > peak)) && peak=$p
    done
    echo "$peak" > "$name.peak"
    printf '%s\n' "${times[@]}" | median
}
ratio() { awk -v a="$1" -v b="$2" 'BEGIN { if (b <= 0) print "n/a"; else printf "%.2f", a / b }'; }

echo "load average: $(cut -d' ' -f1-3 /proc/loadavg)"
declare -A t_cat t_ng t_mc n_dev
for deck in flat hier; do
    t_cat[$deck]=$(runs_of "$fast_runs" "cat-$deck" cat "$deck.cir")
    t_ng[$deck]=$(runs_of "$slow_runs" "ngspice-$deck" "$ngspice" -b "$deck.cir")
    t_mc[$deck]=$(runs_of "$fast_runs" "reader-$deck" "$bench" "$deck.cir" --runs 1)
    n_dev[$deck]=$(sed -n 's/^RESULT devices=\([0-9]*\).*/\1/p' "reader-$deck.out")
    printf '%s: %s (%s kB), %s devices: cat %s s, ngspice %s s (peak %s MB), reader %s s (peak %s MB)\n' \
        "$deck" "$deck.cir" "$(( $(stat -c %s "$deck.cir") / 1024 ))" "${n_dev[$deck]}" "${t_cat[$deck]}" \
        "${t_ng[$deck]}" "$(cat "ngspice-$deck.peak")" "${t_mc[$deck]}" "$(cat "reader-$deck.peak")"
done
rate() { awk -v t="$1" -v n="$2" 'BEGIN { printf "%.3g", t / n * 1e6 }'; }
echo
echo "ratios (targets: ngspice / reader at least 10 for both decks; reader peak at most 300 MB for the flat deck;"
echo "        reader's time per device, hierarchical / flat, about 1):"
printf '  %-48s %s\n' "ngspice / reader, flat" "$(ratio "${t_ng[flat]}" "${t_mc[flat]}")"
printf '  %-48s %s\n' "ngspice / reader, hierarchical" "$(ratio "${t_ng[hier]}" "${t_mc[hier]}")"
printf '  %-48s %s\n' "reader / cat, flat" "$(ratio "${t_mc[flat]}" "${t_cat[flat]}")"
printf '  %-48s %s MB\n' "reader peak memory, flat" "$(cat reader-flat.peak)"
printf '  %-48s %s MB\n' "reader peak memory, hierarchical" "$(cat reader-hier.peak)"
printf '  %-48s %s\n' "us per device, flat / hierarchical" \
    "$(rate "${t_mc[flat]}" "${n_dev[flat]}") / $(rate "${t_mc[hier]}" "${n_dev[hier]}")"
printf '  %-48s %s\n' "time per device, hierarchical / flat" \
    "$(awk -v a="${t_mc[hier]}" -v na="${n_dev[hier]}" -v b="${t_mc[flat]}" -v nb="${n_dev[flat]}" 'BEGIN { printf "%.2f", (a / na) / (b / nb) }')"
