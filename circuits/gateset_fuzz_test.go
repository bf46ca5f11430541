package circuits

import (
	"strings"
	"testing"
)

// FuzzReadGateSet: any bytes give a gate set or an error, never a panic; a
// gate set read has unitary gates (its own check, repeated here on the
// entangler).
func FuzzReadGateSet(f *testing.F) {
	for _, s := range []string{
		`{"entangler": [[[1, 0], [0, 0], [0, 0], [0, 0]], [[0, 0], [1, 0], [0, 0], [0, 0]], [[0, 0], [0, 0], [1, 0], [0, 0]], [[0, 0], [0, 0], [0, 0], [-1, 0]]], "single_qubit": "haar"}`,
		`{"entangler": [[[1, 0], [0, 0], [0, 0], [0, 0]], [[0, 0], [1, 0], [0, 0], [0, 0]], [[0, 0], [0, 0], [1, 0], [0, 0]], [[0, 0], [0, 0], [0, 0], [-1, null]]], "single_qubit": "haar"}`,
		`{}`, `null`, `[]`, ``, `{"entangler": 1}`,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		gs, err := ReadGateSet("f.json", strings.NewReader(string(data)))
		if err != nil || gs == nil {
			return
		}
		if dev := UnitaryDeviation(gs.G[:], 4); !(dev <= UnitaryTolerance) {
			t.Errorf("accepted a non-unitary entangler (deviation %g)", dev)
		}
	})
}
