#!/usr/bin/env bash
# Start a single-node Slurm cluster on this machine (localhost, 2 CPUs): munged + slurmctld + slurmd.
# Needs root and the Debian packages slurm-wlm and munge (installed here when missing). Reuses
# daemons that already answer; the pids of those it starts go to $STATE/started.pids, so a caller
# can stop exactly those (and nothing else) when done.
set -euo pipefail
STATE=${XYLEMAP_SLURM_STATE:-/tmp/xylemap-slurm}
mkdir -p "$STATE"/{spool/ctld,spool/d,log,run}
STARTED="$STATE/started.pids"
: > "$STARTED"

if ! command -v slurmctld >/dev/null || ! command -v munged >/dev/null; then
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -q
  apt-get install -y -q slurm-wlm munge
fi

HOST=$(hostname -s)
CPUS=$(nproc)
# RealMemory in MB, a bit below the machine's, so slurmd does not drain the node.
MEM_MB=$(( $(awk '/MemTotal/ {print $2}' /proc/meminfo) / 1024 - 512 ))
CONF=/etc/slurm/slurm.conf
cat > "$CONF" <<CONF
# Minimal single-node cluster for xylemap's array-job test (written by ci/slurm/start-slurm.sh).
ClusterName=xylemap-ci
SlurmctldHost=$HOST
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SchedulerType=sched/backfill
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
StateSaveLocation=$STATE/spool/ctld
SlurmdSpoolDir=$STATE/spool/d
SlurmctldPidFile=$STATE/run/slurmctld.pid
SlurmdPidFile=$STATE/run/slurmd.pid
SlurmctldLogFile=$STATE/log/slurmctld.log
SlurmdLogFile=$STATE/log/slurmd.log
SlurmctldPort=6817
SlurmdPort=6818
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
MaxArraySize=10001
NodeName=$HOST CPUs=$CPUS RealMemory=$MEM_MB State=UNKNOWN
PartitionName=debug Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
CONF
# Process tracking without cgroups (proctrack/linuxproc, task/none): containers rarely allow cgroup
# writes. slurmd still loads a cgroup plugin at start; without a cgroup.conf it autodetects (v1 here).

# munge: a key readable only by its owner, and the daemon.
if [ ! -s /etc/munge/munge.key ]; then
  dd if=/dev/urandom bs=1 count=1024 of=/etc/munge/munge.key 2>/dev/null
fi
chown munge:munge /etc/munge/munge.key 2>/dev/null || true
chmod 400 /etc/munge/munge.key
mkdir -p /run/munge /var/log/munge /var/lib/munge
chown munge:munge /run/munge /var/log/munge /var/lib/munge 2>/dev/null || true
if ! munge -n </dev/null >/dev/null 2>&1; then
  if id munge >/dev/null 2>&1; then
    su -s /bin/sh munge -c 'munged' || munged --force
  else
    munged --force
  fi
  for i in $(seq 1 20); do [ -s /run/munge/munged.pid ] && break; sleep 0.2; done
  [ -s /run/munge/munged.pid ] && cat /run/munge/munged.pid >> "$STARTED"
fi
for i in $(seq 1 20); do munge -n </dev/null | unmunge >/dev/null 2>&1 && break; sleep 0.5; done
munge -n </dev/null | unmunge >/dev/null

if ! scontrol ping 2>/dev/null | grep -q UP; then
  slurmctld -f "$CONF"
  for i in $(seq 1 20); do [ -s "$STATE/run/slurmctld.pid" ] && break; sleep 0.2; done
  cat "$STATE/run/slurmctld.pid" >> "$STARTED"
fi
for i in $(seq 1 40); do scontrol ping 2>/dev/null | grep -q UP && break; sleep 0.5; done
if ! pgrep -x slurmd >/dev/null; then
  slurmd -f "$CONF"
  for i in $(seq 1 20); do [ -s "$STATE/run/slurmd.pid" ] && break; sleep 0.2; done
  cat "$STATE/run/slurmd.pid" >> "$STARTED"
fi
scontrol update nodename="$HOST" state=resume >/dev/null 2>&1 || true
for i in $(seq 1 60); do
  state=$(sinfo -h -o '%T' 2>/dev/null | head -1 || true)
  case "$state" in idle|mixed|allocated) break ;; esac
  sleep 0.5
done
state=$(sinfo -h -o '%T' 2>/dev/null | head -1 || true)
case "$state" in
  idle|mixed|allocated) echo "slurm: node $HOST is $state ($CPUS CPUs)" ;;
  *)
    echo "slurm: node did not come up (state '${state:-none}')" >&2
    tail -n 20 "$STATE/log/slurmctld.log" "$STATE/log/slurmd.log" >&2 || true
    exit 1
    ;;
esac
