#!/usr/bin/env bash
# `cpack -G DEB` from the build folder, then the .deb as Debian's tools see it: dpkg-deb's
# fields (Depends holds ngspice and the package of every shared library the executable
# needs, as ldd and dpkg's database name them), installed by dpkg into a clean root
# (`dpkg --root` with an empty database: no chroot or container is needed, and the
# executable then runs with the host's libraries), and the installed executable's
# --version and the review of the installed sample.
# Usage: test_deb_package.sh BUILD_DIR SOURCE_DIR
set -euo pipefail
build=$(cd "$1" && pwd) source=$(cd "$2" && pwd)
for tool in cpack dpkg dpkg-deb dpkg-shlibdeps ldd; do
  command -v "$tool" > /dev/null || { echo "$tool is missing (.ci/setup installs dpkg-dev)"; exit 1; }
done
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cpack -G DEB --config "$build/CPackConfig.cmake" -B "$tmp/out" > "$tmp/cpack.log" 2>&1 ||
  { cat "$tmp/cpack.log"; exit 1; }
deb=$(ls "$tmp"/out/mirrorcheck_*.deb)
dpkg-deb --info "$deb"
depends=$(dpkg-deb --field "$deb" Depends)
description=$(dpkg-deb --field "$deb" Description)
[ -n "$description" ] || { echo "no Description"; exit 1; }

# Depends: ngspice, and the package of each library ldd resolves for the built executable
packages() { tr ',' '\n' <<< "$1" | sed 's/(.*)//; s/|.*//; s/ //g' | sed '/^$/d'; }
packages "$depends" | grep -qx ngspice || { echo "Depends lacks ngspice: $depends"; exit 1; }
while read -r lib; do
  owner=$(dpkg -S "$lib" 2> /dev/null || dpkg -S "$(readlink -f "$lib")" 2> /dev/null || dpkg -S "/usr$lib" 2> /dev/null) ||
    { echo "no package owns $lib"; exit 1; }
  pkg=${owner%%:*}
  packages "$depends" | grep -qx "$pkg" || { echo "Depends lacks $pkg (for $lib): $depends"; exit 1; }
  echo "needs $lib from $pkg: in Depends"
done < <(ldd "$build/mirrorcheck" | awk '$2 == "=>" && $3 ~ /^\// && $1 !~ /^ld-linux/ {print $3}')

# a clean root: an empty dpkg database; the dependencies are not in it, so they are forced
root=$tmp/root
mkdir -p "$root/var/lib/dpkg/info" "$root/var/lib/dpkg/updates"
: > "$root/var/lib/dpkg/status"
force=(--force-depends)
[ "$(id -u)" = 0 ] || force+=(--force-not-root)
dpkg --root="$root" --log=/dev/null "${force[@]}" -i "$deb" > "$tmp/dpkg.log" 2>&1 || { cat "$tmp/dpkg.log"; exit 1; }
dpkg --root="$root" --status mirrorcheck | grep -qx 'Status: install ok installed'
for f in usr/bin/mirrorcheck usr/share/man/man1/mirrorcheck.1.gz usr/share/bash-completion/completions/mirrorcheck \
         usr/share/doc/mirrorcheck/README.md usr/share/doc/mirrorcheck/examples/tamarack/bias.cir; do
  dpkg --root="$root" --listfiles mirrorcheck | grep -qx "/$f" || { echo "not in the package: /$f"; exit 1; }
  [ -f "$root/$f" ] || { echo "not installed: /$f"; exit 1; }
done

"$root/usr/bin/mirrorcheck" --version
[ "$("$root/usr/bin/mirrorcheck" --version)" = "$("$build/mirrorcheck" --version)" ]
cp -r "$root/usr/share/doc/mirrorcheck/examples/tamarack" "$tmp/tamarack"
cd "$tmp/tamarack"
status=0
"$root/usr/bin/mirrorcheck" review bias.cir --op bias_op.raw > review.txt || status=$?
[ "$status" = 1 ] || { echo "the sample review exited $status, expected 1 (the tail's error finding)"; exit 1; }
diff <(tail -n +2 review.txt) <(tail -n +2 "$source/samples/tamarack/expected/review.txt")
echo "$(basename "$deb") installed into a clean root: ok"
