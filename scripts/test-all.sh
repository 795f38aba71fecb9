#!/usr/bin/env bash
# Every test layer, in order; stops at the first failing layer. Run `npm run setup` first.
set -euo pipefail
cd "$(dirname "$0")/.."
export CHERNEL_ARTIFACTS="${CHERNEL_ARTIFACTS:-$PWD/test-artifacts}"
mkdir -p "$CHERNEL_ARTIFACTS"

# CHERNEL_LAYERS=engine,browser runs only the named layers (default: all).
ran=0
layer() {
  local name="$1"; shift
  [[ -z "${CHERNEL_LAYERS:-}" || ",$CHERNEL_LAYERS," == *",$name,"* ]] || return 0
  ran=$((ran + 1))
  echo "=== $name: $*"
  local start=$SECONDS
  "$@"
  echo "=== $name passed in $((SECONDS - start)) s"
}

# Each part builds alone against the parts it may import (project references): a forbidden import fails.
layer typecheck npm run typecheck --silent
# The engine's own project declares no Node and no DOM: anything host-specific in src/ fails to build.
layer engine-purity npx tsc -b src
layer engine npx vitest run
# Real Chromium against the lab (lab/) and real kernels; ~1-2 min, most of it builds and start-ups.
layer lab-typecheck npx tsc -p lab/tsconfig.json
layer browser npx vitest run -c vitest.browser.config.ts
layer kernel /usr/bin/python3 -m unittest discover -s tests/kernel -p 'test_*.py'
# A real single-node Slurm cluster (root; munge + slurm-wlm): sweep job arrays, merges, a killed shard; ~2-3 min.
layer cluster bash tests/cluster/run.sh
# Keep last: a CHERNEL_LAYERS naming no layer is a mistake, not a pass.
[[ $ran -gt 0 ]] || { echo "test-all: CHERNEL_LAYERS=$CHERNEL_LAYERS names no layer" >&2; exit 1; }
