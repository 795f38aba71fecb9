#!/usr/bin/env bash
# Installs what chernel needs on Debian 12 with Node 20 or 22: the Debian packages listed in
# .ci/apt-packages.txt (when missing, as root), the npm dependencies of every package folder (where
# node_modules is absent or incomplete: scripts/npm-deps.js checks every package of each lock), and
# the builds. Safe to run again, and after an interrupted run.
#   bash scripts/setup.sh            everything (`npm run setup`)
#   bash scripts/setup.sh --no-build  packages only (the first step of `npm start`, which then
#                                     builds only what is stale)
# Needs no npm package itself: it is what installs them.
set -euo pipefail
cd "$(dirname "$0")/.."
# The engines field of package.json: vite and vitest set the lower bounds (README, "Two commands").
node -e 'const [major, minor] = process.versions.node.split(".").map(Number);
  process.exit((major === 20 && minor >= 19) || (major === 22 && minor >= 12) || major > 22 ? 0 : 1)' ||
  { echo "setup: chernel needs Node 20.19 or newer, or 22.12 or newer; this is Node $(node --version)" >&2; exit 1; }
build=1
[ "${1:-}" = "--no-build" ] && build=0

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

node scripts/npm-deps.js . widgets lab

[ $build -eq 1 ] || exit 0
echo "setup: building"
npm run build --silent
(cd widgets && npm run build --silent)
(cd lab && npm run build --silent)
# Fresh outputs: `npm start` and the lab tests take these as up to date (lab/launch.ts) from their times.
rm -f widgets/dist/.inputs-stamp lab/build/.inputs-stamp
echo "setup: done"
