#!/usr/bin/env bash
# test.sh: checks of the cluster scripts against stand-ins for mixdepth and
# sbatch, so that neither a built mixdepth nor a Slurm cluster is needed.
#
# The stand-in mixdepth records every call's arguments, one line each, and
# for scan or sample sleeps FAKE_SLEEP seconds (FAKE_SLEEP_K for part K),
# exits with FAKE_FAIL_K when that is set, and otherwise writes its --out
# file; merge checks that its inputs exist and concatenates them into --out.
# The stand-in sbatch records its arguments and prints a job id.
#
# Run: bash scripts/cluster/test.sh (go test ./scripts/cluster/ runs it too).
# Exit status 0 when every check passes, 1 when one fails, 77 when this bash
# is too old for local-sweep.sh.
set -euo pipefail

if ((BASH_VERSINFO[0] < 5 || (BASH_VERSINFO[0] == 5 && BASH_VERSINFO[1] < 1))); then
	echo "skip: local-sweep.sh needs bash 5.1 or later; this is bash $BASH_VERSION"
	exit 77
fi
here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
mkdir "$tmp/bin"
unset MIXDEPTH SBATCH
export PATH="$tmp/bin:$PATH" FAKE_LOG="$tmp/calls" FAKE_STATE="$tmp/state"

cat >"$tmp/bin/mixdepth" <<'EOF'
#!/usr/bin/env bash
set -euo pipefail
line=$(printf '%q ' "$@")
printf '%s\n' "${line% }" >>"$FAKE_LOG"
out="" part="" inputs=()
cmd=$1
shift
while (($# > 0)); do
	case "$1" in
	--out) out=$2; shift 2 ;;
	--part) part=$2; shift 2 ;;
	*) inputs+=("$1"); shift ;;
	esac
done
if [[ "$cmd" == merge ]]; then
	for f in "${inputs[@]}"; do
		[[ -f "$f" ]] || { echo "fake merge: $f: no such file" >&2; exit 2; }
	done
	[[ -z "${FAKE_MERGE_FAIL:-}" ]] || exit "$FAKE_MERGE_FAIL"
	cat "${inputs[@]}" >"$out"
	exit 0
fi
k=${part%/*}
sleeper=""
# On SIGTERM, take half a second to "save", as mixdepth writes its partial
# table, so that a sweep that does not wait for its parts is caught. The
# trap is set before the part shows itself as running.
trap 'kill "$sleeper" 2>/dev/null; sleep 0.5; rm -f "$FAKE_STATE/running/$k"; echo "$k" >>"$FAKE_STATE/stopped"; exit 130' TERM
mkdir -p "$FAKE_STATE/running"
touch "$FAKE_STATE/running/$k"
echo "$k $(ls "$FAKE_STATE/running" | wc -l)" >>"$FAKE_STATE/concurrency"
sleep_var=FAKE_SLEEP_$k fail_var=FAKE_FAIL_$k
sleep "${!sleep_var:-${FAKE_SLEEP:-0}}" &
sleeper=$!
wait "$sleeper"
rm -f "$FAKE_STATE/running/$k"
status=${!fail_var:-0}
echo "$k $status" >>"$FAKE_STATE/ended"
if ((status != 0)); then
	echo "fake $cmd: part $part fails with status $status" >&2
	exit "$status"
fi
echo "$cmd $part" >"$out"
EOF
cat >"$tmp/bin/sbatch" <<'EOF'
#!/usr/bin/env bash
line=$(printf '%q ' "$@")
printf '%s\n' "${line% }" >>"$FAKE_LOG"
n=$(wc -l <"$FAKE_LOG")
if ((n == 1)); then echo "4242;cluster1"; else echo "4243"; fi
EOF
chmod +x "$tmp/bin/mixdepth" "$tmp/bin/sbatch"

failures=0
pass() { echo "ok   $1"; }
fail() {
	echo "FAIL $1: $2"
	[[ ! -s "$tmp/err" ]] || sed 's/^/     stderr: /' "$tmp/err"
	failures=$((failures + 1))
}

# run SCRIPT ARG...: runs a script of this folder with a fresh call log and
# state, and sets status; its stdout and stderr go to $tmp/out and $tmp/err.
run() {
	local script=$1
	shift
	rm -rf "$FAKE_LOG" "$FAKE_STATE"
	mkdir -p "$FAKE_STATE"
	: >"$FAKE_LOG"
	status=0
	bash "$here/$script" "$@" </dev/null >"$tmp/out" 2>"$tmp/err" || status=$?
}

# q ARG...: the line the stand-ins record for these arguments.
q() {
	local line
	line=$(printf '%q ' "$@")
	echo "${line% }"
}

# expect_calls NAME EXPECTED: the recorded calls, sorted but for the last
# one (the merge, which must come after every part), equal EXPECTED.
expect_calls() {
	local got
	got=$({ sed '$d' "$FAKE_LOG" | LC_ALL=C sort; tail -n 1 "$FAKE_LOG"; })
	if [[ "$got" == "$2" ]]; then pass "$1"; else fail "$1" "calls were"$'\n'"$got"$'\n'"want"$'\n'"$2"; fi
}

# --- the arguments each part and the merge get --------------------------------

d=$tmp/a
run local-sweep.sh scan --parts 3 --out "$d/out.parquet" --jobs 3 -- --graph "my graph.txt" --seed 7
want=$(
	for k in 0 1 2; do q scan --graph "my graph.txt" --seed 7 --part "$k/3" --out "$d/out.parquet.parts/part-$k-of-3.parquet"; done
	q merge --out "$d/out.parquet" "$d/out.parquet.parts/part-0-of-3.parquet" "$d/out.parquet.parts/part-1-of-3.parquet" "$d/out.parquet.parts/part-2-of-3.parquet"
)
if ((status == 0)); then pass "scan sweep succeeds"; else fail "scan sweep succeeds" "status $status"; fi
expect_calls "scan parts get --part K/N and --out, and the merge gets every part in order" "$want"
if [[ "$(cat "$d/out.parquet" 2>/dev/null)" == $'scan 0/3\nscan 1/3\nscan 2/3' ]]; then pass "the merged file is written"; else fail "the merged file is written" "$(cat "$d/out.parquet" 2>&1)"; fi

d=$tmp/b
run local-sweep.sh --parts=2 --out="$d/s.arrow" sample --part-dir "$d/p" --jobs=1 -- --shots 10
want=$(
	for k in 0 1; do q sample --shots 10 --part "$k/2" --out "$d/p/part-$k-of-2.arrow"; done
	q merge --out "$d/s.arrow" "$d/p/part-0-of-2.arrow" "$d/p/part-1-of-2.arrow"
)
if ((status == 0)); then pass "sample sweep with --opt=value forms succeeds"; else fail "sample sweep with --opt=value forms succeeds" "status $status"; fi
expect_calls "sample parts write .arrow parts in --part-dir" "$want"

d=$tmp/c
run local-sweep.sh scan --parts 1 --out "$d/one.parquet"
expect_calls "no mixdepth flags at all" "$(
	q scan --part 0/1 --out "$d/one.parquet.parts/part-0-of-1.parquet"
	q merge --out "$d/one.parquet" "$d/one.parquet.parts/part-0-of-1.parquet"
)"

# --- parallelism -------------------------------------------------------------

# max_running: the largest number of parts that a part saw running, itself
# included, when it started.
max_running() { awk '$2 > m { m = $2 } END { print m + 0 }' "$FAKE_STATE/concurrency" 2>/dev/null || echo 0; }

FAKE_SLEEP=1 run local-sweep.sh scan --parts 4 --out "$tmp/p/out.parquet" --jobs 2
if ((status == 0 && $(max_running) == 2)); then pass "--jobs 2 runs two parts at once"; else fail "--jobs 2 runs two parts at once" "status $status, at most $(max_running) running"; fi

FAKE_SLEEP=0.2 run local-sweep.sh scan --parts 3 --out "$tmp/p1/out.parquet" --jobs 1
if ((status == 0 && $(max_running) == 1)); then pass "--jobs 1 runs one part at a time"; else fail "--jobs 1 runs one part at a time" "status $status, at most $(max_running) running"; fi

# words FILE: the lines of FILE sorted and joined by spaces; nothing when
# FILE is missing.
words() { { LC_ALL=C sort "$1" 2>/dev/null || true; } | tr '\n' ' '; }

# --- failures ----------------------------------------------------------------

# Part 1 fails at once with 3 while part 0 runs on and then fails with 5: the
# sweep reports 3, starts neither part 2 nor 3, waits for part 0, and does not
# merge.
FAKE_SLEEP=1 FAKE_SLEEP_1=0 FAKE_FAIL_1=3 FAKE_FAIL_0=5 run local-sweep.sh scan --parts 4 --out "$tmp/f/out.parquet" --jobs 2
if ((status == 3)); then pass "the first failing part's status is the sweep's"; else fail "the first failing part's status is the sweep's" "status $status"; fi
if [[ "$(words "$FAKE_STATE/ended")" == "0 5 1 3 " ]]; then pass "no new part starts after a failure, and the running one finishes"; else fail "no new part starts after a failure, and the running one finishes" "ended: $(words "$FAKE_STATE/ended")"; fi
if ! grep -q '^merge' "$FAKE_LOG"; then pass "no merge after a failed part"; else fail "no merge after a failed part" "merge was called"; fi
if grep -q "part 1/4 failed with status 3; see $tmp/f/out.parquet.parts/part-1-of-4.log" "$tmp/err" && grep -qs "part 1/4 fails" "$tmp/f/out.parquet.parts/part-1-of-4.log"; then
	pass "the failure names the part and its log"
else
	fail "the failure names the part and its log" "$(cat "$tmp/err")"
fi

FAKE_MERGE_FAIL=4 run local-sweep.sh sample --parts 2 --out "$tmp/m/out.parquet"
if ((status == 4)); then pass "a failing merge's status is the sweep's"; else fail "a failing merge's status is the sweep's" "status $status"; fi

# SIGTERM to the sweep reaches both running parts, which save and exit; the
# sweep waits for them (both have recorded their stop when it exits) and
# exits 143 without merging.
rm -rf "$FAKE_STATE" && mkdir -p "$FAKE_STATE" && : >"$FAKE_LOG"
FAKE_SLEEP=20 bash "$here/local-sweep.sh" scan --parts 2 --out "$tmp/t/out.parquet" --jobs 2 </dev/null >"$tmp/out" 2>"$tmp/err" &
sweep=$!
for ((i = 0; i < 100; i++)); do
	[[ "$(ls "$FAKE_STATE/running" 2>/dev/null | wc -l)" -lt 2 ]] || break
	sleep 0.1
done
kill -TERM "$sweep"
status=0
wait "$sweep" || status=$?
if ((status == 143)) && [[ "$(words "$FAKE_STATE/stopped")" == "0 1 " ]] && ! grep -q '^merge' "$FAKE_LOG"; then
	pass "SIGTERM stops the running parts and the sweep exits 143"
else
	fail "SIGTERM stops the running parts and the sweep exits 143" "status $status, stopped: $(words "$FAKE_STATE/stopped")"
fi

# --- option errors: status 2, one message, no mixdepth call ------------------

# refuse NAME PATTERN SCRIPT ARG...: the script exits 2 with a message
# matching PATTERN and calls nothing.
refuse() {
	local name=$1 pattern=$2
	shift 2
	run "$@"
	if ((status == 2)) && grep -q -- "$pattern" "$tmp/err" && [[ ! -s "$FAKE_LOG" ]]; then
		pass "$name"
	else
		fail "$name" "status $status, calls $(wc -l <"$FAKE_LOG"), want a message matching: $pattern"
	fi
}
o=$tmp/x.parquet
for script in local-sweep.sh submit.sh; do
	refuse "$script: no command" "name the mixdepth command" "$script" --parts 2 --out "$o"
	refuse "$script: unknown command" "must be scan or sample" "$script" frobnicate --parts 2 --out "$o"
	refuse "$script: two commands" "give one command" "$script" scan sample --parts 2 --out "$o"
	refuse "$script: --parts missing" "--parts N is required" "$script" scan --out "$o"
	refuse "$script: --parts 0" "--parts 0: give a whole number" "$script" scan --parts 0 --out "$o"
	refuse "$script: --parts two" "--parts two: give a whole number" "$script" scan --parts two --out "$o"
	refuse "$script: --out missing" "--out FILE is required" "$script" scan --parts 2
	refuse "$script: --out of another kind" "must end in .parquet or .arrow" "$script" scan --parts 2 --out x.csv
	refuse "$script: single-letter options" "long options only" "$script" scan -n 2 -o "$o"
	refuse "$script: an option without its value" "--part-dir needs a value" "$script" scan --parts 2 --out "$o" --part-dir
	refuse "$script: an option followed by another" "--parts needs a value" "$script" scan --parts --out "$o"
	refuse "$script: a mixdepth flag before --" "--seed: not an option of $script" "$script" scan --parts 2 --out "$o" --seed 3
	refuse "$script: --part among the flags" "sets --part and --out" "$script" scan --parts 2 --out "$o" -- --part 0/2
	refuse "$script: --out= among the flags" "sets --part and --out" "$script" sample --parts 2 --out "$o" -- --out=y.parquet
	refuse "$script: scan --resume" "continue one interrupted part by hand" "$script" scan --parts 2 --out "$o" -- --resume y.parquet
	refuse "$script: scan --plot" "leave --plot out" "$script" scan --parts 2 --out "$o" -- --plot=p.png
	refuse "$script: sample --circuits" "merge does not join circuit files" "$script" sample --parts 2 --out "$o" -- --circuits c.json
	run "$script" --help
	if ((status == 0)) && grep -q -- "--parts N" "$tmp/out" && [[ ! -s "$tmp/err" ]]; then pass "$script --help"; else fail "$script --help" "status $status"; fi
done
refuse "local-sweep.sh: --jobs 0" "--jobs 0: give a whole number" local-sweep.sh scan --parts 2 --out "$o" --jobs 0
MIXDEPTH=$tmp/nonexistent refuse "local-sweep.sh: mixdepth missing" "not found" local-sweep.sh scan --parts 2 --out "$o"
refuse "submit.sh: --workers among the flags" "set them with --cpus-per-part" submit.sh scan --parts 2 --out "$o" -- --workers 4
refuse "submit.sh: --cpus-per-part 0" "--cpus-per-part 0: give a whole number" submit.sh scan --parts 2 --out "$o" --cpus-per-part 0
refuse "submit.sh: --jobs is local-sweep.sh's" "--jobs: not an option of submit.sh" submit.sh scan --parts 2 --out "$o" --jobs 2

# --- Slurm -------------------------------------------------------------------

run submit.sh sample --parts 3 --out "$tmp/s/out.parquet" --cpus-per-part 4 --queue short --time-limit 1:00:00 -- --shots 100 --graph "my graph.txt"
want=$(
	q --parsable --partition=short --job-name=mixdepth-sample --cpus-per-task=4 --time=1:00:00 --array=0-2 \
		"$here/sweep.slurm" sample 3 "$tmp/s/out.parquet.parts" --shots 100 --graph "my graph.txt"
	q --parsable --partition=short --job-name=mixdepth-merge --dependency=afterok:4242 \
		"$here/merge.slurm" 3 "$tmp/s/out.parquet.parts" "$tmp/s/out.parquet"
)
if ((status == 0)) && [[ "$(cat "$FAKE_LOG")" == "$want" ]] && grep -q "array job 4242, and the merge as job 4243" "$tmp/out"; then
	pass "submit.sh submits the array and the merge that depends on it"
else
	fail "submit.sh submits the array and the merge that depends on it" "status $status, calls"$'\n'"$(cat "$FAKE_LOG")"$'\n'"want"$'\n'"$want"
fi

run submit.sh scan --parts 2 --out "$tmp/s/out.arrow"
want=$(
	q --parsable --job-name=mixdepth-scan --cpus-per-task=1 --array=0-1 "$here/sweep.slurm" scan 2 "$tmp/s/out.arrow.parts"
	q --parsable --job-name=mixdepth-merge --dependency=afterok:4242 "$here/merge.slurm" 2 "$tmp/s/out.arrow.parts" "$tmp/s/out.arrow"
)
if ((status == 0)) && [[ "$(cat "$FAKE_LOG")" == "$want" ]]; then pass "submit.sh defaults"; else fail "submit.sh defaults" "status $status, calls"$'\n'"$(cat "$FAKE_LOG")"; fi

SLURM_ARRAY_TASK_ID=2 SLURM_CPUS_PER_TASK=3 run sweep.slurm sample 4 "$tmp/w" --shots 5
if ((status == 0)) && [[ "$(cat "$FAKE_LOG")" == "$(q sample --shots 5 --workers 3 --part 2/4 --out "$tmp/w/part-2-of-4.parquet")" ]]; then
	pass "sweep.slurm runs part K of the array"
else
	fail "sweep.slurm runs part K of the array" "status $status, calls $(cat "$FAKE_LOG")"
fi
refuse "sweep.slurm outside a job array" "run as a job array" sweep.slurm scan 4 "$tmp/w"
SLURM_ARRAY_TASK_ID=0 refuse "sweep.slurm: unknown command" "must be scan or sample" sweep.slurm exact 4 "$tmp/w"
SLURM_ARRAY_TASK_ID=0 refuse "sweep.slurm: bad N" "give the number of parts" sweep.slurm scan 0 "$tmp/w"

mkdir -p "$tmp/g"
for k in 0 1 2; do echo "$k" >"$tmp/g/part-$k-of-3.parquet"; done
run merge.slurm 3 "$tmp/g" "$tmp/g/out.parquet"
if ((status == 0)) && [[ "$(cat "$FAKE_LOG")" == "$(q merge --out "$tmp/g/out.parquet" "$tmp/g/part-0-of-3.parquet" "$tmp/g/part-1-of-3.parquet" "$tmp/g/part-2-of-3.parquet")" ]]; then
	pass "merge.slurm merges parts 0..N-1"
else
	fail "merge.slurm merges parts 0..N-1" "status $status, calls $(cat "$FAKE_LOG")"
fi
refuse "merge.slurm: wrong arguments" "usage" merge.slurm 3 "$tmp/g"
refuse "merge.slurm: bad N" "give the number of parts" merge.slurm x "$tmp/g" "$tmp/g/out.parquet"

if ((failures > 0)); then
	echo "$failures check(s) failed"
	exit 1
fi
echo "all checks passed"
