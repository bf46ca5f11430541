package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"mixdepth/circuits"
	"mixdepth/runs"
	"mixdepth/sampling"
	"mixdepth/tables"
)

func init() {
	register(command{name: "sample", summary: "draw bitstrings from simulated random circuits, ideal or noisy, for the sampling benchmark", run: runSample})
}

// defaultSampleDepth is the depth of sample and plan when --depth is not
// given: past the anti-concentration depth of the demo chip (14 layers by
// scan at eps 0.05).
const defaultSampleDepth = 16

// testHookSampleProgress, when non-nil, is called after each finished
// instance of sample; tests use it to interrupt a run part-way.
var testHookSampleProgress func()

// sampleJSON is the --json document of sample. Field names are an interface.
type sampleJSON struct {
	runs.Header
	Seed              uint64           `json:"seed"`
	Depth             int              `json:"depth"`
	GateCount         int              `json:"gate_count"`
	Instances         int              `json:"instances"`
	Part              string           `json:"part"`
	InstancesDone     string           `json:"instances_done"`
	Shots             int              `json:"shots"`
	Fidelity          float64          `json:"fidelity"`
	GateError         float64          `json:"gate_error"`
	ReadoutError      [2]float64       `json:"readout_error"`
	Trajectories      int              `json:"trajectories"`
	SingleQubitError  *float64         `json:"single_qubit_error,omitempty"`
	Calibration       *calibrationJSON `json:"calibration,omitempty"`
	PredictedFidelity float64          `json:"predicted_fidelity"`
	LinearXEB         *float64         `json:"linear_xeb"`
	LinearXEBStderr   *float64         `json:"linear_xeb_stderr"`
	IdealXEB          *float64         `json:"ideal_xeb"`
	NormalizedXEB     *float64         `json:"normalized_xeb"`
	Out               string           `json:"out,omitempty"`
	Circuits          string           `json:"circuits,omitempty"`
}

func runSample(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("sample", "Simulates random circuit instances exactly and draws --shots bitstrings from each output\n"+
		"distribution (an alias table: O(1) per shot), writing one row per shot with the ideal\n"+
		"probability of the recorded bitstring, so that the table can be scored with 'mixdepth score'.\n\n"+
		"Noise, each part optional and independent:\n"+
		"  --gate-error e      after every two-qubit gate, with probability e one of the 15 non-identity\n"+
		"                      two-qubit Paulis, uniformly (Pauli error rate e); simulated by quantum\n"+
		"                      trajectories: T = min(shots, --trajectories) per instance, each\n"+
		"                      re-simulating the circuit with fresh Pauli draws, the shots split as\n"+
		"                      evenly as possible (the first shots mod T trajectories take one more);\n"+
		"                      the shots of one trajectory share its errors, so with T < shots the\n"+
		"                      XEB varies between runs more than its shot-noise standard error says:\n"+
		"                      --trajectories equal to --shots makes every shot independent\n"+
		"  --fidelity f        global depolarizing: each shot comes from the circuit with probability f,\n"+
		"                      else uniformly from all 2^n bitstrings\n"+
		"  --readout-error p01,p10\n"+
		"                      at measurement each bit flips independently, 0→1 with probability p01\n"+
		"                      and 1→0 with probability p10 (one value sets both)\n"+
		"  --single-qubit-error e1\n"+
		"                      after every single-qubit gate (the dressing u_a, u_b of a gate set G·(u_a ⊗ u_b),\n"+
		"                      before G, and the final layer), with probability e1 one of X, Y, Z, uniformly\n"+
		"  --calibration FILE  per-coupler and per-qubit rates (two-qubit Pauli, single-qubit, readout) that\n"+
		"                      override the uniform rates above element by element (README: calibration files)\n"+
		"With no --graph it samples the demo chip.",
		"mixdepth sample --depth 16 --instances 10 --shots 2000 --gate-error 0.005 --readout-error 0.01,0.03 --out samples.parquet --circuits circuits.json", stdout)
	cf := circuitFlags{checkGraph: func(g *circuits.Graph) error { return sampling.CheckQubits(g.Qubits, "sampling") }}
	cf.add(fs)
	depth := fs.Int("depth", defaultSampleDepth, "circuit depth (layers, or gates for random-edge)")
	instances := fs.Int("instances", 10, "number of random circuit instances")
	shots := fs.Int("shots", 1000, "bitstrings drawn per instance")
	fidelity := fs.Float64("fidelity", 1, "global depolarizing fidelity f in [0, 1]: a shot is ideal with probability f, else uniform")
	gateError := fs.Float64("gate-error", 0, "Pauli error rate e in [0, 1] after every two-qubit gate (quantum trajectories)")
	readout := fs.String("readout-error", "0,0", "readout flip probabilities p01,p10 (0→1, 1→0), or one value for both")
	var nf noiseFlags
	nf.add(fs, true)
	trajectories := fs.Int("trajectories", sampling.DefaultTrajectories, "trajectories per instance with gate errors (--gate-error, --single-qubit-error, --calibration): T = min(shots, this)")
	partFlag := fs.String("part", "", partFlagHelp)
	workers := fs.Int("workers", defaultWorkers(), "worker goroutines")
	out := fs.String("out", "", "write the shots to FILE.arrow or FILE.parquet")
	circuitsOut := fs.String("circuits", "", "write every instance's gates to FILE.json (qubit pairs and 4×4 matrices) for hardware or another simulator")
	asJSON := fs.Bool("json", false, "print one JSON document instead of the text report")
	progress := fs.Bool("progress", false, progressFlagHelp)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return badInput("sample takes no positional arguments (got %q)", fs.Arg(0))
	}
	var files ioCheck
	files.circuitInputs(&cf)
	nf.inputs(&files)
	files.output("out", *out)
	files.output("circuits", *circuitsOut)
	if err := files.check(fs); err != nil {
		return err
	}
	s, err := cf.resolve(ctx)
	if err != nil {
		return err
	}
	if err := checkCircuitDepth(s, *depth); err != nil {
		return err
	}
	switch {
	case *depth < 1:
		return badInput("--depth %d: must be at least 1", *depth)
	case *instances < 1 || *instances > maxInstances:
		return badInput("--instances %d: must be between 1 and %d", *instances, maxInstances)
	case *shots < 1:
		return badInput("--shots %d: must be at least 1", *shots)
	case *trajectories < 1:
		return badInput("--trajectories %d: must be at least 1", *trajectories)
	case *workers < 1:
		return badInput("--workers %d: must be at least 1", *workers)
	}
	if err := checkProbability("fidelity", *fidelity); err != nil {
		return err
	}
	if err := checkProbability("gate-error", *gateError); err != nil {
		return err
	}
	if err := checkProbability("single-qubit-error", nf.single); err != nil {
		return err
	}
	p01, p10, err := parseReadout(*readout)
	if err != nil {
		return err
	}
	part, err := parsePart(*partFlag)
	if err != nil {
		return err
	}
	noise := sampling.Noise{Fidelity: *fidelity, GateError: *gateError, Readout01: p01, Readout10: p10}
	var cal *circuits.Calibration
	if nf.used() {
		if cal, err = nf.chip(s.graph, *gateError, nf.single, p01, p10, *fidelity); err != nil {
			return err
		}
		noise = sampling.Noise{Chip: cal.Noise}
	}
	cfg := &sampling.Config{
		Schedule: s.schedule, Ensemble: s.ensemble, Qubits: s.graph.Qubits, Depth: *depth, Seed: cf.seed,
		Instances: part.Instances(*instances), Shots: *shots, Noise: noise, Trajectories: *trajectories, Workers: *workers,
	}
	if len(cfg.Instances) == 0 {
		return badInput("--part %s selects no instance of %d: use fewer parts or more instances", part, *instances)
	}
	gateCount := s.schedule.GateCount(*depth)
	if err := cfg.Validate(); err != nil {
		return err
	}
	usedTrajectories := cfg.TrajectoriesPerInstance()

	meta := runMeta(s, &cf)
	meta.Set("command", "sample")
	meta.Set("depth", strconv.Itoa(*depth))
	meta.Set("gate_count", strconv.Itoa(gateCount))
	meta.Set("instances", strconv.Itoa(*instances))
	meta.Set("shots", strconv.Itoa(*shots))
	meta.Set("fidelity", formatFloat(*fidelity))
	meta.Set("gate_error", formatFloat(*gateError))
	meta.Set("readout_error", formatFloat(p01)+","+formatFloat(p10))
	nf.setMeta(&meta)
	meta.Set("trajectories", strconv.Itoa(usedTrajectories))
	meta.Set("part", part.String())
	if *out != "" {
		if err := checkWritable(*out, sampling.SampleFields(), meta, "--out"); err != nil {
			return err
		}
	}
	if *circuitsOut != "" {
		if err := checkJSONWritable(*circuitsOut); err != nil {
			return err
		}
	}

	tick, stopProgress := startProgress(stderr, *progress, "sampling instances", len(cfg.Instances))
	defer stopProgress()
	cfg.Progress = func() {
		tick()
		if testHookSampleProgress != nil {
			testHookSampleProgress()
		}
	}
	var results []*sampling.Result
	done, err := sampling.Run(ctx, cfg, func(r *sampling.Result) error {
		results = append(results, r)
		return nil
	})
	interrupted := errors.Is(err, context.Canceled)
	if err != nil && !interrupted {
		return err
	}
	partial := len(done) < len(cfg.Instances)
	meta.Set("partial", strconv.FormatBool(partial))
	meta.Set("instances_done", formatIDs(done))
	if *out != "" {
		if err := sampling.WriteSampleTable(*out, meta, s.graph.Qubits, results); err != nil {
			return err
		}
	}
	if *circuitsOut != "" {
		f := &sampling.CircuitFile{
			Qubits: s.graph.Qubits, Graph: s.graph.Name, GraphDigest: s.graph.Digest(), Edges: s.graph.Edges, Labels: s.graph.Labels,
			Schedule: s.schedule.Kind(), Gates: s.ensemble.Name(), Seed: cf.seed, Depth: *depth,
			Part: part.String(), Partial: partial,
		}
		for _, r := range results {
			f.Circuits = append(f.Circuits, r.Circuit)
		}
		if err := tables.WriteFileAtomic(*circuitsOut, func(w io.Writer) error { return sampling.WriteCircuits(w, f) }); err != nil {
			return err
		}
	}
	if interrupted {
		msg := fmt.Sprintf("interrupted after %d of %d instance(s) of this run", len(done), len(cfg.Instances))
		if len(done) > 0 {
			msg += " (done: " + formatIDs(done) + ")"
		}
		var files []string
		for _, p := range []string{*out, *circuitsOut} {
			if p != "" {
				files = append(files, p)
			}
		}
		if len(files) > 0 {
			msg += "; the finished instances are in " + strings.Join(files, " and ") + ", marked partial"
		}
		fmt.Fprintln(stderr, msg)
		return errInterrupted
	}

	var predicted float64
	if cal != nil {
		predicted = cal.Noise.DigitalFidelity(s.schedule, s.ensemble, *depth)
	} else {
		predicted = noise.ErrorModel().Predict(sampling.CountGates(s.schedule, s.ensemble, s.graph.Qubits, *depth)).Fidelity
	}
	groups := make([]sampling.InstanceSamples, len(results))
	for i, r := range results {
		groups[i] = r.Samples()
	}
	rep := sampling.Score(s.graph.Qubits, groups)
	if s.spec.Parts > 1 {
		rep.SetLimit(s.spec.Limit())
	}
	if *asJSON {
		var single *float64
		var calDoc *calibrationJSON
		if cal != nil {
			single = &nf.single
			if nf.calibration != "" {
				calDoc = &calibrationJSON{File: nf.calibration, Digest: runs.CalibrationDigest(nf.content), Couplers: cal.Couplers, Qubits: cal.Qubits, Skipped: cal.Skipped}
			}
		}
		return writeJSON(stdout, sampleJSON{
			Header: s.spec.Header(),
			Seed:   cf.seed, Depth: *depth, GateCount: gateCount,
			Instances: *instances, Part: part.String(), InstancesDone: formatIDs(done), Shots: *shots,
			Fidelity: *fidelity, GateError: *gateError, ReadoutError: [2]float64{p01, p10},
			SingleQubitError: single, Calibration: calDoc,
			Trajectories: usedTrajectories, PredictedFidelity: predicted,
			LinearXEB: finiteOrNull(rep.Linear), LinearXEBStderr: finiteOrNull(rep.LinearErr),
			IdealXEB: finiteOrNull(rep.Ideal), NormalizedXEB: finiteOrNull(rep.Normalized),
			Out: *out, Circuits: *circuitsOut,
		})
	}
	fmt.Fprintln(stdout, s.describe())
	fmt.Fprintf(stdout, "seed %d · depth %d (%d two-qubit gates) · %d instance(s) × %d shots", cf.seed, *depth, gateCount, len(done), *shots)
	if !part.IsWhole() {
		fmt.Fprintf(stdout, " · part %s of %d instances", part, *instances)
	}
	fmt.Fprintln(stdout)
	uniform := sampling.Noise{Fidelity: *fidelity, GateError: *gateError, Readout01: p01, Readout10: p10}
	if cal != nil && nf.calibration != "" {
		if rates := strings.TrimSuffix(describeNoise(uniform, nf.single, usedTrajectories), " (ideal sampler)"); rates != "none" {
			fmt.Fprintf(stdout, "noise: uniform rates %s\n", rates)
		} else {
			fmt.Fprintln(stdout, "noise: the calibration file's rates only (no uniform rates given)")
		}
		fmt.Fprintf(stdout, "calibration %s: its rates of %d coupler(s) and %d qubit(s) override the uniform ones", nf.calibration, cal.Couplers, cal.Qubits)
		if cal.Skipped > 0 {
			fmt.Fprintf(stdout, " (%d row(s) of dropped elements skipped)", cal.Skipped)
		}
		if usedTrajectories > 0 {
			fmt.Fprintf(stdout, "; %d trajectories per instance", usedTrajectories)
		}
		fmt.Fprintln(stdout)
	} else {
		fmt.Fprintf(stdout, "noise: %s\n", describeNoise(uniform, nf.single, usedTrajectories))
	}
	if s.graph.Labels != nil {
		fmt.Fprintf(stdout, "bitstrings list the qubits in the order %s\n", strings.Join(s.graph.Labels, " "))
	}
	fmt.Fprintln(stdout)
	fmt.Fprintf(stdout, "linear XEB of the drawn shots   %s\n", plusMinus(rep.Linear, rep.LinearErr))
	if s.spec.Parts > 1 {
		fmt.Fprintf(stdout, "ideal value D·Z − 1 (mean)      %.4f   (chip in %d parts, never Porter–Thomas: D·Z tends to D times the product of the parts' Haar values, so D·Z − 1 → %.4f)\n", rep.Ideal, s.spec.Parts, rep.PorterThomas)
	} else {
		fmt.Fprintf(stdout, "ideal value D·Z − 1 (mean)      %.4f   (Porter–Thomas: %.4f)\n", rep.Ideal, rep.PorterThomas)
	}
	fmt.Fprintf(stdout, "normalized F_lin/(D·Z − 1)      %s\n", plusMinus(rep.Normalized, rep.NormalizedErr))
	if cal != nil {
		fmt.Fprintf(stdout, "digital error model fidelity    %.4f   (f · Π gates (1−e) · Π single-qubit gates (1−e1) · readout, element by element)\n", predicted)
	} else {
		fmt.Fprintf(stdout, "digital error model fidelity    %.4f   (f · (1−e)^%d · readout)\n", predicted, gateCount)
	}
	if *out != "" {
		fmt.Fprintf(stdout, "\nShots: %s (%d rows); score it with 'mixdepth score %s'\n", *out, rep.Shots, *out)
	}
	if *circuitsOut != "" {
		if *out == "" {
			fmt.Fprintln(stdout)
		}
		fmt.Fprintf(stdout, "Circuits: %s (%d instance(s))\n", *circuitsOut, len(results))
	}
	return nil
}

// calibrationJSON describes the calibration file of a sample run in its
// --json document. Field names are an interface.
type calibrationJSON struct {
	File     string `json:"file"`
	Digest   string `json:"digest"`
	Couplers int    `json:"couplers"`
	Qubits   int    `json:"qubits"`
	Skipped  int    `json:"skipped"`
}

// describeNoise is the one-line description of a uniform noise model with
// the single-qubit rate single.
func describeNoise(nz sampling.Noise, single float64, trajectories int) string {
	var parts []string
	if nz.GateError > 0 {
		parts = append(parts, fmt.Sprintf("Pauli error rate %g after each two-qubit gate (%d trajectories per instance)", nz.GateError, trajectories))
	}
	if single > 0 {
		parts = append(parts, fmt.Sprintf("Pauli error rate %g after each single-qubit gate", single))
	}
	if nz.Fidelity < 1 {
		parts = append(parts, fmt.Sprintf("global depolarizing fidelity %g", nz.Fidelity))
	}
	if nz.Readout01 > 0 || nz.Readout10 > 0 {
		parts = append(parts, fmt.Sprintf("readout flips 0→1 %g, 1→0 %g", nz.Readout01, nz.Readout10))
	}
	if len(parts) == 0 {
		return "none (ideal sampler)"
	}
	return strings.Join(parts, "; ")
}

// plusMinus formats v ± se with 4 decimals; an unknown error bar is "n/a".
func plusMinus(v, se float64) string {
	if math.IsNaN(se) {
		return fmt.Sprintf("%.4f ± n/a", v)
	}
	return fmt.Sprintf("%.4f ± %.4f", v, se)
}

// parseReadout reads --readout-error "p01,p10" or "p".
func parseReadout(spec string) (p01, p10 float64, err error) {
	parts := strings.Split(spec, ",")
	if len(parts) > 2 {
		return 0, 0, badInput("--readout-error %q: write p01,p10 (0→1 and 1→0 flip probabilities) or one value for both", spec)
	}
	var ps [2]float64
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || !(v >= 0 && v <= 1) {
			return 0, 0, badInput("--readout-error %q: %q is not a probability in [0, 1]", spec, p)
		}
		ps[i] = v
	}
	if len(parts) == 1 {
		ps[1] = ps[0]
	}
	return ps[0], ps[1], nil
}

// checkProbability checks that v lies in [0, 1].
func checkProbability(name string, v float64) error {
	if !(v >= 0 && v <= 1) {
		return badInput("--%s %v: must lie in [0, 1]", name, v)
	}
	return nil
}

func formatFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// checkJSONWritable fails early when path cannot take a JSON file: the name
// must end in .json and its directory must take a new file.
func checkJSONWritable(path string) error {
	if !strings.EqualFold(filepath.Ext(path), ".json") {
		return badInput("--circuits %q: use a name ending in .json", path)
	}
	if info, err := os.Stat(path); err == nil && info.IsDir() {
		return badInput("--circuits %q: is a directory; give a file name ending in .json", path)
	}
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		// The temporary name would only confuse; keep the cause.
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return usageError{fmt.Errorf("--circuits: cannot create %q in directory %q: %w", path, dir, err)}
	}
	f.Close()
	os.Remove(f.Name())
	return nil
}
