package circuits

import (
	"fmt"
	"math/rand/v2"
)

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

// Ensembles lists the gate-set specs accepted by NewEnsemble.
var Ensembles = []string{"haar"}

// NewEnsemble returns the gate ensemble named by spec.
func NewEnsemble(spec string) (Ensemble, error) {
	switch spec {
	case "haar":
		return Haar{}, nil
	}
	return nil, fmt.Errorf("circuits: unknown gate set %q: use haar", spec)
}
