package runs

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"strconv"
	"strings"

	"mixdepth/circuits"
	"mixdepth/tables"
)

// CalibrationDigest is the first 16 hex digits of the SHA-256 of a
// calibration file's content, the value of KeyCalibrationDigest.
func CalibrationDigest(content []byte) string {
	sum := sha256.Sum256(content)
	return hex.EncodeToString(sum[:])[:16]
}

// NoiseFromMeta rebuilds the noise of a sample table written on the graph g
// from its metadata: the uniform keys fidelity, gate_error, readout_error
// ("p01,p10", or one value for both) and single_qubit_error (absent keys
// mean no error of that kind), then the calibration content
// (KeyCalibration), checked against its digest (KeyCalibrationDigest). A
// value that does not parse, or an altered calibration, gives an error
// wrapping ErrValue; a calibration that does not fit g, one wrapping
// circuits.ErrCalibration.
func NoiseFromMeta(meta tables.Meta, g *circuits.Graph) (*circuits.ChipNoise, error) {
	get := func(key, def string) (float64, error) {
		s, ok := meta.Get(key)
		if !ok {
			s = def
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return 0, fmt.Errorf("metadata %s %q is not a number: %w", key, s, ErrValue)
		}
		return v, nil
	}
	f, err := get("fidelity", "1")
	if err != nil {
		return nil, err
	}
	pair, err := get("gate_error", "0")
	if err != nil {
		return nil, err
	}
	single, err := get(KeySingleQubitError, "0")
	if err != nil {
		return nil, err
	}
	readout, ok := meta.Get("readout_error")
	if !ok {
		readout = "0,0"
	}
	parts := strings.Split(readout, ",")
	if len(parts) > 2 {
		return nil, fmt.Errorf("metadata readout_error %q: want p01,p10: %w", readout, ErrValue)
	}
	var p [2]float64
	for i, s := range parts {
		if p[i], err = strconv.ParseFloat(strings.TrimSpace(s), 64); err != nil {
			return nil, fmt.Errorf("metadata readout_error %q: %q is not a number: %w", readout, s, ErrValue)
		}
	}
	if len(parts) == 1 {
		p[1] = p[0]
	}
	base := circuits.UniformNoise(g, pair, single, p[0], p[1], f)
	if err := base.Validate(g); err != nil {
		return nil, fmt.Errorf("metadata: %v: %w", err, ErrValue)
	}
	content, ok := meta.Get(KeyCalibration)
	if !ok {
		return base, nil
	}
	if d, _ := meta.Get(KeyCalibrationDigest); d != CalibrationDigest([]byte(content)) {
		return nil, fmt.Errorf("metadata %s has digest %s but %s is %q: the metadata was altered: %w", KeyCalibration, CalibrationDigest([]byte(content)), KeyCalibrationDigest, d, ErrValue)
	}
	return circuits.ReadCalibration("metadata "+KeyCalibration, bytes.NewReader([]byte(content)), g, base)
}
