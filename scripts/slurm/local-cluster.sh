#!/usr/bin/env bash
# A one-node Slurm cluster on this machine, for trying the job-array recipe and for
# the test that runs it (test/slurm/job-array.test.ts). Needs root and Debian's
# slurm-wlm and munge packages. Everything — munge key and socket, slurm.conf,
# state, spool, logs, pid files — lives in FOLDER, so nothing under /etc is changed.
#
#   scripts/slurm/local-cluster.sh start FOLDER   # prints: export SLURM_CONF=FOLDER/slurm.conf
#   scripts/slurm/local-cluster.sh stop FOLDER
#
# Client commands (sbatch, squeue, scancel) find the cluster through SLURM_CONF.
set -euo pipefail
action="${1:-}" folder="${2:-}"
if [[ -z "$folder" || ( "$action" != start && "$action" != stop ) ]]; then
  echo "local-cluster: usage: local-cluster.sh start|stop FOLDER" >&2
  exit 2
fi
mkdir -p "$folder"
folder="$(realpath "$folder")"

stop_daemon() {
  local pid_file="$1"
  [[ -s "$pid_file" ]] || return 0
  local pid
  pid="$(cat "$pid_file")"
  kill "$pid" 2>/dev/null || true
  for _ in $(seq 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
  kill -9 "$pid" 2>/dev/null || true
  rm -f "$pid_file"
}

if [[ "$action" == stop ]]; then
  stop_daemon "$folder/slurmd.pid"
  stop_daemon "$folder/slurmctld.pid"
  stop_daemon "$folder/munged.pid"
  exit 0
fi

for program in munged slurmctld slurmd sbatch; do
  command -v "$program" >/dev/null || { echo "local-cluster: $program not found; install it: apt-get install -y slurm-wlm munge" >&2; exit 1; }
done
[[ "$(id -u)" -eq 0 ]] || { echo "local-cluster: must run as root (the daemons run as root here)" >&2; exit 1; }

free_port() { node -e 'const s=require("net").createServer().listen(0,"127.0.0.1",()=>{console.log(s.address().port);s.close();});'; }
host="$(hostname -s)"
cpus="$(nproc)"
controller_port="$(free_port)"
node_port="$(free_port)"
while [[ "$node_port" == "$controller_port" ]]; do node_port="$(free_port)"; done
mkdir -p "$folder/state" "$folder/spool"
chmod 755 "$folder"

# munge refuses keys and sockets others could read or replace.
[[ -s "$folder/munge.key" ]] || { head -c 1024 /dev/urandom > "$folder/munge.key"; }
chmod 600 "$folder/munge.key"
munged --force --socket="$folder/munge.socket" --key-file="$folder/munge.key" \
  --log-file="$folder/munged.log" --pid-file="$folder/munged.pid" --seed-file="$folder/munged.seed"

cat > "$folder/slurm.conf" <<CONF
# One-node test cluster written by scripts/slurm/local-cluster.sh
ClusterName=rectboost-local
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$controller_port
SlurmdPort=$node_port
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$folder/munge.socket
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
MpiDefault=none
SchedulerType=sched/backfill
SchedulerParameters=sched_interval=1
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
StateSaveLocation=$folder/state
SlurmdSpoolDir=$folder/spool
SlurmctldPidFile=$folder/slurmctld.pid
SlurmdPidFile=$folder/slurmd.pid
SlurmctldLogFile=$folder/slurmctld.log
SlurmdLogFile=$folder/slurmd.log
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
KillWait=2
MinJobAge=600
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus State=UNKNOWN
PartitionName=local Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF="$folder/slurm.conf"
slurmctld -f "$SLURM_CONF" -i
slurmd -f "$SLURM_CONF"
for _ in $(seq 100); do
  if sinfo --noheader --states=idle --format=%n 2>/dev/null | grep -qx "$host"; then
    echo "export SLURM_CONF=$SLURM_CONF"
    exit 0
  fi
  sleep 0.2
done
echo "local-cluster: the node did not come up within 20 s; see $folder/slurmctld.log and $folder/slurmd.log" >&2
exit 1
