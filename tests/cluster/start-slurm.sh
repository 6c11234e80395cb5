#!/usr/bin/env bash
# Starts a one-node Slurm cluster on this machine for the job-array test of `ramulus fit`
# (crate-cli/tests/cluster.rs): installs Debian's slurm-wlm and munge when missing (as root or
# through sudo), writes a minimal configuration for this host, starts munged, slurmctld and
# slurmd. Does nothing when a cluster already answers. State lives under /tmp/ramulus-slurm.
# Stop it with: kill $(cat /tmp/ramulus-slurm/*.pid) $(pgrep -x munged)
set -euo pipefail
sudo=""
[[ "$(id -u)" != 0 ]] && sudo="sudo"
if command -v sinfo >/dev/null && timeout 5 sinfo -h >/dev/null 2>&1; then
  exit 0
fi
if ! command -v slurmctld >/dev/null; then
  $sudo apt-get update -qq
  $sudo env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq slurm-wlm munge >/dev/null
fi
host="$(hostname -s)"
state=/tmp/ramulus-slurm
$sudo mkdir -p "$state"/{state,spool,log} /etc/slurm /run/munge /var/log/munge /var/lib/munge /etc/munge
if [[ ! -f /etc/munge/munge.key ]]; then
  $sudo dd if=/dev/urandom bs=1 count=1024 of=/etc/munge/munge.key 2>/dev/null
fi
$sudo chown -R munge:munge /etc/munge /run/munge /var/log/munge /var/lib/munge
$sudo chmod 400 /etc/munge/munge.key
$sudo tee /etc/slurm/slurm.conf >/dev/null <<CONF
ClusterName=ramulus-test
SlurmctldHost=$host
SlurmUser=root
SlurmdUser=root
StateSaveLocation=$state/state
SlurmdSpoolDir=$state/spool
SlurmctldLogFile=$state/log/controller.log
SlurmdLogFile=$state/log/node.log
SlurmctldPidFile=$state/controller.pid
SlurmdPidFile=$state/node.pid
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
ReturnToService=2
MpiDefault=none
NodeName=$host CPUs=$(nproc) RealMemory=2000 State=UNKNOWN
PartitionName=main Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
pgrep -x munged >/dev/null || $sudo runuser -u munge -- /usr/sbin/munged
sleep 1
pgrep -x slurmctld >/dev/null || $sudo /usr/sbin/slurmctld
pgrep -x slurmd >/dev/null || $sudo /usr/sbin/slurmd
for _ in $(seq 1 30); do
  if timeout 5 sinfo -h -o '%T' 2>/dev/null | grep -qE 'idle|mixed|alloc'; then
    exit 0
  fi
  sleep 1
done
echo "start-slurm: the one-node cluster did not come up; see $state/log/" >&2
exit 1
