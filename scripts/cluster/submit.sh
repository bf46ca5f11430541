#!/usr/bin/env bash
# submit.sh: submit one mixdepth scan or sample to Slurm as a job array of N
# parts, and a merge job that runs once all of them have succeeded.
#
# Usage:
#   scripts/cluster/submit.sh scan|sample --parts N --out FILE [--part-dir DIR]
#       [--cpus-per-part C] [--queue NAME] [--time-limit T] -- FLAGS...
#
#   scan|sample          the mixdepth command that every part runs
#   --parts N            split the run into N parts, the array tasks 0..N-1:
#                        task K runs mixdepth's --part K/N
#   --out FILE           the merged table, FILE.parquet or FILE.arrow,
#                        written by the merge job
#   --part-dir DIR       where the part tables go (default: FILE.parts)
#   --cpus-per-part C    CPUs of each array task, which mixdepth uses as its
#                        --workers (default 1)
#   --queue NAME         the Slurm partition to run in (default: the
#                        cluster's default)
#   --time-limit T       time limit of each task, in sbatch's --time format
#                        (default: the partition's)
#   --help               print this text
#   FLAGS                the flags of 'mixdepth scan' or 'mixdepth sample'
#                        that every part shares. The script sets --part,
#                        --out and --workers itself; scan's --resume and
#                        --plot and sample's --circuits are refused, since a
#                        part sees only its own instances.
#
# Anything else sbatch should know (an account, a QOS) goes in sbatch's own
# environment variables, such as SBATCH_ACCOUNT, which both jobs inherit.
#
# Environment: MIXDEPTH, the mixdepth binary (default: mixdepth on PATH), and
# SBATCH, the sbatch command (default: sbatch).
#
# Prints the two job ids. Cancel everything with: scancel ARRAY_ID MERGE_ID
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
prog=submit.sh
valued=(parts out part-dir cpus-per-part queue time-limit)
reserved=--workers
reserved_why="each part runs with --workers equal to its CPUs; set them with --cpus-per-part"
# shellcheck source-path=SCRIPTDIR source=options.sh
source "$here/options.sh"

parse_options "$@"
check_run
cpus=${opt_cpus_per_part:-1}
check_count --cpus-per-part "$cpus"
parts=$opt_parts out=$opt_out
dir=${opt_part_dir:-$out.parts}
queue=${opt_queue:-} limit=${opt_time_limit:-}
sbatch=${SBATCH:-sbatch}

opts=(--parsable)
[[ -z "$queue" ]] || opts+=(--partition="$queue")
task=("${opts[@]}" --job-name="mixdepth-$command" --cpus-per-task="$cpus")
[[ -z "$limit" ]] || task+=(--time="$limit")
array=$("$sbatch" "${task[@]}" --array="0-$((parts - 1))" \
	"$here/sweep.slurm" "$command" "$parts" "$dir" ${flags[@]+"${flags[@]}"})
array=${array%%;*} # --parsable prints "jobid[;cluster]"
merge=$("$sbatch" "${opts[@]}" --job-name=mixdepth-merge --dependency="afterok:$array" \
	"$here/merge.slurm" "$parts" "$dir" "$out")
merge=${merge%%;*}
echo "submitted the $parts parts of mixdepth $command as array job $array, and the merge as job $merge (it runs once every part has succeeded)"
echo "merged table: $out"
