package runs

import (
	"errors"
	"testing"

	"mixdepth/circuits"
	"mixdepth/tables"
)

// TestNoiseFromMeta: the uniform keys and a calibration's content rebuild the
// ChipNoise element by element (the file's rows over the uniform rates), an
// absent key means no error of that kind, and an altered calibration or an
// unparsable value is refused with ErrValue.
func TestNoiseFromMeta(t *testing.T) {
	g, err := circuits.ParseGraph("line:3")
	if err != nil {
		t.Fatal(err)
	}
	cal := "qubit,coupled_to,pair_error,readout_10\n1,2,0.03,\n2,,,0.07\n"
	var meta tables.Meta
	meta.Set("gate_error", "0.01")
	meta.Set("readout_error", "0.02")
	meta.Set(KeyCalibration, cal)
	meta.Set(KeyCalibrationDigest, CalibrationDigest([]byte(cal)))
	c, err := NoiseFromMeta(meta, g)
	if err != nil {
		t.Fatal(err)
	}
	if c.PairError(0, 1) != 0.01 || c.PairError(1, 2) != 0.03 || c.Readout01[2] != 0.02 || c.Readout10[2] != 0.07 ||
		c.Readout10[0] != 0.02 || c.Single[1] != 0 || c.Fidelity != 1 {
		t.Errorf("rebuilt %+v", c)
	}
	meta.Set(KeyCalibration, cal+"0,,,0.5\n")
	if _, err := NoiseFromMeta(meta, g); !errors.Is(err, ErrValue) {
		t.Errorf("altered calibration: %v, want ErrValue", err)
	}
	var bad tables.Meta
	bad.Set("fidelity", "high")
	if _, err := NoiseFromMeta(bad, g); !errors.Is(err, ErrValue) {
		t.Errorf("fidelity %q: %v, want ErrValue", "high", err)
	}
}
