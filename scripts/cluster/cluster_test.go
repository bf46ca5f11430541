package cluster

import (
	"errors"
	"os/exec"
	"testing"
)

// TestScripts runs test.sh, which checks the option handling, the
// parallelism, the failure and signal handling of local-sweep.sh, and the
// jobs that submit.sh submits, against stand-ins for mixdepth and sbatch.
// It takes about 6 s, mostly the stand-in parts' sleeps.
func TestScripts(t *testing.T) {
	if testing.Short() {
		t.Skip("skipped with -short: test.sh sleeps for about 6 s")
	}
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash is not installed: the cluster scripts are bash scripts")
	}
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
