#!/usr/bin/env bash
# A real single-node Slurm in a folder, for tests and trials (see ../shared/design/FARM.md).
#   scripts/slurm-local.sh start DIR   writes DIR/slurm.conf, starts slurmctld and slurmd, waits for idle
#   scripts/slurm-local.sh stop DIR    stops them by their pid files
# Needs the Debian packages slurm-wlm (apt starts no services) and root. Prints the SLURM_CONF path.
set -euo pipefail
cmd=${1:?start or stop}
dir=$(realpath -m "${2:?folder}")
case "$cmd" in
start)
  if pgrep -x slurmctld >/dev/null || pgrep -x slurmd >/dev/null; then
    echo "a slurmctld or slurmd is already running on this machine (pids: $(pgrep -x 'slurmctld|slurmd' | tr '\n' ' ')); stop it first" >&2
    exit 1
  fi
  mkdir -p "$dir/state" "$dir/spool" "$dir/log"
  cpus=$(nproc)
  cat > "$dir/slurm.conf" <<CONF
ClusterName=straylight-test
SlurmctldHost=localhost
SlurmUser=root
SlurmdUser=root
AuthType=auth/none
CredType=cred/none
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
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
MpiDefault=none
ReturnToService=2
NodeName=localhost NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=1000 State=UNKNOWN
PartitionName=debug Nodes=localhost Default=YES MaxTime=INFINITE State=UP
CONF
  export SLURM_CONF="$dir/slurm.conf"
  /usr/sbin/slurmctld -f "$SLURM_CONF"
  /usr/sbin/slurmd -N localhost -f "$SLURM_CONF"
  for _ in $(seq 1 100); do
    state=$(sinfo -h -o %t 2>/dev/null || true)
    [ "$state" = "idle" ] && { echo "$SLURM_CONF"; exit 0; }
    sleep 0.2
  done
  echo "slurm did not come up (state: ${state:-none}); logs in $dir/log" >&2
  exit 1
  ;;
stop)
  for f in slurmd slurmctld; do
    if [ -f "$dir/$f.pid" ]; then
      pid=$(cat "$dir/$f.pid")
      kill "$pid" 2>/dev/null || true
      for _ in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    fi
  done
  ;;
*) echo "usage: $0 start|stop DIR" >&2; exit 2 ;;
esac
