#!/usr/bin/env bash
# Re-runs the Tamarack TK-2 common-mode buffer (tk2_vcm.spice) through its own control
# block, as its designer runs it, and ships what that block writes:
#   tk2_vcm.raw   binary: the operating point of `save all` (node voltages, branch currents)
# The review itself needs more than this (every transistor's gm, gds, Vdsat, the probes):
# `mirrorcheck run tk2_vcm.spice` makes that in a temporary folder and writes nothing here.
# Usage: bash regenerate.sh [FOLDER]   (FOLDER defaults to this script's own; the tests
# write into a temporary one). Then rewrite the expected reports, from the project folder:
#   MIRRORCHECK_ACCEPT=1 ctest --test-dir build -R test_samples
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
out=$(cd "${1:-$here}" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cp "$here/tk2_vcm.spice" "$work/"
ln -s "$here/sky130" "$work/sky130"
echo "set num_threads=1" > "$work/.spiceinit"

# The deck's block ends without `quit` (a schematic tool's user runs it interactively), and
# ngspice -b then exits 1 even when all went well: judge the run by its log and its file.
(cd "$work" && ngspice -b tk2_vcm.spice > ngspice.log 2>&1) || true
if grep -qiE '^(error|.*simulation\(s\) aborted)' "$work/ngspice.log" || [ ! -s "$work/tk2_vcm.raw" ]; then
  cat "$work/ngspice.log"
  exit 1
fi
cp "$work/tk2_vcm.raw" "$out/"
echo "wrote tk2_vcm.raw in $out"
