#!/usr/bin/env bash
# Stops the one-node SLURM cluster that .ci/slurm-up.sh started and removes its temporary folder.
# Leaves munged and the installed packages alone unless WATCHER_SLURM_STOP_MUNGE=1.
set -uo pipefail

DIR=${WATCHER_SLURM_DIR:-/tmp/watcher-slurm}
MARK="# written by watcher .ci/slurm-up.sh"
say() { echo "slurm-down: $*"; }

stop_pidfile() {
    local name=$1 file=$2 pid i
    [ -s "$file" ] || return 0
    pid=$(cat "$file")
    kill -0 "$pid" 2>/dev/null || return 0
    say "stopping $name (pid $pid)"
    kill -TERM "$pid" 2>/dev/null
    for i in $(seq 1 50); do
        kill -0 "$pid" 2>/dev/null || return 0
        sleep 0.2
    done
    say "$name did not stop within 10 s; sending KILL"
    kill -KILL "$pid" 2>/dev/null
}

if [ -f "$DIR/slurm.conf" ]; then
    export SLURM_CONF="$DIR/slurm.conf"
    scancel --user=root >/dev/null 2>&1 || true
fi
stop_pidfile slurmd "$DIR/slurmd.pid"
stop_pidfile slurmctld "$DIR/slurmctld.pid"
if [ "${WATCHER_SLURM_STOP_MUNGE:-0}" = 1 ] && [ -s /run/munge/munged.pid ]; then
    stop_pidfile munged /run/munge/munged.pid
fi
if [ -f /etc/slurm/slurm.conf ] && head -n1 /etc/slurm/slurm.conf | grep -qF "$MARK"; then
    rm -f /etc/slurm/slurm.conf
fi
rm -rf "$DIR"
say "done"
