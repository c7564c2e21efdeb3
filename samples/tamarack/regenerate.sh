#!/usr/bin/env bash
# Re-runs ngspice on the Tamarack bias block and rewrites the shipped results:
# bias_op.raw (binary op plot with the device parameters a review needs),
# bias_op_ascii.raw (the same, ASCII) and bias_show.txt (ngspice's `show all`).
set -euo pipefail
cd "$(dirname "$0")"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
params="id gm gds vdsat vgs vds vbs"
saves=""
for m in mn1 mn2 mn3 mn4 mn5 mp1 mp2; do for p in $params gmbs von; do saves+=" @$m[$p]"; done; done
for q in q1 q2; do for p in ic ib gm gpi gmu go vbe vbc; do saves+=" @$q[$p]"; done; done
cat > "$work/run.cir" <<DECK
* Tamarack TK-2 bias block: results for the mirrorcheck samples
.include $(pwd)/bias.cir
.control
set num_threads=1
save all $saves
op
write bias_op.raw
set filetype=ascii
write bias_op_ascii.raw
show all > bias_show.txt
quit 0
.endc
DECK
(cd "$work" && ngspice -b run.cir > ngspice.log 2>&1) || { cat "$work/ngspice.log"; exit 1; }
cp "$work/bias_op.raw" "$work/bias_op_ascii.raw" "$work/bias_show.txt" .
echo "wrote bias_op.raw bias_op_ascii.raw bias_show.txt"
