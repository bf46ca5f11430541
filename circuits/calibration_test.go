package circuits

import (
	"errors"
	"strings"
	"testing"
)

// calGraph is a labelled 4-qubit line q-0 — q-1 — q-2 — q-3 whose labels
// hold '-', as a lab's names may.
func calGraph(t testing.TB) *Graph {
	t.Helper()
	g, err := ReadEdgeList("chip.edges", strings.NewReader("q-0 q-1\nq-1 q-2\nq-2 q-3\n"))
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// TestReadCalibration checks that each row lands on its element, that
// empty cells keep the base value, that couplers read in either
// orientation, and that base is not changed (values written by hand).
func TestReadCalibration(t *testing.T) {
	g := calGraph(t)
	base := UniformNoise(g, 0.005, 0.001, 0.02, 0.03, 0.9)
	file := `# calibration of the test line (invented values)
qubit, coupled_to, pair_error, single_error, readout_01, readout_10
q-0,   q-1,        0.011,     ,             ,           # coupler (0,1)
q-2,   q-1,        0.004,     ,             ,
q-1,   ,           ,          0.0007,       0.015,      0.041
q-3,   ,           ,          ,             ,           0.06

`
	got, err := ReadCalibrationInfo("cal.csv", strings.NewReader(file), g, base)
	if err != nil {
		t.Fatal(err)
	}
	c := got.Noise
	want := struct{ pair, single, r01, r10 []float64 }{
		[]float64{0.011, 0.004, 0.005},
		[]float64{0.001, 0.0007, 0.001, 0.001},
		[]float64{0.02, 0.015, 0.02, 0.02},
		[]float64{0.03, 0.041, 0.03, 0.06},
	}
	for _, s := range []struct {
		name      string
		got, want []float64
	}{{"pair", c.Pair, want.pair}, {"single", c.Single, want.single}, {"readout01", c.Readout01, want.r01}, {"readout10", c.Readout10, want.r10}} {
		for i := range s.want {
			if s.got[i] != s.want[i] {
				t.Errorf("%s[%d] = %v, want %v", s.name, i, s.got[i], s.want[i])
			}
		}
	}
	if c.Fidelity != 0.9 || got.Couplers != 2 || got.Qubits != 2 || got.Skipped != 0 {
		t.Errorf("fidelity %v, %d couplers, %d qubits, %d skipped; want 0.9, 2, 2, 0", c.Fidelity, got.Couplers, got.Qubits, got.Skipped)
	}
	if base.Pair[0] != 0.005 || base.Readout10[3] != 0.03 {
		t.Error("ReadCalibration changed its base")
	}
	if c.PairError(2, 1) != 0.004 {
		t.Errorf("PairError(2, 1) = %v, want 0.004", c.PairError(2, 1))
	}
	if err := c.Validate(g); err != nil {
		t.Error(err)
	}
}

// TestReadCalibrationNumbers reads a file of an unlabelled graph, with the
// columns in another order and some left out.
func TestReadCalibrationNumbers(t *testing.T) {
	g, err := ParseGraph("ring:4")
	if err != nil {
		t.Fatal(err)
	}
	c, err := ReadCalibration("cal.csv", strings.NewReader("readout_10,qubit\n0.05,3\n"), g, UniformNoise(g, 0, 0, 0, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	if c.Readout10[3] != 0.05 || c.Readout10[0] != 0 {
		t.Errorf("readout10 %v, want 0.05 on qubit 3 only", c.Readout10)
	}
	c, err = ReadCalibration("cal.csv", strings.NewReader("qubit,coupled_to,pair_error\n0,3,0.02\n"), g, UniformNoise(g, 0, 0, 0, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	if c.PairError(3, 0) != 0.02 || c.PairError(0, 1) != 0 {
		t.Errorf("pair %v, want 0.02 on the coupler 3-0 only", c.Pair)
	}
}

// TestReadCalibrationDropped checks that rows of dropped qubits and
// couplers are skipped: one file serves the chip whatever is out of
// service.
func TestReadCalibrationDropped(t *testing.T) {
	d, err := Drop(calGraph(t), "q-3,q-0-q-1", ReadOptions{AllowDisconnected: true})
	if err != nil {
		t.Fatal(err)
	}
	g := d.Graph // q-0, q-1, q-2 with the one coupler q-1 — q-2
	file := "qubit,coupled_to,pair_error,single_error,readout_01,readout_10\n" +
		"q-0,q-1,0.01,,,\n" + // dropped coupler
		"q-2,q-3,0.01,,,\n" + // coupler of a dropped qubit
		"q-1,q-2,0.007,,,\n" +
		"q-3,,,0.001,0.02,0.03\n" + // dropped qubit
		"q-2,,,0.002,,\n"
	c, err := ReadCalibrationInfo("cal.csv", strings.NewReader(file), g, UniformNoise(g, 0, 0, 0, 0, 1))
	if err != nil {
		t.Fatal(err)
	}
	if c.Couplers != 1 || c.Qubits != 1 || c.Skipped != 3 {
		t.Errorf("%d couplers, %d qubits, %d skipped; want 1, 1, 3", c.Couplers, c.Qubits, c.Skipped)
	}
	if c.Noise.PairError(1, 2) != 0.007 || c.Noise.Single[2] != 0.002 {
		t.Errorf("pair %v single %v", c.Noise.Pair, c.Noise.Single)
	}
}

// TestReadCalibrationErrors checks each kind of bad file: an error wrapping
// ErrCalibration that names the file, the line and the problem.
func TestReadCalibrationErrors(t *testing.T) {
	const h = "qubit,coupled_to,pair_error,single_error,readout_01,readout_10\n"
	for _, c := range []struct {
		name, file, want string
		line             int
	}{
		{"no header", "# nothing\n\n", "no header row", 0},
		{"unknown column", "qubit,fidelity\n", `header column "fidelity"`, 1},
		{"repeated column", "qubit,readout_01,readout_01\n", "column readout_01 twice", 1},
		{"no qubit column", "readout_01,readout_10\n", "no qubit column", 1},
		{"cell count", h + "q-0,,,0.001,0.02\n", "5 cells for the 6 columns", 2},
		{"unknown qubit", h + "q-9,,,0.001,,\n", `unknown qubit "q-9"`, 2},
		{"uncoupled", h + "q-0,q-2,0.01,,,\n", "does not couple qubits q-0 and q-2", 2},
		{"self coupler", h + "q-0,q-0,0.01,,,\n", "to itself", 2},
		{"duplicate qubit", h + "q-1,,,0.001,,\n#\nq-1,,,,0.02,\n", "qubit q-1 already on line 2", 4},
		{"duplicate coupler", h + "q-0,q-1,0.01,,,\nq-1,q-0,,,,\n", "coupler q-1-q-0 already on line 2", 3},
		{"above one", h + "q-0,,,1.5,,\n", "outside [0, 1]", 2},
		{"negative", h + "q-0,q-1,-0.01,,,\n", "outside [0, 1]", 2},
		{"NaN", h + "q-0,,,,NaN,\n", "not a finite number", 2},
		{"Inf", h + "q-0,,,,,+Inf\n", "not a finite number", 2},
		{"huge", h + "q-0,,,,,1e999\n", "not a finite number", 2},
		{"not a number", h + "q-0,,,0.1%,,\n", `"0.1%" is not a number`, 2},
		{"qubit row with a coupler rate", h + "q-0,,0.01,,,\n", "pair_error cell but no coupled_to", 2},
		{"coupler row with a qubit rate", h + "q-0,q-1,0.01,,0.02,\n", "has a readout_01 cell", 2},
		{"empty qubit", h + ",,,0.001,,\n", "empty qubit cell", 2},
		{"long line", h + strings.Repeat("x", 70000) + "\n", "line longer than", 2},
	} {
		g := calGraph(t)
		_, err := ReadCalibration("cal.csv", strings.NewReader(c.file), g, UniformNoise(g, 0, 0, 0, 0, 1))
		var pe *ParseError
		switch {
		case err == nil:
			t.Errorf("%s: no error", c.name)
		case !errors.Is(err, ErrCalibration) || !errors.As(err, &pe):
			t.Errorf("%s: %v is not a *ParseError wrapping ErrCalibration", c.name, err)
		case !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "cal.csv") || pe.Line != c.line:
			t.Errorf("%s: %v (line %d), want %q on line %d", c.name, err, pe.Line, c.want, c.line)
		}
	}
}

// TestReadCalibrationLimit checks that a file beyond CalibrationLimit is
// refused, read from a reader that never ends (common practice for a
// mistaken /dev/zero).
func TestReadCalibrationLimit(t *testing.T) {
	g := calGraph(t)
	r := &repeatReader{line: []byte("# a comment line of a file without end\n")}
	_, err := ReadCalibration("endless", r, g, UniformNoise(g, 0, 0, 0, 0, 1))
	if !errors.Is(err, ErrCalibration) || !strings.Contains(err.Error(), "MiB") {
		t.Errorf("endless file: %v, want the size limit", err)
	}
}

// repeatReader repeats line without end.
type repeatReader struct {
	line []byte
	off  int
}

func (r *repeatReader) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		k := copy(p[n:], r.line[r.off:])
		n += k
		r.off = (r.off + k) % len(r.line)
	}
	return n, nil
}

// FuzzReadCalibration: any bytes give a noise or an error wrapping
// ErrCalibration, never a panic; a noise read is valid for the graph.
func FuzzReadCalibration(f *testing.F) {
	for _, s := range []string{
		"qubit,coupled_to,pair_error,single_error,readout_01,readout_10\nq-0,q-1,0.01,,,\nq-1,,,0.001,0.02,0.03\n",
		"qubit,readout_10\nq-3,0.5\n", "qubit\n", "", "#\n", "qubit,coupled_to\nq-0,q-0\n", "qubit,pair_error\nq-0,NaN\n",
	} {
		f.Add([]byte(s))
	}
	g := calGraph(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ReadCalibration("f.csv", strings.NewReader(string(data)), g, UniformNoise(g, 0.01, 0.001, 0.02, 0.03, 1))
		if err != nil {
			if !errors.Is(err, ErrCalibration) {
				t.Errorf("error %v does not wrap ErrCalibration", err)
			}
			return
		}
		if err := c.Validate(g); err != nil {
			t.Errorf("accepted an invalid noise: %v", err)
		}
	})
}
