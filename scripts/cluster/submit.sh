#!/usr/bin/env bash
# submit.sh: submit one mixdepth scan to Slurm as a job array of N shards and
# a merge job that runs when all of them have succeeded.
#
# Usage:
#   scripts/cluster/submit.sh -n SHARDS -o OUT.parquet [-d DIR] [-c CPUS] [-p PART] [-t TIME] -- SCAN_FLAGS...
#
#   -n SHARDS   number of shards (array tasks 0..SHARDS-1)
#   -o OUT      merged table, written by the merge job
#   -d DIR      where the shard tables go (default: OUT + ".shards")
#   -c CPUS     CPUs per shard, passed to scan as --workers (default 1)
#   -p PART     Slurm partition (optional)
#   -t TIME     time limit per shard, in sbatch's format (optional)
#   SCAN_FLAGS  the flags of 'mixdepth scan' shared by every shard, without
#               --shard, --out and --workers
#
# Environment: MIXDEPTH, the mixdepth binary (default: mixdepth on PATH), and
# SBATCH, the sbatch command (default: sbatch).
#
# Prints the two job ids. Cancel everything with: scancel ARRAY_ID MERGE_ID
set -euo pipefail

here=$(cd "$(dirname "$0")" && pwd)
shards="" out="" dir="" cpus=1 part="" time=""
while getopts "n:o:d:c:p:t:h" opt; do
	case "$opt" in
	n) shards=$OPTARG ;;
	o) out=$OPTARG ;;
	d) dir=$OPTARG ;;
	c) cpus=$OPTARG ;;
	p) part=$OPTARG ;;
	t) time=$OPTARG ;;
	*) sed -n '2,/^set -euo/p' "$0" | sed '$d' | sed 's/^# \{0,1\}//' >&2; exit 2 ;;
	esac
done
shift $((OPTIND - 1))
if [[ "${1:-}" == "--" ]]; then shift; fi
if [[ -z "$shards" || -z "$out" ]] || ! [[ "$shards" =~ ^[1-9][0-9]*$ ]]; then
	echo "submit.sh: -n SHARDS (a whole number ≥ 1) and -o OUT are required" >&2
	exit 2
fi
case "$out" in
*.parquet | *.arrow) ;;
*)
	echo "submit.sh: -o $out: the merged table must end in .parquet or .arrow" >&2
	exit 2
	;;
esac
for arg in "$@"; do
	case "$arg" in
	--shard | --shard=* | --out | --out=*)
		echo "submit.sh: $arg: the job array sets --shard and --out of each shard itself (and --workers from --cpus-per-task)" >&2
		exit 2
		;;
	esac
done
dir=${dir:-$out.shards}
sbatch=${SBATCH:-sbatch}
opts=(--parsable --cpus-per-task="$cpus")
[[ -n "$part" ]] && opts+=(--partition="$part")
[[ -n "$time" ]] && opts+=(--time="$time")

array=$("$sbatch" "${opts[@]}" --array="0-$((shards - 1))" "$here/sweep.slurm" "$shards" "$dir" "$@")
array=${array%%;*} # --parsable prints "jobid[;cluster]"
merge=$("$sbatch" --parsable --dependency="afterok:$array" ${part:+--partition="$part"} \
	"$here/merge.slurm" "$shards" "$dir" "$out")
merge=${merge%%;*}
echo "submitted shards as array job $array and the merge as job $merge (runs after all shards succeed)"
echo "merged table: $out"
