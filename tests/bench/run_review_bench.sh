#!/usr/bin/env bash
# Benchmarks `mirrorcheck review` on a generated bias network against ngspice's own
# operating-point run of the same deck, measured in the same run. See README.md.
#
# Environment (all optional):
#   BENCH_BLOCKS=2500      NMOS standard cascode mirror blocks (4 transistors each)
#   BENCH_RUNS=3           runs of each mirrorcheck measurement (the median is reported)
#   MIRRORCHECK=path       the mirrorcheck executable (default: build-bench/mirrorcheck, built here)
#   NGSPICE=ngspice        the simulator
# The decks and results are kept in tests/bench/work/review-<blocks>/ and reused; delete
# the folder to run ngspice again.
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
root=$(cd "$here/../.." && pwd)
blocks=${BENCH_BLOCKS:-2500}
runs=${BENCH_RUNS:-3}
ngspice=${NGSPICE:-ngspice}
work="$here/work/review-$blocks"

die() { echo "run_review_bench.sh: $*" >&2; exit 1; }
[[ $blocks =~ ^[1-9][0-9]*$ && $runs =~ ^[1-9][0-9]*$ ]] || die "counts must be positive integers"
command -v "$ngspice" > /dev/null || die "ngspice not found (set NGSPICE)"
[[ -x /usr/bin/time ]] || die "needs /usr/bin/time (Debian package time)"

if [[ -z ${MIRRORCHECK:-} ]]; then
    cmake -S "$root" -B "$root/build-bench" -DCMAKE_BUILD_TYPE=Release > /dev/null
    cmake --build "$root/build-bench" --target mirrorcheck -j2 > /dev/null
    MIRRORCHECK="$root/build-bench/mirrorcheck"
fi
mkdir -p "$work"
cd "$work"

# The circuit: each block an ideal reference current, a standard cascode mirror (m<i>a and
# m<i>c the reference stack, m<i>b and m<i>d the output), the output held by a source.
gen_netlist() {
    echo "* $blocks NMOS standard cascode mirrors"
    echo ".model nch nmos level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7"
    echo "vdd vdd 0 1.8"
    awk -v n="$blocks" 'BEGIN { for (i = 0; i < n; ++i) {
        printf "iref%d vdd t%d 20u\nm%dc t%d t%d r%d 0 nch w=4u l=1u\nm%da r%d r%d 0 0 nch w=4u l=1u\n", i, i, i, i, i, i, i, i, i
        printf "m%db x%d r%d 0 0 nch w=4u l=1u\nm%dd o%d t%d x%d 0 nch w=4u l=1u\nvo%d o%d 0 1.5\n", i, i, i, i, i, i, i, i, i } }'
}
params="id vgs vds vbs von vdsat gm gds gmbs cgs cgd cgb cbd cbs gbd gbs"
# Every transistor's parameters saved, as `mirrorcheck prepare` saves them.
gen_saves() {
    awk -v n="$blocks" -v p="$params" 'BEGIN { k = split(p, q, " ")
        for (i = 0; i < n; ++i) { split("a b c d", s, " ")
            for (j = 1; j <= 4; ++j) { line = "save"; for (m = 1; m <= k; ++m) line = line sprintf(" @m%d%s[%s]", i, s[j], q[m]); print line } } }'
}
if [[ ! -s op.raw || ! -s bare.raw || ! -s show.log ]]; then
    gen_netlist > blocks.cir
    echo ".end" >> blocks.cir
    { gen_netlist; echo ".control"; echo "save all"; gen_saves; echo "op"; echo "write op.raw"; echo "quit 0"; echo ".endc"; echo ".end"; } > op.cir
    { gen_netlist; echo ".control"; echo "save all"; echo "op"; echo "write bare.raw"; echo "quit 0"; echo ".endc"; echo ".end"; } > bare.cir
    { gen_netlist; echo ".control"; echo "op"; echo "show m : $params"; echo "quit 0"; echo ".endc"; echo ".end"; } > show.cir
    echo "set num_threads=1" > .spiceinit
fi

seconds() { awk '/^elapsed/ { print $2 }' "$1"; }
peak_kb() { awk '/^peak/ { print $2 }' "$1"; }
timed() {  # timed OUT -- command...: wall seconds and peak RSS into OUT
    local out=$1; shift 2
    /usr/bin/time -f "elapsed %e
peak %M" -o "$out" "$@"
}
median() { sort -g | awk '{ a[NR] = $1 } END { print a[int((NR + 1) / 2)] }'; }

echo "load average: $(cut -d' ' -f1-3 /proc/loadavg); $blocks blocks, $((4 * blocks)) transistors"
if [[ ! -s ngspice-op.time ]]; then
    echo "ngspice: op run, every transistor's parameters saved (slow: ngspice's save grows with the square of the vectors)"
    timed ngspice-op.time -- "$ngspice" -b op.cir > op.log 2>&1 || die "ngspice failed on op.cir (see $work/op.log)"
    timed ngspice-bare.time -- "$ngspice" -b bare.cir > bare.log 2>&1 || die "ngspice failed on bare.cir"
    timed ngspice-show.time -- "$ngspice" -b show.cir > show.log 2>&1 || die "ngspice failed on show.cir"
fi
ng_op=$(seconds ngspice-op.time); ng_bare=$(seconds ngspice-bare.time); ng_show=$(seconds ngspice-show.time)
raw_mb=$(awk -v b="$(stat -c %s op.raw)" 'BEGIN { printf "%.1f", b / 1e6 }')

measure() {  # measure NAME args...: median wall time, and the largest peak, of `runs` runs
    local name=$1; shift
    local times=() peak=0
    for ((r = 1; r <= runs; ++r)); do
        timed "$name.time" -- "$MIRRORCHECK" "$@" > "$name.out" 2> "$name.err" || [[ $? == 1 ]] || die "$name failed: $(head -3 "$name.err")"
        times+=("$(seconds "$name.time")")
        local p; p=$(peak_kb "$name.time"); ((p > peak)) && peak=$p
    done
    printf '%s\n' "${times[@]}" | median > "$name.median"
    echo "$peak" > "$name.peak"
    echo "  $name: runs ${times[*]} s, peak $((peak / 1024)) MB, output $(stat -c %s "$name.out") bytes"
}
echo "mirrorcheck ($MIRRORCHECK):"
measure review-json review blocks.cir --op op.raw --format json
measure review-table review blocks.cir --op op.raw
measure review-show review blocks.cir --op show.log --format json

ratio() { awk -v a="$1" -v b="$2" 'BEGIN { printf "%.3f", a / b }'; }
json_s=$(cat review-json.median); table_s=$(cat review-table.median); show_s=$(cat review-show.median)
json_mb=$(awk -v k="$(cat review-json.peak)" 'BEGIN { printf "%.1f", k / 1024 }')
outputs=$blocks
echo
printf '%-52s %10s\n' "measurement" "value"
printf '%-52s %10s\n' "ngspice op run, parameters saved (s)" "$ng_op"
printf '%-52s %10s\n' "ngspice op run, node voltages only (s)" "$ng_bare"
printf '%-52s %10s\n' "ngspice op run with a show listing (s)" "$ng_show"
printf '%-52s %10s\n' "review --format json of op.raw (s)" "$json_s"
printf '%-52s %10s\n' "review, table (s)" "$table_s"
printf '%-52s %10s\n' "review --format json of the show listing (s)" "$show_s"
printf '%-52s %10s\n' "op.raw (MB)" "$raw_mb"
printf '%-52s %10s\n' "review --format json peak memory (MB)" "$json_mb"
printf '%-52s %10s\n' "JSON bytes per output" "$(( $(stat -c %s review-json.out) / outputs ))"
echo
echo "ratios (targets: review / ngspice op run at most 0.05; peak / op.raw at most 10):"
printf '  %-50s %s\n' "review json / ngspice op run (saved)" "$(ratio "$json_s" "$ng_op")"
printf '  %-50s %s\n' "review json / ngspice op run (node voltages only)" "$(ratio "$json_s" "$ng_bare")"
printf '  %-50s %s\n' "(ngspice show run + review of it) / ngspice op run (saved)" \
    "$(awk -v a="$ng_show" -v b="$show_s" -v c="$ng_op" 'BEGIN { printf "%.3f", (a + b) / c }')"
printf '  %-50s %s\n' "review json peak / op.raw size" "$(ratio "$json_mb" "$raw_mb")"
