package main

import (
	"bytes"

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
		meta.Set(runs.KeyCalibrationDigest, runs.CalibrationDigest(n.content))
	}
}
