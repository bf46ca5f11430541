#!/usr/bin/env bash
# local-sweep.sh: run one mixdepth scan or sample as N parts on this machine,
# up to J parts at a time, and merge their tables into one: the workstation
# counterpart of submit.sh.
#
# Usage:
#   scripts/cluster/local-sweep.sh scan|sample --parts N --out FILE [--jobs J] [--part-dir DIR] -- FLAGS...
#
#   scan|sample     the mixdepth command that every part runs
#   --parts N       split the run into N parts: part K (0 <= K < N) holds the
#                   instances i with i mod N = K (mixdepth's --part K/N)
#   --out FILE      the merged table, FILE.parquet or FILE.arrow
#   --jobs J        parts running at once (default: the number of cores).
#                   Each part uses mixdepth's --workers, all cores unless
#                   FLAGS say otherwise: with J > 1, give --workers in FLAGS
#                   (for example J parts of --workers C/J on C cores)
#   --part-dir DIR  where the part tables and logs go (default: FILE.parts)
#   --help          print this text
#   FLAGS           the flags of 'mixdepth scan' or 'mixdepth sample' that
#                   every part shares (seed, graph, depths, instances, ...).
#                   The script sets --part and --out itself; scan's --resume
#                   and --plot and sample's --circuits are refused, since a
#                   part sees only its own instances.
#
# Part K writes DIR/part-K-of-N.EXT (EXT that of FILE) and its report to
# DIR/part-K-of-N.log. When every part has succeeded, 'mixdepth merge' joins
# the part tables into FILE. When a part fails, no further part starts, the
# running ones finish, and the script exits with the status of the first part
# that failed, without merging. Ctrl-C reaches the running parts too (they
# share the terminal) and SIGTERM is passed on to them: each saves what it
# has done as a partial table, and the script waits for them and exits 130
# (SIGINT) or 143 (SIGTERM). An interrupted scan part can be continued by
# hand with 'mixdepth scan FLAGS --part K/N --resume DIR/part-K-of-N.EXT';
# rerunning the sweep redoes every part.
#
# Environment: MIXDEPTH, the mixdepth binary (default: mixdepth on PATH).
# Needs bash 5.1 or later (for 'wait -n -p').
#
# Exit status: 0 success; 2 bad options; otherwise that of the first part
# that failed, or of the merge; 130 or 143 after a signal.
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
prog=local-sweep.sh
valued=(parts out jobs part-dir)
# shellcheck source-path=SCRIPTDIR source=options.sh
source "$here/options.sh"

parse_options "$@"
if ((BASH_VERSINFO[0] < 5 || (BASH_VERSINFO[0] == 5 && BASH_VERSINFO[1] < 1))); then
	die "needs bash 5.1 or later (for wait -n -p); this is bash $BASH_VERSION"
fi
check_run
parts=$opt_parts out=$opt_out
jobs=${opt_jobs:-$(getconf _NPROCESSORS_ONLN 2>/dev/null || nproc 2>/dev/null || echo 1)}
check_count --jobs "$jobs"
mixdepth=${MIXDEPTH:-mixdepth}
command -v "$mixdepth" >/dev/null || die "$mixdepth: not found; put mixdepth on PATH or name the binary in MIXDEPTH"
dir=${opt_part_dir:-$out.parts}
mkdir -p "$dir"
ext=${out##*.}

part_file() { echo "$dir/part-$1-of-$parts.$ext"; }
part_log() { echo "$dir/part-$1-of-$parts.log"; }

declare -A running=() # pid of a running part -> its K
first_status=0 first_part=""

# stop SIGNAL STATUS: on a signal to the script, send SIGNAL to the running
# parts (none for SIGINT, which a terminal delivers to them as well), wait
# for them to save their tables, and exit with STATUS. A second SIGINT or
# SIGTERM then ends the script at once.
stop() {
	trap - INT TERM
	local pid
	for pid in "${!running[@]}"; do
		[[ "$1" == INT ]] || kill -s "$1" "$pid" 2>/dev/null || true
	done
	echo "$prog: SIG$1: waiting for ${#running[@]} running part(s) to save their tables" >&2
	for pid in "${!running[@]}"; do
		wait "$pid" || true
	done
	echo "$prog: stopped; not merging (the part tables and logs are in $dir)" >&2
	exit "$2"
}
trap 'stop INT 130' INT
trap 'stop TERM 143' TERM

next=0
while ((${#running[@]} > 0 || (first_status == 0 && next < parts))); do
	if ((first_status == 0 && next < parts && ${#running[@]} < jobs)); then
		"$mixdepth" "$command" ${flags[@]+"${flags[@]}"} --part "$next/$parts" --out "$(part_file "$next")" \
			</dev/null >"$(part_log "$next")" 2>&1 &
		running[$!]=$next
		next=$((next + 1))
		continue
	fi
	pid="" status=0
	wait -n -p pid || status=$?
	[[ -n "$pid" ]] || die "wait -n returned no part (status $status)"
	k=${running[$pid]}
	unset "running[$pid]"
	if ((status == 0)); then
		echo "$prog: part $k/$parts done" >&2
		continue
	fi
	echo "$prog: part $k/$parts failed with status $status; see $(part_log "$k")" >&2
	if ((first_status == 0)); then
		first_status=$status first_part=$k
		((${#running[@]} == 0)) || echo "$prog: starting no further part; waiting for the ${#running[@]} running" >&2
	fi
done
trap - INT TERM
if ((first_status != 0)); then
	echo "$prog: not merging: part $first_part/$parts failed first, with status $first_status" >&2
	exit "$first_status"
fi

files=()
for ((k = 0; k < parts; k++)); do files+=("$(part_file "$k")"); done
exec "$mixdepth" merge --out "$out" "${files[@]}"
