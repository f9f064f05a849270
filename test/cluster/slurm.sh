#!/usr/bin/env bash
# A real single-node Slurm on this machine for the cluster tests (as root, Debian's slurm-wlm and
# munge): `slurm.sh start` writes slurm.conf from slurm.conf.in, starts munged, slurmctld and
# slurmd and waits until the node is idle; `slurm.sh stop` stops them.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
state=/var/tmp/glidepath-slurm
conf=/etc/slurm/slurm.conf
case "${1:-}" in
start)
  mkdir -p "$state/ctld" "$state/d" /run/munge /var/log/munge /var/lib/munge
  chown munge:munge /run/munge /var/log/munge /var/lib/munge 2>/dev/null || true
  [ -s /etc/munge/munge.key ] || { dd if=/dev/urandom bs=1 count=1024 of=/etc/munge/munge.key 2>/dev/null; chown munge:munge /etc/munge/munge.key; chmod 400 /etc/munge/munge.key; }
  host="$(hostname -s)"
  mem=$(( $(awk '/MemTotal/ {print $2}' /proc/meminfo) / 1024 - 1024 ))
  sed -e "s|@HOST@|$host|g" -e "s|@CPUS@|$(nproc)|g" -e "s|@MEM@|$mem|g" -e "s|@STATE@|$state|g" "$here/slurm.conf.in" > "$conf"
  pgrep -x munged >/dev/null || su -s /bin/sh munge -c /usr/sbin/munged || /usr/sbin/munged --force
  pgrep -x slurmctld >/dev/null || /usr/sbin/slurmctld
  pgrep -x slurmd >/dev/null || /usr/sbin/slurmd
  for _ in $(seq 1 60); do
    if sinfo -h -N -o '%t' 2>/dev/null | grep -qx 'idle'; then echo "slurm: $host idle"; exit 0; fi
    scontrol update nodename="$host" state=resume >/dev/null 2>&1 || true
    sleep 1
  done
  echo "slurm: the node did not become idle" >&2
  sinfo -N >&2 || true
  tail -n 20 "$state/slurmctld.log" "$state/slurmd.log" >&2 || true
  exit 1
  ;;
stop)
  pkill -x slurmd 2>/dev/null || true
  pkill -x slurmctld 2>/dev/null || true
  pkill -x munged 2>/dev/null || true
  echo "slurm: stopped"
  ;;
*)
  echo "usage: $0 start|stop" >&2
  exit 2
  ;;
esac
