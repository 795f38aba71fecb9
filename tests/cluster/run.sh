#!/usr/bin/env bash
# The cluster layer: start a real single-node Slurm cluster (Debian's munge + slurm-wlm, as root),
# run tests/cluster/*.test.ts against it, stop it. About 2-3 minutes on an idle 2-core machine.
set -euo pipefail
cd "$(dirname "$0")/../.."
export CHERNEL_SLURM_DIR=${CHERNEL_SLURM_DIR:-/tmp/chernel-slurm-test-$$}
export CHERNEL_SLURM_PORT=${CHERNEL_SLURM_PORT:-16837}
trap 'tests/cluster/stop-slurm.sh' EXIT
eval "$(tests/cluster/start-slurm.sh)"
npx vitest run --config tests/cluster/vitest.config.ts "$@"
