#!/usr/bin/env bash
# The depth-K class table (default 36: 527,682,754 residues, 4.2 GB) built as N shards (default 64)
# through the cluster path on this machine, one shard process at a time, then merged; beside it the
# one-machine export. Prints time and peak memory (max RSS) per shard and for the merge.
# Usage: bash bench/cluster-table.sh [DEPTH] [SHARDS] [SCRATCH]   (needs about 3 x the table on disk)
set -euo pipefail
depth="${1:-36}"
shards="${2:-64}"
scratch="${3:-/var/tmp/glidepath-bench}"
gp="node $(cd "$(dirname "$0")/.." && pwd)/bin/glidepath.js"
rm -rf "$scratch" && mkdir -p "$scratch"
measure() { /usr/bin/time -f '%e %M' -o "$scratch/time" "$@" > /dev/null; read -r s kb < "$scratch/time"; echo "$s $kb"; }
echo "machine: $(nproc) cores, $(awk '/model name/ {$1=$2=$3=""; print; exit}' /proc/cpuinfo | xargs), node $(node --version)"
$gp batch sieve --depth "$depth" --shards "$shards" --dir "$scratch/run" --cpus-per-task "$(nproc)" | head -2
max_s=0; max_kb=0; total=0
for i in $(seq 0 $((shards - 1))); do
  read -r s kb < <(measure $gp shard "$scratch/run" "$i")
  total=$(echo "$total + $s" | bc)
  max_s=$(echo "if ($s > $max_s) $s else $max_s" | bc)
  [ "$kb" -gt "$max_kb" ] && max_kb=$kb
done
echo "shards: $shards, $total s in all; the slowest $max_s s; peak memory of a shard $((max_kb / 1024)) MiB"
read -r s kb < <(measure $gp merge "$scratch/run" --out "$scratch/merged.u64")
echo "merge (checks every part's sha256, k-way merge to one file): $s s, peak memory $((kb / 1024)) MiB"
read -r s kb < <(measure $gp sieve --depth "$depth" --out "$scratch/single.u64")
echo "one-machine sieve --depth $depth --out: $s s, peak memory $((kb / 1024)) MiB"
cmp "$scratch/merged.u64" "$scratch/single.u64" && echo "the merged table and the one-machine table are byte-identical ($(stat -c %s "$scratch/merged.u64") bytes)"
grep -h '"sha256"' "$scratch/merged.u64.json" "$scratch/single.u64.json"
rm -rf "$scratch"
