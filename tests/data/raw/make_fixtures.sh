#!/usr/bin/env bash
# Regenerates the raw-file fixtures of this folder. The well-formed ones come from
# ngspice itself (a three-plot run of a small level-1 mirror of our own); the odd and
# corrupt cases are edited copies of them, made by make_odd_fixtures.py. Run it from
# this folder; the checked-in files are what the tests read, so commit the result.
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cat > "$work/deck.cir" <<'DECK'
fixture deck: level-1 nmos mirror, three plots
.model nfix nmos level=1 vto=0.6 kp=120u lambda=0.04 gamma=0.45
vdd vdd 0 1.8
iref vdd g dc 25u
m1 g g 0 0 nfix w=3u l=1u
m2 out g 0 0 nfix w=3u l=1u m=2
vout out 0 dc 0.9 ac 1
.control
set num_threads=1
save all @m1[gm] @m2[gds] @m2[id] @m2[vds]
op
write three_plots.raw
set appendwrite
tf i(vout) vout
write three_plots.raw
ac dec 1 1 100
write three_plots.raw
unset appendwrite
set filetype=ascii
setplot op1
write three_plots_ascii.raw
set appendwrite
setplot tf1
write three_plots_ascii.raw
setplot ac1
write three_plots_ascii.raw
quit 0
.endc
.end
DECK
(cd "$work" && ngspice -b deck.cir > ngspice.log 2>&1)
cp "$work/three_plots.raw" "$work/three_plots_ascii.raw" "$here/"
python3 "$here/make_odd_fixtures.py" "$here"
