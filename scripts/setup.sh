#!/usr/bin/env bash
# Installs what chernel needs on Debian 12 with Node 20: the Debian packages listed in
# .ci/apt-packages.txt (when missing, as root), the npm dependencies of every package folder, and the
# build. Safe to run again: it only does what is missing or stale.
set -euo pipefail
cd "$(dirname "$0")/.."

mapfile -t wanted < <(grep -v -e '^#' -e '^$' .ci/apt-packages.txt)
missing=()
for pkg in "${wanted[@]}"; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q 'install ok installed' || missing+=("$pkg")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing Debian packages: ${missing[*]}"
  SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update -q
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -q --no-install-recommends "${missing[@]}"
fi

for dir in . widgets lab; do
  if [ -f "$dir/package-lock.json" ]; then
    stamp="$dir/node_modules/.package-lock.json"
    if [ ! -f "$stamp" ] || [ "$dir/package-lock.json" -nt "$stamp" ]; then
      echo "setup: npm ci in $dir"
      (cd "$dir" && npm ci --no-audit --no-fund)
    fi
  fi
done

echo "setup: building"
npm run build --silent
[ -f widgets/package.json ] && (cd widgets && npm run build --silent) || true
[ -f lab/package.json ] && (cd lab && npm run build --silent) || true
echo "setup: done"
