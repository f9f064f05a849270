#!/usr/bin/env bash
# A private single-node Slurm on this machine for the cluster tests (as root, Debian's slurm-wlm and
# munge). `slurm.sh start` writes its own slurm.conf into its own state folder (never /etc/slurm),
# starts its own munged (own socket and key), slurmctld and slurmd on ports of their own, records
# their process ids, and waits until the node is idle. `slurm.sh stop` stops those processes only,
# by the ids it recorded; a machine's own Slurm and munge are left alone. The tests find the
# controller through $STATE/slurm.conf (SLURM_CONF) and check it is this one before any sbatch.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
state="${GLIDEPATH_SLURM_STATE:-/var/tmp/glidepath-slurm}"
conf="$state/slurm.conf"
socket="$state/munge/munge.socket"
# a daemon recorded in PIDFILE, alive and still the program NAME
alive() { local pid; pid="$(cat "$1" 2>/dev/null)" || return 1; [ -n "$pid" ] && [ "$(cat /proc/"$pid"/comm 2>/dev/null)" = "$2" ]; }
case "${1:-}" in
start)
  for p in slurmctld slurmd munged; do
    if alive "$state/$p.pid" "$p"; then echo "slurm: already running (from $state)"; exit 0; fi
  done
  mkdir -p "$state/ctld" "$state/d" "$state/munge"
  chmod 700 "$state/munge"
  [ -s "$state/munge/munge.key" ] || { dd if=/dev/urandom bs=1 count=1024 of="$state/munge/munge.key" 2>/dev/null; chmod 400 "$state/munge/munge.key"; }
  host="$(hostname -s)"
  mem=$(( $(awk '/MemTotal/ {print $2}' /proc/meminfo) / 1024 - 1024 ))
  sed -e "s|@HOST@|$host|g" -e "s|@CPUS@|$(nproc)|g" -e "s|@MEM@|$mem|g" -e "s|@STATE@|$state|g" -e "s|@SOCKET@|$socket|g" \
    "$here/slurm.conf.in" > "$conf"
  /usr/sbin/munged --force --socket="$socket" --key-file="$state/munge/munge.key" --pid-file="$state/munged.pid" \
    --log-file="$state/munged.log" --seed-file="$state/munge/munged.seed"
  /usr/sbin/slurmctld -f "$conf"
  /usr/sbin/slurmd -f "$conf"
  export SLURM_CONF="$conf"
  for _ in $(seq 1 60); do
    if sinfo -h -N -o '%t' 2>/dev/null | grep -qx 'idle'; then echo "slurm: $host idle (SLURM_CONF=$conf)"; exit 0; fi
    scontrol update nodename="$host" state=resume >/dev/null 2>&1 || true
    sleep 1
  done
  echo "slurm: the node did not become idle" >&2
  sinfo -N >&2 || true
  tail -n 20 "$state/slurmctld.log" "$state/slurmd.log" >&2 || true
  exit 1
  ;;
stop)
  for p in slurmd slurmctld munged; do
    if alive "$state/$p.pid" "$p"; then kill "$(cat "$state/$p.pid")"; fi
  done
  for _ in $(seq 1 20); do
    alive "$state/slurmd.pid" slurmd || alive "$state/slurmctld.pid" slurmctld || alive "$state/munged.pid" munged || break
    sleep 0.5
  done
  rm -f "$state/slurmd.pid" "$state/slurmctld.pid" "$state/munged.pid"
  echo "slurm: stopped (the daemons started from $state)"
  ;;
*)
  echo "usage: $0 start|stop" >&2
  exit 2
  ;;
esac
