#!/usr/bin/env bash
# Sources without git history (a release tarball, `git archive`): the build's revision
# script writes an empty revision, which --version shows as "unknown revision" and JSON as
# null, instead of failing the build. Usage: test_revision_unknown.sh BUILD_DIR SOURCE_DIR
set -euo pipefail
source=$(cd "$2" && pwd)
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
if command -v git > /dev/null && git -C "$tmp" rev-parse 2> /dev/null; then
  echo "skipped: the temporary folder $tmp lies inside a git checkout"
  exit 0
fi
# the build files as a tarball holds them, without .git
cp -r "$source/cmake" "$source/CMakeLists.txt" "$tmp/"
cmake -DSOURCE_DIR="$tmp" -DVERSION=9.8.7 -DOUTPUT="$tmp/revision.hpp" -P "$tmp/cmake/write_revision.cmake"
grep -qx '#define MIRRORCHECK_REVISION ""' "$tmp/revision.hpp" || { cat "$tmp/revision.hpp"; exit 1; }
grep -qx '#define MIRRORCHECK_VERSION "9.8.7"' "$tmp/revision.hpp"
# and a git checkout gives its 12-digit revision
command -v git > /dev/null && git -C "$source" rev-parse 2> /dev/null || { echo "ok (no git checkout here)"; exit 0; }
cmake -DSOURCE_DIR="$source" -DVERSION=9.8.7 -DOUTPUT="$tmp/checkout.hpp" -P "$source/cmake/write_revision.cmake"
grep -Eqx "#define MIRRORCHECK_REVISION \"$(git -C "$source" rev-parse --short=12 HEAD)\"" "$tmp/checkout.hpp" ||
  { cat "$tmp/checkout.hpp"; exit 1; }
echo ok
