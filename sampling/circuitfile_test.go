package sampling

import (
	"bytes"
	"errors"
	"strings"
	"testing"

	"mixdepth/circuits"
)

func sampleFile(t testing.TB, gates, schedule string) (*CircuitFile, *circuits.Graph) {
	t.Helper()
	g, err := circuits.ParseGraph("ring:5")
	if err != nil {
		t.Fatal(err)
	}
	s, err := circuits.NewSchedule(circuits.ScheduleKind(schedule), g)
	if err != nil {
		t.Fatal(err)
	}
	e, err := circuits.NewEnsemble(gates)
	if err != nil {
		t.Fatal(err)
	}
	f := &CircuitFile{Qubits: g.Qubits, Graph: g.Name, GraphDigest: g.Digest(), Edges: g.Edges,
		Schedule: s.Kind(), Gates: e.Name(), Seed: 11, Depth: 4, Part: "1/2"}
	for _, id := range []int{1, 3, 5} {
		f.Circuits = append(f.Circuits, Build(s, e, g.Qubits, f.Seed, id, f.Depth))
	}
	return f, g
}

// TestCircuitFileRoundTrip: write → read gives the same circuits bit for
// bit (shortest round-trip float formatting, common practice), with and
// without a final layer, and the same circuits give the same probabilities.
func TestCircuitFileRoundTrip(t *testing.T) {
	for _, tc := range []struct{ gates, schedule string }{{"haar", "layered"}, {"cz+haar1", "random-edge"}} {
		f, g := sampleFile(t, tc.gates, tc.schedule)
		var buf bytes.Buffer
		if err := WriteCircuits(&buf, f); err != nil {
			t.Fatal(err)
		}
		back, err := ReadCircuits("c.json", bytes.NewReader(buf.Bytes()))
		if err != nil {
			t.Fatalf("%s: %v\n%s", tc.gates, err, buf.String())
		}
		if back.Qubits != f.Qubits || back.Seed != f.Seed || back.Depth != f.Depth || back.Gates != f.Gates ||
			back.Schedule != f.Schedule || back.Part != f.Part || back.GraphDigest != g.Digest() || len(back.Circuits) != 3 {
			t.Fatalf("%s: header %+v", tc.gates, back)
		}
		if err := back.Check(g); err != nil {
			t.Errorf("%s: Check against its own graph: %v", tc.gates, err)
		}
		if back.FileGraph("x").Digest() != g.Digest() {
			t.Errorf("%s: FileGraph differs from the graph", tc.gates)
		}
		for i, c := range f.Circuits {
			d := back.Circuit(c.Instance)
			if d == nil || len(d.Steps) != len(c.Steps) || len(d.Final) != len(c.Final) || i >= len(back.Circuits) {
				t.Fatalf("%s: instance %d missing or reshaped", tc.gates, c.Instance)
			}
			for s := range c.Steps {
				if len(c.Steps[s]) != len(d.Steps[s]) {
					t.Fatalf("%s: step %d has %d gates, want %d", tc.gates, s, len(d.Steps[s]), len(c.Steps[s]))
				}
				for k := range c.Steps[s] {
					if c.Steps[s][k] != d.Steps[s][k] {
						t.Errorf("%s: instance %d step %d gate %d changed", tc.gates, c.Instance, s, k)
					}
				}
			}
			for q := range c.Final {
				if c.Final[q] != d.Final[q] {
					t.Errorf("%s: final gate %d changed", tc.gates, q)
				}
			}
		}
		if tc.gates == "cz+haar1" && back.Circuits[0].Final == nil {
			t.Error("cz+haar1: final layer lost")
		}
		if back.Circuit(2) != nil {
			t.Error("Circuit(2) found an instance the file does not hold")
		}
	}
}

// TestCircuitFileMismatch: a file checked against another graph names the
// offending field.
func TestCircuitFileMismatch(t *testing.T) {
	f, _ := sampleFile(t, "haar", "layered")
	line, _ := circuits.ParseGraph("line:5") // ring:5 without the edge 4–0
	err := f.Check(line)
	var fe *CircuitFileError
	if !errors.As(err, &fe) || !errors.Is(err, ErrCircuitMismatch) || !strings.Contains(fe.Field, "circuits[") || !strings.Contains(err.Error(), "[4, 0]") {
		t.Errorf("Check against line:5: %v", err)
	}
	six, _ := circuits.ParseGraph("ring:6")
	if err := f.Check(six); !errors.As(err, &fe) || fe.Field != "qubits" {
		t.Errorf("Check against ring:6: %v", err)
	}
}

// TestReadCircuitsErrors: every malformed file is an error naming the field.
func TestReadCircuitsErrors(t *testing.T) {
	f, _ := sampleFile(t, "haar", "layered")
	f.Circuits = f.Circuits[:1]
	var buf bytes.Buffer
	if err := WriteCircuits(&buf, f); err != nil {
		t.Fatal(err)
	}
	good := buf.String()
	// The first gate of the file: step 0 of ring:5 is class A, edges (0,1), (2,3).
	firstGate := `"qubits": [0, 1]`
	if !strings.Contains(good, firstGate) {
		t.Fatalf("unexpected layout:\n%s", good)
	}
	cases := []struct {
		name, from, to, field string
		sentinel              error
	}{
		{"format", `"mixdepth-circuits"`, `"other"`, "format", ErrCircuitFile},
		{"version", `"version": 1`, `"version": 2`, "version", ErrCircuitFile},
		{"no qubits", `"qubits": 5,`, ``, "qubits", ErrCircuitFile},
		{"depth", `"depth": 4`, `"depth": 5`, "circuits[0].steps", ErrCircuitFile},
		{"gate off the graph", firstGate, `"qubits": [0, 2]`, "circuits[0].steps[0][0].qubits", ErrCircuitMismatch},
		{"qubit range", firstGate, `"qubits": [0, 9]`, "circuits[0].steps[0][0].qubits", ErrCircuitFile},
		{"same qubit", firstGate, `"qubits": [1, 1]`, "circuits[0].steps[0][0].qubits", ErrCircuitFile},
		{"three qubits", firstGate, `"qubits": [0, 1, 2]`, "circuits[0].steps[0][0].qubits", ErrCircuitFile},
		{"overlap", firstGate, `"qubits": [2, 1]`, "circuits[0].steps[0][1].qubits", ErrCircuitFile},
		{"short row", `"matrix": [[[`, `"matrix": [[[1, 0]], [[`, "circuits[0].steps[0][0].matrix", ErrCircuitFile},
		{"bad edges", `"edges": [[0, 1]`, `"edges": [[0, 0]`, "edges", ErrCircuitFile},
		{"unknown field", `"seed": 11`, `"seed": 11, "colour": "red"`, "", ErrCircuitFile},
		{"wrong type", `"seed": 11`, `"seed": "eleven"`, "seed", ErrCircuitFile},
		{"negative instance", `"instance": 1`, `"instance": -1`, "circuits[0].instance", ErrCircuitFile},
		{"trailing data", "\n}\n", "\n}\n{}", "", ErrCircuitFile},
	}
	for _, c := range cases {
		text := strings.Replace(good, c.from, c.to, 1)
		if text == good {
			t.Fatalf("%s: %q not found in the file", c.name, c.from)
		}
		_, err := ReadCircuits("c.json", strings.NewReader(text))
		var fe *CircuitFileError
		if !errors.As(err, &fe) || !errors.Is(err, c.sentinel) {
			t.Errorf("%s: err = %v, want a *CircuitFileError wrapping %v", c.name, err, c.sentinel)
			continue
		}
		if fe.Field != c.field {
			t.Errorf("%s: field %q, want %q (%v)", c.name, fe.Field, c.field, err)
		}
		if !strings.HasPrefix(err.Error(), "sampling: c.json: ") {
			t.Errorf("%s: message %q does not name the file", c.name, err)
		}
	}
	// A gate that is not unitary.
	f.Circuits[0].Steps[0][1].M[5] *= 1.001
	buf.Reset()
	if err := WriteCircuits(&buf, f); err != nil {
		t.Fatal(err)
	}
	_, err := ReadCircuits("c.json", &buf)
	var fe *CircuitFileError
	if !errors.As(err, &fe) || fe.Field != "circuits[0].steps[0][1].matrix" || !strings.Contains(err.Error(), "not unitary") {
		t.Errorf("non-unitary gate: %v", err)
	}
	if _, err := ReadCircuits("e.json", strings.NewReader("")); !errors.Is(err, ErrCircuitFile) {
		t.Errorf("empty file: %v", err)
	}
}
