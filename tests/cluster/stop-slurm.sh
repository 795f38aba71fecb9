#!/usr/bin/env bash
# Stop the test cluster started by start-slurm.sh (by the pids it recorded) and remove its folder.
set -uo pipefail
dir=${CHERNEL_SLURM_DIR:-/tmp/chernel-slurm}
[ -d "$dir" ] || exit 0
if [ -f "$dir/slurm.conf" ] && command -v scancel >/dev/null; then
  SLURM_CONF=$dir/slurm.conf timeout 5 scancel --full --quiet -u root 2>/dev/null || true
fi
for name in slurmd slurmctld munge/munged; do
  pidfile=$dir/$name.pid
  [ -f "$pidfile" ] || continue
  pid=$(cat "$pidfile")
  kill "$pid" 2>/dev/null || continue
  for _ in $(seq 1 40); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
  kill -9 "$pid" 2>/dev/null || true
done
rm -rf "$dir"
