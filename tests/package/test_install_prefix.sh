#!/usr/bin/env bash
# `cmake --install BUILD --prefix PREFIX` into a temporary prefix: the files a Debian tool
# installs are where Debian puts them, man finds the page through the prefix, bash loads the
# completion, and the installed executable reviews the installed sample exactly as
# samples/tamarack/expected/review.txt says (that file is checked against the build tree by
# test_samples), and `prepare`'s printed hints run as printed. Usage: test_install_prefix.sh BUILD_DIR SOURCE_DIR
set -euo pipefail
build=$(cd "$1" && pwd) source=$(cd "$2" && pwd)
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
p=$tmp/prefix
cmake --install "$build" --prefix "$p" > "$tmp/install.log"
for f in bin/mirrorcheck share/man/man1/mirrorcheck.1.gz share/bash-completion/completions/mirrorcheck \
         share/doc/mirrorcheck/README.md share/doc/mirrorcheck/examples/tamarack/bias.cir \
         share/doc/mirrorcheck/examples/tamarack/bias_op.raw share/doc/mirrorcheck/examples/tamarack/waivers.txt; do
  [ -f "$p/$f" ] || { echo "not installed: $f"; cat "$tmp/install.log"; exit 1; }
done

version=$("$p/bin/mirrorcheck" --version)
echo "$version"
[[ $version =~ ^mirrorcheck\ [0-9]+\.[0-9]+\.[0-9]+\ \((revision\ [0-9a-f]{12}|unknown\ revision)\)$ ]] ||
  { echo "unexpected --version: $version"; exit 1; }

if command -v man > /dev/null; then
  # man-db looks the page up in the prefix's share/man, as it does under /usr/local
  found=$(MANPATH=$p/share/man man -w mirrorcheck)
  [ "$found" = "$p/share/man/man1/mirrorcheck.1.gz" ] || { echo "man -w found: $found"; exit 1; }
  MANPATH=$p/share/man MANWIDTH=80 man mirrorcheck 2> "$tmp/man.err" | grep -q '^EXIT STATUS' ||
    { echo "man mirrorcheck: no EXIT STATUS section"; cat "$tmp/man.err"; exit 1; }
else
  echo "man is not installed: the page's lookup is not checked (.ci/setup installs man-db)"
fi

# bash-completion loads share/bash-completion/completions/NAME on demand; the file must load
# alone and register its function.
bash --norc --noprofile -c "source '$p/share/bash-completion/completions/mirrorcheck' && complete -p mirrorcheck" |
  grep -q -- '-F _mirrorcheck mirrorcheck' || { echo "the installed completion registers nothing"; exit 1; }

cp -r "$p/share/doc/mirrorcheck/examples/tamarack" "$tmp/tamarack"
cd "$tmp/tamarack"
status=0
PATH=$p/bin:$PATH mirrorcheck review bias.cir --op bias_op.raw > review.txt || status=$?
[ "$status" = 1 ] || { echo "the sample review exited $status, expected 1 (the tail's error finding)"; exit 1; }
# the first line names the files as given; everything after it is the same review
diff <(tail -n +2 review.txt) <(tail -n +2 "$source/samples/tamarack/expected/review.txt")

# prepare's hints, run as printed (its indented command lines) with only the prefix's bin on
# top of PATH: ngspice writes the results, the installed mirrorcheck reviews them
PATH=$p/bin:$PATH mirrorcheck prepare bias.cir -o review/bias_review.cir > prepare.txt
grep -E '^  (cd|mirrorcheck) ' prepare.txt > hints.sh
grep -q '^  mirrorcheck review ' hints.sh || { echo "prepare names no mirrorcheck command:"; cat prepare.txt; exit 1; }
status=0
PATH=$p/bin:$PATH bash -e hints.sh > hints.log 2>&1 || status=$?
[ "$status" = 0 ] || [ "$status" = 1 ] || { echo "prepare's hints failed ($status):"; cat hints.sh hints.log; exit 1; }
grep -q '^fail: 1 of 8 outputs' hints.log || { echo "the hints' review is not the sample's:"; cat hints.log; exit 1; }
echo "installed under $p: ok"
