#!/usr/bin/env bash
# local-sweep.sh: run one mixdepth scan as N shards on this workstation and
# merge them into one table, the single-machine counterpart of submit.sh.
#
# Usage:
#   scripts/cluster/local-sweep.sh -n SHARDS -o OUT.parquet [-j JOBS] [-d SHARD_DIR] -- SCAN_FLAGS...
#
#   -n SHARDS   number of shards (the N of --shard K/N)
#   -o OUT      merged table (.parquet or .arrow)
#   -j JOBS     shards run at once (default: the number of cores); give each
#               shard's scan --workers 1 when JOBS equals the cores
#   -d DIR      where the shard tables go (default: OUT's name + ".shards")
#   SCAN_FLAGS  the flags of 'mixdepth scan' shared by every shard, without
#               --shard and --out (seed, graph, depths, instances, ...)
#
# Environment:
#   MIXDEPTH              the mixdepth binary (default: mixdepth on PATH)
#   MIXDEPTH_NO_PARALLEL  set to 1 to run the shards one after another in a
#                         plain shell loop even when GNU parallel is installed
#
# A shard that fails stops the sweep before the merge, with its exit status.
# Rerunning the same command redoes every shard; an interrupted shard's
# partial table can be continued by hand with 'mixdepth scan ... --resume'.
set -euo pipefail

usage() {
	sed -n '2,/^set -euo/p' "$0" | sed '$d' | sed 's/^# \{0,1\}//' >&2
	exit 2
}

shards="" out="" jobs="" dir=""
while getopts "n:o:j:d:h" opt; do
	case "$opt" in
	n) shards=$OPTARG ;;
	o) out=$OPTARG ;;
	j) jobs=$OPTARG ;;
	d) dir=$OPTARG ;;
	*) usage ;;
	esac
done
shift $((OPTIND - 1))
if [[ "${1:-}" == "--" ]]; then shift; fi
if [[ -z "$shards" || -z "$out" ]]; then
	echo "local-sweep.sh: -n SHARDS and -o OUT are required" >&2
	usage
fi
if ! [[ "$shards" =~ ^[1-9][0-9]*$ ]]; then
	echo "local-sweep.sh: -n $shards: give a whole number of shards, at least 1" >&2
	exit 2
fi
for arg in "$@"; do
	case "$arg" in
	--shard | --shard=* | --out | --out=*)
		echo "local-sweep.sh: $arg: the script sets --shard and --out of each shard itself" >&2
		exit 2
		;;
	esac
done
case "$out" in
*.parquet | *.arrow) ;;
*)
	echo "local-sweep.sh: -o $out: the merged table must end in .parquet or .arrow" >&2
	exit 2
	;;
esac
mixdepth=${MIXDEPTH:-mixdepth}
jobs=${jobs:-$(nproc 2>/dev/null || echo 1)}
ext=${out##*.}
dir=${dir:-$out.shards}
mkdir -p "$dir"

shard_file() { echo "$dir/shard-$1-of-$shards.$ext"; }

# GNU parallel only: moreutils ships a different program of the same name.
if [[ "${MIXDEPTH_NO_PARALLEL:-0}" != "1" ]] && parallel --version 2>/dev/null | grep -q "GNU parallel"; then
	# -q quotes the scan flags so that values with spaces survive; --halt
	# stops the other shards as soon as one fails.
	parallel --will-cite -q --halt now,fail=1 -j "$jobs" \
		"$mixdepth" scan "$@" --shard "{}/$shards" --out "$dir/shard-{}-of-$shards.$ext" \
		::: $(seq 0 $((shards - 1))) >"$dir/scan.log"
else
	for ((k = 0; k < shards; k++)); do
		"$mixdepth" scan "$@" --shard "$k/$shards" --out "$(shard_file "$k")" >"$dir/scan-$k.log"
	done
fi

files=()
for ((k = 0; k < shards; k++)); do files+=("$(shard_file "$k")"); done
"$mixdepth" merge --out "$out" "${files[@]}"
