package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"strconv"

	"github.com/spf13/pflag"

	"mixdepth/circuits"
	"mixdepth/internal/inputfile"
	"mixdepth/runs"
	"mixdepth/tables"
)

// noiseFlags are the per-element noise flags shared by the commands that
// model a chip's errors: --calibration FILE and, where the command has no
// flag of its own for it, --single-qubit-error. chip builds the
// circuits.ChipNoise from the uniform flags and the file, whose entries
// override them.
type noiseFlags struct {
	calibration string
	single      float64
	// withSingle is set when add registered --single-qubit-error.
	withSingle bool
	// content is the calibration file as read by chip.
	content []byte
}

// add registers --calibration, and --single-qubit-error when single.
func (n *noiseFlags) add(fs *pflag.FlagSet, single bool) {
	fs.StringVar(&n.calibration, "calibration", "", "calibration file (CSV) of per-coupler and per-qubit error rates, overriding the uniform rates element by element (README: calibration files)")
	if single {
		n.withSingle = true
		fs.Float64Var(&n.single, "single-qubit-error", 0, "Pauli error rate in [0, 1] after every single-qubit gate (X, Y or Z, uniformly; gate sets NAME+haar1 and gate files)")
	}
}

// inputs registers the calibration file as an input of the command, so that
// no output can replace it.
func (n *noiseFlags) inputs(c *ioCheck) { c.input("--calibration", n.calibration) }

// used reports whether the flags ask for per-element noise: a calibration
// file or a non-zero single-qubit rate.
func (n *noiseFlags) used() bool { return n.calibration != "" || n.single != 0 }

// chip returns the noise of g: the uniform rates pair, single, p01, p10 and
// the fidelity f on every element, then the calibration file's entries.
// Errors are bad input.
func (n *noiseFlags) chip(g *circuits.Graph, pair, single, p01, p10, f float64) (*circuits.Calibration, error) {
	base := circuits.UniformNoise(g, pair, single, p01, p10, f)
	if err := base.Validate(g); err != nil {
		return nil, badInput("%v", err)
	}
	if n.calibration == "" {
		return &circuits.Calibration{Noise: base}, nil
	}
	data, err := inputfile.ReadFile(n.calibration, inputfile.SmallLimit)
	if err != nil {
		return nil, badInput("--calibration %q: %v", echo(n.calibration), err)
	}
	n.content = data
	return circuits.ReadCalibrationInfo(n.calibration, bytes.NewReader(data), g, base)
}

// setMeta records in meta what rebuilds the noise with the uniform keys
// (fidelity, gate_error, readout_error): the calibration file's content and
// digest, and the single-qubit rate. Without per-element noise it sets
// nothing, so that the tables of runs without these flags are unchanged.
func (n *noiseFlags) setMeta(meta *tables.Meta) {
	if n.single != 0 {
		meta.Set(runs.KeySingleQubitError, formatFloat(n.single))
	}
	if n.content != nil {
		meta.Set(runs.KeyCalibration, string(n.content))
		meta.Set(runs.KeyCalibrationDigest, calibrationDigest(n.content))
	}
}

// calibrationDigest is the first 16 hex digits of the SHA-256 of a
// calibration file's content.
func calibrationDigest(content []byte) string {
	sum := sha256.Sum256(content)
	return hex.EncodeToString(sum[:])[:16]
}

// chipFromMeta rebuilds the noise of a sample table written on the graph g
// from its metadata: the uniform keys fidelity, gate_error, readout_error
// and single_qubit_error (0 when absent), then the calibration content,
// checked against its digest.
func chipFromMeta(meta tables.Meta, g *circuits.Graph) (*circuits.ChipNoise, error) {
	num := func(key, s string) (float64, error) {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return 0, fmt.Errorf("metadata %s %q is not a number: %w", key, s, runs.ErrValue)
		}
		return v, nil
	}
	get := func(key, def string) (float64, error) {
		s, ok := meta.Get(key)
		if !ok {
			s = def
		}
		return num(key, s)
	}
	f, err := get("fidelity", "1")
	if err != nil {
		return nil, err
	}
	pair, err := get("gate_error", "0")
	if err != nil {
		return nil, err
	}
	single, err := get(runs.KeySingleQubitError, "0")
	if err != nil {
		return nil, err
	}
	readout, ok := meta.Get("readout_error")
	if !ok {
		readout = "0,0"
	}
	p01, p10, err := parseReadout(readout)
	if err != nil {
		return nil, err
	}
	base := circuits.UniformNoise(g, pair, single, p01, p10, f)
	content, ok := meta.Get(runs.KeyCalibration)
	if !ok {
		return base, nil
	}
	if d, _ := meta.Get(runs.KeyCalibrationDigest); d != calibrationDigest([]byte(content)) {
		return nil, fmt.Errorf("metadata %s has digest %s but %s is %q: the metadata was altered: %w", runs.KeyCalibration, calibrationDigest([]byte(content)), runs.KeyCalibrationDigest, d, runs.ErrValue)
	}
	return circuits.ReadCalibration("metadata "+runs.KeyCalibration, bytes.NewReader([]byte(content)), g, base)
}

// digitalParts returns the factors of c.DigitalFidelity for depth steps of
// s and e: the two-qubit gates alone, the single-qubit gates alone, the
// readout alone, and the whole (with c's global fidelity), each computed by
// DigitalFidelity on a copy of c with the other rates zero.
func digitalParts(c *circuits.ChipNoise, s circuits.Schedule, e circuits.Ensemble, depth int) (two, single, readout, all float64) {
	zero := make([]float64, c.Qubits())
	only := func(pair bool, single, r01, r10 []float64) float64 {
		d := *c // shares the coupler index, read only
		d.Fidelity = 1
		if !pair {
			d.Pair = make([]float64, len(c.Pair))
		}
		d.Single, d.Readout01, d.Readout10 = single, r01, r10
		return d.DigitalFidelity(s, e, depth)
	}
	two = only(true, zero, zero, zero)
	single = only(false, c.Single, zero, zero)
	readout = only(false, zero, c.Readout01, c.Readout10)
	return two, single, readout, c.DigitalFidelity(s, e, depth)
}
