#!/usr/bin/env bash
# Brings up a one-node SLURM cluster on this machine for the integration tests (run as root).
#
# - Installs Debian's slurmctld, slurmd, slurm-client and munge, but only those whose commands are missing.
# - Writes a slurm.conf owned by this project, with every state, spool, pid and log file in one temporary
#   folder ($WATCHER_SLURM_DIR, default /tmp/watcher-slurm). The same file is put at /etc/slurm/slurm.conf
#   (so sbatch, squeue and scancel find it without SLURM_CONF) unless a foreign file is already there, in
#   which case the commands need SLURM_CONF=$WATCHER_SLURM_DIR/slurm.conf (printed at the end).
# - Creates a munge key when none exists, starts munged as user munge, then slurmctld and slurmd.
# - Waits, with a bound ($WATCHER_SLURM_WAIT seconds, default 90), until sinfo shows the node idle.
# .ci/slurm-down.sh stops what this started and removes the folder.
set -euo pipefail

DIR=${WATCHER_SLURM_DIR:-/tmp/watcher-slurm}
WAIT=${WATCHER_SLURM_WAIT:-90}
MARK="# written by watcher .ci/slurm-up.sh"
say() { echo "slurm-up: $*"; }

if [ "$(id -u)" -ne 0 ]; then
    say "must run as root (it installs packages and starts daemons)" >&2
    exit 1
fi

# 1. Packages, only when a command is missing.
missing=()
command -v slurmctld >/dev/null 2>&1 || missing+=(slurmctld)
command -v slurmd >/dev/null 2>&1 || missing+=(slurmd)
command -v sbatch >/dev/null 2>&1 || missing+=(slurm-client)
command -v munged >/dev/null 2>&1 || missing+=(munge)
if [ ${#missing[@]} -gt 0 ]; then
    say "installing ${missing[*]}"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -q
    # The packages' own service start-up is not wanted (no init system here, and we start them below).
    policy=/usr/sbin/policy-rc.d
    own_policy=0
    if [ ! -e "$policy" ]; then
        printf '#!/bin/sh\nexit 101\n' > "$policy"; chmod 755 "$policy"; own_policy=1
    fi
    apt-get install -y -q --no-install-recommends "${missing[@]}"
    [ "$own_policy" -eq 1 ] && rm -f "$policy"
fi

# 2. A project-owned configuration, its state in a temporary folder.
host=$(hostname -s)
cpus=$(nproc)
mkdir -p "$DIR/state" "$DIR/spool" "$DIR/log"
conf="$DIR/slurm.conf"
cat > "$conf" <<CONF
$MARK
ClusterName=watcher-ci
SlurmctldHost=$host
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
MpiDefault=none
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SchedulerType=sched/backfill
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
ReturnToService=2
# Short waits: tests stop jobs and expect them gone soon.
KillWait=5
MinJobAge=30
StateSaveLocation=$DIR/state
SlurmdSpoolDir=$DIR/spool/%n
SlurmctldPidFile=$DIR/slurmctld.pid
SlurmdPidFile=$DIR/slurmd.pid
SlurmctldLogFile=$DIR/log/slurmctld.log
SlurmdLogFile=$DIR/log/slurmd.log
NodeName=$host CPUs=$cpus State=UNKNOWN
PartitionName=main Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF="$conf"
mkdir -p /etc/slurm
if [ ! -e /etc/slurm/slurm.conf ] || head -n1 /etc/slurm/slurm.conf | grep -qF "$MARK"; then
    cp "$conf" /etc/slurm/slurm.conf
    say "configuration at /etc/slurm/slurm.conf (copy of $conf)"
else
    say "a foreign /etc/slurm/slurm.conf exists; left alone: export SLURM_CONF=$conf"
fi

# 3. munge: a key, then munged as user munge.
mkdir -p /etc/munge /run/munge /var/lib/munge /var/log/munge
if [ ! -s /etc/munge/munge.key ]; then
    say "creating a munge key"
    if command -v mungekey >/dev/null 2>&1; then
        mungekey --create --keyfile=/etc/munge/munge.key --force
    else
        dd if=/dev/urandom of=/etc/munge/munge.key bs=1024 count=1 status=none
    fi
fi
chown munge:munge /etc/munge/munge.key /etc/munge /run/munge /var/lib/munge /var/log/munge
chmod 0400 /etc/munge/munge.key
chmod 0700 /etc/munge
chmod 0755 /run/munge
if ! munge -n >/dev/null 2>&1; then
    say "starting munged"
    runuser -u munge -- /usr/sbin/munged --force
fi
munge -n | unmunge >/dev/null

# 4. The controller and the node daemon (each daemonizes).
if ! scontrol ping 2>/dev/null | grep -q UP; then
    say "starting slurmctld"
    /usr/sbin/slurmctld -f "$conf"
fi
if [ ! -s "$DIR/slurmd.pid" ] || ! kill -0 "$(cat "$DIR/slurmd.pid")" 2>/dev/null; then
    say "starting slurmd"
    /usr/sbin/slurmd -f "$conf"
fi

# 5. Wait, with a bound, until the node is idle.
deadline=$((SECONDS + WAIT))
while :; do
    state=$(sinfo -h -N -n "$host" -o '%t' 2>/dev/null | head -n1 || true)
    if [ "$state" = "idle" ]; then
        break
    fi
    if [ "$SECONDS" -ge "$deadline" ]; then
        say "node $host not idle after ${WAIT}s (state: '${state:-none}'); logs:" >&2
        tail -n 30 "$DIR/log/slurmctld.log" "$DIR/log/slurmd.log" >&2 || true
        exit 1
    fi
    sleep 1
done
say "node $host idle with $cpus CPUs (SLURM_CONF=$conf)"
sinfo
