#!/usr/bin/env bash
# Bring up a throwaway single-node Slurm cluster on this machine (Debian's munge + slurm-wlm):
# munged, slurmctld and slurmd as root, all state, logs, sockets and configuration in one folder.
# Nothing under /etc is touched; clients find the cluster through SLURM_CONF.
#
#   eval "$(tests/cluster/start-slurm.sh)"     # prints `export SLURM_CONF=...` on stdout
#   sbatch --array=0-3 --wrap hostname
#   tests/cluster/stop-slurm.sh
#
# CHERNEL_SLURM_DIR picks the folder (default /tmp/chernel-slurm), CHERNEL_SLURM_PORT the
# controller port (slurmd uses the next one). Needs root (SlurmUser=root).
set -euo pipefail

dir=${CHERNEL_SLURM_DIR:-/tmp/chernel-slurm}
port=${CHERNEL_SLURM_PORT:-16817}
host=$(hostname -s)
cpus=$(nproc)
say() { echo "start-slurm: $*" >&2; }

for tool in munged mungekey slurmctld slurmd sinfo; do
  command -v "$tool" >/dev/null || { say "$tool not found (apt-get install -y munge slurm-wlm)"; exit 2; }
done
[ "$(id -u)" = 0 ] || { say "must run as root"; exit 2; }

if [ -f "$dir/slurmctld.pid" ] && kill -0 "$(cat "$dir/slurmctld.pid")" 2>/dev/null; then
  say "already running in $dir"
  echo "export SLURM_CONF=$dir/slurm.conf"
  exit 0
fi

rm -rf "$dir"
mkdir -p "$dir/munge" "$dir/state" "$dir/spool" "$dir/log"
chmod 0700 "$dir" "$dir/munge"

# munge: a private key and socket, so the system's munged (if any) is left alone.
mungekey --create --keyfile="$dir/munge/munge.key" >/dev/null 2>&1 ||
  dd if=/dev/urandom of="$dir/munge/munge.key" bs=1 count=1024 status=none
chmod 0400 "$dir/munge/munge.key"
munged --key-file="$dir/munge/munge.key" --socket="$dir/munge/munge.socket" \
  --pid-file="$dir/munge/munged.pid" --log-file="$dir/log/munged.log" \
  --seed-file="$dir/munge/munged.seed" --force

mem=$(slurmd -C 2>/dev/null | sed -n 's/.*RealMemory=\([0-9]*\).*/\1/p' | head -1)
mem=$(( ${mem:-2048} * 9 / 10 ))

cat > "$dir/slurm.conf" <<CONF
ClusterName=chernel-test
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$port
SlurmdPort=$((port + 1))
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$dir/munge/munge.socket
StateSaveLocation=$dir/state
SlurmdSpoolDir=$dir/spool
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/log/slurmctld.log
SlurmdLogFile=$dir/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/backfill
SchedulerParameters=bf_interval=1,sched_min_interval=100000
MpiDefault=none
ReturnToService=2
SlurmctldTimeout=30
SlurmdTimeout=30
InactiveLimit=0
KillWait=5
MinJobAge=300
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF=$dir/slurm.conf

slurmctld -c -f "$SLURM_CONF"   # -c: fresh state, no jobs from an earlier run
slurmd -f "$SLURM_CONF"

# Wait for the node to register and become idle.
for _ in $(seq 1 60); do
  state=$(sinfo -h -N -o '%T' 2>/dev/null | head -1 || true)
  case "$state" in
    idle) say "node $host idle ($cpus CPUs), SLURM_CONF=$SLURM_CONF"; echo "export SLURM_CONF=$SLURM_CONF"; exit 0 ;;
  esac
  sleep 0.5
done
say "node did not become idle (state: ${state:-none}); logs in $dir/log"
tail -n 20 "$dir/log/slurmctld.log" "$dir/log/slurmd.log" >&2 || true
exit 1
