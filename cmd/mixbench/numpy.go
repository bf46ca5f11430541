package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"strings"
)

// findNumpy returns a python3 that imports numpy: Debian's /usr/bin/python3
// first (python3-numpy), then python3 on PATH; "" when there is none.
func findNumpy() string {
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		if exec.Command(py, "-c", "import numpy").Run() == nil {
			return py
		}
	}
	return ""
}

// numpyScan runs scripts/numpy_scan.py (from the repository root, passing
// its error output to stderr) and returns its elapsed seconds (its
// own timer, which excludes the interpreter's start) and its collision ratio
// at the last depth. OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE are removed from
// its environment: they pin an old OpenBLAS kernel on this machine and would
// slow numpy (see the environment notes); numpy's tensordot calls BLAS.
func numpyScan(ctx context.Context, stderr io.Writer, py string, rows, cols, depth, instances int) (secs, last float64, blas string, err error) {
	cmd := exec.CommandContext(ctx, py, "scripts/numpy_scan.py", "--rows", fmt.Sprint(rows), "--cols", fmt.Sprint(cols),
		"--depth", fmt.Sprint(depth), "--instances", fmt.Sprint(instances))
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "OPENBLAS_CORETYPE=") && !strings.HasPrefix(kv, "OPENBLAS_L2_SIZE=") {
			cmd.Env = append(cmd.Env, kv)
		}
	}
	cmd.Stderr = stderr
	out, err := cmd.Output()
	if err != nil {
		return 0, 0, "", err
	}
	var res struct {
		Seconds float64           `json:"seconds"`
		Ratio   []float64         `json:"collision_ratio"`
		Numpy   string            `json:"numpy"`
		BLAS    []json.RawMessage `json:"blas"`
	}
	if err := json.Unmarshal(out, &res); err != nil {
		return 0, 0, "", fmt.Errorf("numpy_scan.py output: %w", err)
	}
	if len(res.Ratio) == 0 {
		return 0, 0, "", fmt.Errorf("numpy_scan.py reported no depths")
	}
	blas = "numpy " + res.Numpy
	for _, b := range res.BLAS {
		blas += " " + string(b)
	}
	return res.Seconds, res.Ratio[len(res.Ratio)-1], blas, nil
}
