package circuits

import "math/rand/v2"

// Ensemble is a distribution of two-qubit gates.
type Ensemble interface {
	// Name is the spec that selects the ensemble ("haar").
	Name() string
	// Gate draws one gate from rng into m (row-major, basis 2·b_a + b_b).
	Gate(rng *rand.Rand, m *[16]complex128)
}

// Haar is the Haar measure on U(4).
type Haar struct{}

// Name returns "haar".
func (Haar) Name() string { return "haar" }

// Gate draws a Haar-random U(4) gate (Mezzadri 2007).
func (Haar) Gate(rng *rand.Rand, m *[16]complex128) { HaarUnitary(rng, 4, m[:]) }

// Ensembles lists the built-in gate-set specs accepted by NewEnsemble.
var Ensembles = []string{"haar", "clifford", "cz+haar1", "cnot+haar1", "iswap+haar1", "sqrt-iswap+haar1"}

// NewEnsemble returns the gate ensemble named by spec: one of Ensembles
// (Haar, Clifford, or a GateSet "NAME+haar1" for NAME in EntanglerNames) or
// the path of a gate-set file (see ReadGateSet); built-in names win over
// files. Errors are *ParseError values wrapping ErrUnknownGateSet or
// ErrGateSet.
func NewEnsemble(spec string) (Ensemble, error) { return NewEnsembleWith(spec, GateOptions{}) }

// NewEnsembleWith is NewEnsemble with options for a gate-set file.
func NewEnsembleWith(spec string, o GateOptions) (Ensemble, error) {
	switch spec {
	case "haar":
		return Haar{}, nil
	}
	return namedEnsemble(spec, o)
}
