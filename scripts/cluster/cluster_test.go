package cluster

import (
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"mixdepth/tables"
)

// TestScripts runs test.sh, which checks the option handling, the
// parallelism, the failure and signal handling of local-sweep.sh, and the
// jobs that submit.sh submits, against stand-ins for mixdepth and sbatch.
// It takes about 6 s, mostly the stand-in parts' sleeps.
func TestScripts(t *testing.T) {
	if testing.Short() {
		t.Skip("skipped with -short: test.sh sleeps for about 6 s")
	}
	bash := needBash(t)
	out, err := exec.Command(bash, "test.sh").CombinedOutput()
	var exit *exec.ExitError
	if errors.As(err, &exit) && exit.ExitCode() == 77 {
		t.Skipf("test.sh: %s", out)
	}
	if err != nil {
		t.Fatalf("bash test.sh: %v\n%s", err, out)
	}
	t.Logf("bash test.sh:\n%s", out)
}

// TestScriptsWithMixdepth runs the scripts with the real mixdepth on small
// cases and checks that every merged table holds the rows of the same run
// done at once, bit for bit (parts draw from the same per-instance streams):
// local-sweep.sh for scan and for sample with two parts at a time, and the
// Slurm scripts through submit.sh with a stand-in sbatch that runs each array
// task and then the dependent merge job, in that order. A part that mixdepth
// refuses makes the sweep exit with mixdepth's status for bad input, 2,
// without a merged table.
func TestScriptsWithMixdepth(t *testing.T) {
	bash := needBash(t)
	if exec.Command(bash, "-c", `((BASH_VERSINFO[0] > 5 || (BASH_VERSINFO[0] == 5 && BASH_VERSINFO[1] >= 1)))`).Run() != nil {
		t.Skip("local-sweep.sh needs bash 5.1 or later")
	}
	bin := buildMixdepth(t)
	dir := t.TempDir()
	// sweep runs SCRIPT ARGS... in dir with MIXDEPTH=bin and more environment
	// settings, and returns its exit status.
	sweep := func(script string, env []string, args ...string) int {
		t.Helper()
		cmd := exec.Command(bash, append([]string{script}, args...)...)
		cmd.Env = append(append(os.Environ(), "MIXDEPTH="+bin), env...)
		cmd.Dir = dir
		out, err := cmd.CombinedOutput()
		var exit *exec.ExitError
		if errors.As(err, &exit) {
			t.Logf("%s %s: exit status %d\n%s", script, strings.Join(args, " "), exit.ExitCode(), out)
			return exit.ExitCode()
		}
		if err != nil {
			t.Fatalf("%s: %v\n%s", script, err, out)
		}
		return 0
	}
	// single runs mixdepth ARGS... --out dir/NAME and returns the table.
	single := func(name string, args ...string) *tables.Table {
		t.Helper()
		out := filepath.Join(dir, name)
		if b, err := exec.Command(bin, append(args, "--out", out)...).CombinedOutput(); err != nil {
			t.Fatalf("mixdepth %s: %v\n%s", strings.Join(args, " "), err, b)
		}
		return readTable(t, out)
	}
	here, err := filepath.Abs(".")
	if err != nil {
		t.Fatal(err)
	}
	local := filepath.Join(here, "local-sweep.sh")

	// submit.sh sets --workers itself; the local sweeps give it.
	scanArgs := []string{"--graph", "line:4", "--depths", "1,2,4", "--instances", "7", "--seed", "9"}
	wantScan := single("single-scan.parquet", append([]string{"scan"}, scanArgs...)...)
	if st := sweep(local, nil, append([]string{"scan", "--parts", "3", "--jobs", "2", "--out", "scan.parquet", "--", "--workers", "1"}, scanArgs...)...); st != 0 {
		t.Fatalf("local-sweep.sh scan: exit status %d", st)
	}
	equalRows(t, "local-sweep.sh scan", readTable(t, filepath.Join(dir, "scan.parquet")), wantScan)
	for k := range 3 {
		if _, err := os.Stat(filepath.Join(dir, "scan.parquet.parts", fmt.Sprintf("part-%d-of-3.parquet", k))); err != nil {
			t.Errorf("part %d: %v", k, err)
		}
	}

	// Noise, so that the trajectory and readout streams matter too.
	sampleArgs := []string{"--graph", "line:4", "--depth", "4", "--instances", "5", "--shots", "30", "--gate-error", "0.02",
		"--trajectories", "3", "--readout-error", "0.01,0.02", "--seed", "11", "--workers", "1"}
	wantSample := single("single-sample.arrow", append([]string{"sample"}, sampleArgs...)...)
	if st := sweep(local, nil, append([]string{"sample", "--parts", "2", "--jobs", "2", "--out", "sample.arrow", "--"}, sampleArgs...)...); st != 0 {
		t.Fatalf("local-sweep.sh sample: exit status %d", st)
	}
	equalRows(t, "local-sweep.sh sample", readTable(t, filepath.Join(dir, "sample.arrow")), wantSample)

	// A stand-in for sbatch: runs "--array=0-M script args" as M+1 tasks with
	// SLURM_ARRAY_TASK_ID set, a job without --array (the merge, which comes
	// second) at once, and prints a job id as --parsable does.
	fake := filepath.Join(dir, "sbatch")
	if err := os.WriteFile(fake, []byte(`#!/usr/bin/env bash
set -euo pipefail
array="" script=""
while [[ $# -gt 0 ]]; do
	case "$1" in
	--array=*) array=${1#--array=}; shift ;;
	--*) shift ;;
	*) script=$1; shift; break ;;
	esac
done
if [[ -n "$array" ]]; then
	for ((k = ${array%-*}; k <= ${array#*-}; k++)); do
		SLURM_ARRAY_TASK_ID=$k SLURM_CPUS_PER_TASK=1 bash "$script" "$@" >/dev/null
	done
	echo "4711;cluster"
else
	bash "$script" "$@" >/dev/null
	echo "4712"
fi
`), 0o755); err != nil {
		t.Fatal(err)
	}
	if st := sweep(filepath.Join(here, "submit.sh"), []string{"SBATCH=" + fake}, append([]string{"scan", "--parts", "3", "--out", "slurm.parquet", "--"}, scanArgs...)...); st != 0 {
		t.Fatalf("submit.sh scan: exit status %d", st)
	}
	equalRows(t, "submit.sh scan", readTable(t, filepath.Join(dir, "slurm.parquet")), wantScan)

	if st := sweep(local, nil, "scan", "--parts", "2", "--out", "bad.parquet", "--", "--graph", "line:1"); st != 2 {
		t.Errorf("local-sweep.sh with a graph that mixdepth refuses: exit status %d, want 2", st)
	}
	if _, err := os.Stat(filepath.Join(dir, "bad.parquet")); err == nil {
		t.Error("a failed sweep wrote a merged table")
	}
}

// needBash returns the path of bash, skipping the test when there is none.
// It also reads the scripts, so that go test's cache, which notices the
// files a test opens, reruns the tests when a script changes.
func needBash(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"test.sh", "options.sh", "local-sweep.sh", "submit.sh", "sweep.slurm", "merge.slurm"} {
		if _, err := os.ReadFile(name); err != nil {
			t.Fatal(err)
		}
	}
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash is not installed: the cluster scripts are bash scripts")
	}
	return bash
}

// buildMixdepth builds cmd/mixdepth into a temporary directory.
func buildMixdepth(t *testing.T) string {
	t.Helper()
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command to build mixdepth with")
	}
	bin := filepath.Join(t.TempDir(), "mixdepth")
	cmd := exec.Command(goTool, "build", "-o", bin, "mixdepth/cmd/mixdepth")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

func readTable(t *testing.T, path string) *tables.Table {
	t.Helper()
	tab, err := tables.Read(path)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// equalRows fails unless got and want have the same columns and the same
// rows in the same order, floats equal bit for bit.
func equalRows(t *testing.T, what string, got, want *tables.Table) {
	t.Helper()
	if !reflect.DeepEqual(got.Fields, want.Fields) {
		t.Fatalf("%s: columns %v, want %v", what, got.Fields, want.Fields)
	}
	if got.Len() != want.Len() {
		t.Fatalf("%s: %d rows, want %d", what, got.Len(), want.Len())
	}
	for j, f := range want.Fields {
		same := reflect.DeepEqual(got.Columns[j], want.Columns[j])
		if g, ok := got.Columns[j].([]float64); ok {
			w := want.Columns[j].([]float64)
			same = true
			for i := range w {
				same = same && math.Float64bits(g[i]) == math.Float64bits(w[i])
			}
		}
		if !same || !reflect.DeepEqual(valid(got, j), valid(want, j)) {
			t.Errorf("%s: column %s differs from the single run's", what, f.Name)
		}
	}
}

// valid returns the validity list of column j, nil when it has no nulls.
func valid(tab *tables.Table, j int) []bool {
	if tab.Valid == nil {
		return nil
	}
	return tab.Valid[j]
}
