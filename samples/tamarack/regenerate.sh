#!/usr/bin/env bash
# Re-runs ngspice on the Tamarack TK-2 bias block (bias.cir) and rewrites the results
# shipped beside it:
#   bias_op.raw         binary: the operating point with every device parameter a review
#                       needs, then per mirror output one AC plot (only that output's probe
#                       driven, `alter`) and one .tf plot
#   bias_op_ascii.raw   the operating point alone, as ASCII
#   bias_show.txt       ngspice's `show all` listing at the operating point
# Usage: bash regenerate.sh [FOLDER]   (FOLDER defaults to this script's own; the tests
# write into a temporary one). Then rewrite the expected reports, from the project folder:
#   MIRRORCHECK_ACCEPT=1 ctest --test-dir build -R test_samples
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
out=$(cd "${1:-$here}" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cp "$here/bias.cir" "$work/"

mos="mn1 mn2 mn3 mn4 mn5 mn7 mn8 mn9 mn10 mn11 mp1 mp2 mp3 mp4 mp5"
bjt="q1 q2 q3 q4 q5 q6"
# Each output's probe: the voltage source holding it, or (pg) the current source into it.
probes="vtail iprobe_pg vchop vadc vexc vbg vdet vtrim"

saves=""
for m in $mos; do for p in id gm gds gmbs vdsat von vgs vds vbs; do saves+=" @$m[$p]"; done; done
for q in $bjt; do for p in ic ib gm gpi gmu go vbe vbc; do saves+=" @$q[$p]"; done; done
for v in $probes; do saves+=" @$v[acmag]"; done

{
  echo "* Tamarack TK-2 bias block: results for the mirrorcheck sample"
  echo ".include bias.cir"
  echo ".control"
  echo "set num_threads=1"
  echo "save all$saves"
  echo "op"
  echo "write bias_op.raw"
  echo "set filetype=ascii"
  echo "write bias_op_ascii.raw"
  echo "show all > bias_show.txt"
  echo "set filetype=binary"
  echo "set appendwrite"
  for v in $probes; do
    echo "alter @$v[acmag]=1"
    echo "ac dec 1 1 1k"
    echo "write bias_op.raw"
    echo "alter @$v[acmag]=0"
    if [ "$v" = iprobe_pg ]; then echo "tf v(pg) $v"; else echo "tf i($v) $v"; fi
    echo "write bias_op.raw"
  done
  echo "quit 0"
  echo ".endc"
  echo ".end"
} > "$work/run.cir"

(cd "$work" && ngspice -b run.cir > ngspice.log 2>&1) || { cat "$work/ngspice.log"; exit 1; }
cp "$work/bias_op.raw" "$work/bias_op_ascii.raw" "$work/bias_show.txt" "$out/"
echo "wrote bias_op.raw bias_op_ascii.raw bias_show.txt in $out"
