# shellcheck shell=bash disable=SC2154 # prog, valued, reserved_why: set by the sourcing script
# options.sh: the option handling that local-sweep.sh and submit.sh share.
# It is sourced, not run. The sourcing script sets, before calling
# parse_options:
#
#   prog      its own name, for messages
#   valued    the names of its options that take a value, without the
#             leading dashes (parts out ...); option --some-name is stored
#             in the variable opt_some_name
#   reserved  optional: one more flag of mixdepth that the script sets
#             itself, and reserved_why, the reason given when FLAGS hold it
#
# Every option is a long one, given as --name VALUE or --name=VALUE; the
# single word before "--" is the mixdepth command; everything after "--"
# is passed to mixdepth unchanged. Mistakes end the script with status 2 and
# one line on stderr that names the problem.

# usage prints the comment block at the top of the running script.
usage() {
	sed -n '2,/^set -euo/p' "$0" | sed '$d' | sed 's/^# \{0,1\}//'
}

# die prints "prog: MESSAGE" on stderr and exits with status 2.
die() {
	echo "$prog: $*" >&2
	exit 2
}

# set_option NAME VALUE stores VALUE in opt_NAME, or dies when NAME is not
# one of the script's options.
set_option() {
	local name=${1#--} known
	for known in "${valued[@]}"; do
		if [[ "$name" == "$known" ]]; then
			printf -v "opt_${name//-/_}" '%s' "$2"
			return
		fi
	done
	die "$1: not an option of $prog; the flags of mixdepth go after \"--\" (see $prog --help)"
}

# parse_options ARG... sets command, the opt_ variables and the array flags
# (the words after "--"). --help prints the usage and exits with status 0.
parse_options() {
	command="" flags=()
	while (($# > 0)); do
		case "$1" in
		--)
			shift
			flags=("$@")
			return
			;;
		--help)
			usage
			exit 0
			;;
		--*=*)
			set_option "${1%%=*}" "${1#*=}"
			shift
			;;
		--*)
			if (($# < 2)) || [[ "$2" == --* ]]; then
				set_option "$1" "" # an unknown option is reported as such first
				die "$1 needs a value: $1 VALUE or $1=VALUE"
			fi
			set_option "$1" "$2"
			shift 2
			;;
		-*)
			die "$1: unknown option; $prog takes long options only, such as --parts N (see $prog --help)"
			;;
		*)
			[[ -z "$command" ]] || die "$1: give one command (scan or sample), not \"$command\" and \"$1\""
			command=$1
			shift
			;;
		esac
	done
}

# check_count NAME VALUE dies unless VALUE is a whole number of at least 1.
check_count() {
	[[ "$2" =~ ^[1-9][0-9]*$ ]] || die "$1 $2: give a whole number, at least 1"
}

# check_run checks what both scripts need: the command, --parts, --out and
# the mixdepth flags, which must leave to the script the flags it sets for
# each part.
check_run() {
	case "$command" in
	scan | sample) ;;
	"") die "name the mixdepth command: $prog scan|sample --parts N --out FILE -- FLAGS... (see $prog --help)" ;;
	*) die "$command: the command must be scan or sample" ;;
	esac
	[[ -n "${opt_parts:-}" ]] || die "--parts N is required: the number of parts of the run"
	check_count --parts "$opt_parts"
	[[ -n "${opt_out:-}" ]] || die "--out FILE is required: the merged table, FILE.parquet or FILE.arrow"
	case "$opt_out" in
	*.parquet | *.arrow) ;;
	*) die "--out $opt_out: the merged table must end in .parquet or .arrow" ;;
	esac
	local arg name
	for arg in ${flags[@]+"${flags[@]}"}; do
		name=${arg%%=*}
		case "$command $name" in
		*" --part" | *" --out")
			die "$arg: $prog sets --part and --out of each part itself; leave them out of the flags"
			;;
		"scan --resume")
			die "$arg: a sweep starts every part afresh; continue one interrupted part by hand with mixdepth scan FLAGS --part K/N --resume PART_FILE"
			;;
		"scan --plot")
			die "$arg: each part would draw only its own instances; leave --plot out of a sweep"
			;;
		"sample --circuits")
			die "$arg: each part would write only its own circuits, and merge does not join circuit files; mixdepth score rebuilds the circuits from the merged table's metadata"
			;;
		esac
		if [[ -n "${reserved:-}" && "$name" == "$reserved" ]]; then
			die "$arg: $reserved_why"
		fi
	done
}
