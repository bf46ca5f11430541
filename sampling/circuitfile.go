package sampling

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"mixdepth/circuits"
)

// CircuitFormat and CircuitVersion identify a circuit file.
const (
	CircuitFormat  = "mixdepth-circuits"
	CircuitVersion = 1
)

// circuitConventions is written into every circuit file so that it can be
// read without this program.
const circuitConventions = "Start in |0...0> and apply, for each circuit, the steps in order and the gates of a step in order, " +
	"then the final single-qubit gates (final[q] on qubit q, if present), then measure every qubit in the computational basis. " +
	"A gate {\"qubits\": [a, b], \"matrix\": M} applies the 4x4 unitary M, given as 4 rows of 4 [re, im] pairs, " +
	"in the basis |b_a b_b> with row/column index 2*b_a + b_b. A final gate is a 2x2 unitary in the same layout. " +
	"Basis index x = sum_q b_q 2^q; bitstrings list qubit 0 first."

// CircuitFile is the content of a circuit file: the run's parameters and
// every instance's gates, so that the same circuits can be run on hardware
// or on another simulator.
//
// The file is one JSON object of our own design:
//
//	{"format": "mixdepth-circuits", "version": 1, "conventions": "…",
//	 "qubits": n, "graph": "…", "graph_digest": "…", "edges": [[a, b], …],
//	 "labels": ["Q1", …],
//	 "schedule": "layered", "gates": "haar", "seed": s, "depth": d,
//	 "part": "K/N", "partial": false,
//	 "circuits": [{"instance": i,
//	               "steps": [[{"qubits": [a, b], "matrix": [[[re, im], …4], …4 rows]}, …], …],
//	               "final": [[[[re, im], [re, im]], [[re, im], [re, im]]], …]}, …]}
//
// "final" is omitted when the gate set has no final layer, "labels" (the
// chip's names of qubits 0..n−1) when the graph has none. Numbers are
// written with the shortest decimal form that reads back to the same
// float64, so a file round-trips exactly.
type CircuitFile struct {
	Qubits      int
	Graph       string
	GraphDigest string
	Edges       []circuits.Edge
	// Labels names the qubits on the chip, Labels[q] for qubit q, or is nil
	// (the file then has no "labels" key).
	Labels   []string
	Schedule circuits.ScheduleKind
	Gates    string
	Seed     uint64
	Depth    int
	Part     string
	Partial  bool
	Circuits []*Circuit
}

// Sentinel errors wrapped by *CircuitFileError.
var (
	// ErrCircuitFile marks a malformed circuit file.
	ErrCircuitFile = errors.New("invalid circuit file")
	// ErrCircuitMismatch marks a circuit file that does not fit the graph
	// it is used with.
	ErrCircuitMismatch = errors.New("circuit file does not match the graph")
)

// CircuitFileError is an error in a circuit file. Field names the offending
// JSON field, such as "circuits[3].steps[2][0].qubits", or is empty when
// the error concerns the whole file.
type CircuitFileError struct {
	File   string
	Field  string
	Err    error
	Detail string
}

func (e *CircuitFileError) Error() string {
	var b strings.Builder
	b.WriteString("sampling: ")
	if e.File != "" {
		b.WriteString(e.File)
		b.WriteString(": ")
	}
	b.WriteString(e.Err.Error())
	if e.Field != "" {
		b.WriteString(": field ")
		b.WriteString(e.Field)
	}
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	return b.String()
}

func (e *CircuitFileError) Unwrap() error { return e.Err }

// Circuit returns the circuit of instance id, or nil if the file has none.
func (f *CircuitFile) Circuit(id int) *Circuit {
	for _, c := range f.Circuits {
		if c.Instance == id {
			return c
		}
	}
	return nil
}

// WriteCircuits writes f to w in the circuit file format, one gate per line.
func WriteCircuits(w io.Writer, f *CircuitFile) error {
	bw := bufio.NewWriter(w)
	str := func(s string) string {
		var b strings.Builder
		enc := json.NewEncoder(&b)
		enc.SetEscapeHTML(false) // keep the conventions' |0...0> readable
		enc.Encode(s)            // a string always encodes
		return strings.TrimSuffix(b.String(), "\n")
	}
	fmt.Fprintf(bw, "{\n  \"format\": %s,\n  \"version\": %d,\n  \"conventions\": %s,\n", str(CircuitFormat), CircuitVersion, str(circuitConventions))
	fmt.Fprintf(bw, "  \"qubits\": %d,\n  \"graph\": %s,\n  \"graph_digest\": %s,\n  \"edges\": [", f.Qubits, str(f.Graph), str(f.GraphDigest))
	for i, e := range f.Edges {
		if i > 0 {
			bw.WriteString(", ")
		}
		fmt.Fprintf(bw, "[%d, %d]", e.A, e.B)
	}
	bw.WriteString("],\n")
	if f.Labels != nil {
		bw.WriteString("  \"labels\": [")
		for i, l := range f.Labels {
			if i > 0 {
				bw.WriteString(", ")
			}
			bw.WriteString(str(l))
		}
		bw.WriteString("],\n")
	}
	fmt.Fprintf(bw, "  \"schedule\": %s,\n  \"gates\": %s,\n  \"seed\": %d,\n  \"depth\": %d,\n  \"part\": %s,\n  \"partial\": %t,\n  \"circuits\": [",
		str(string(f.Schedule)), str(f.Gates), f.Seed, f.Depth, str(f.Part), f.Partial)
	for ci, c := range f.Circuits {
		if ci > 0 {
			bw.WriteString(",")
		}
		fmt.Fprintf(bw, "\n    {\"instance\": %d,\n     \"steps\": [", c.Instance)
		for si, step := range c.Steps {
			if si > 0 {
				bw.WriteString(",")
			}
			bw.WriteString("\n      [")
			for gi, g := range step {
				if gi > 0 {
					bw.WriteString(",\n       ")
				}
				fmt.Fprintf(bw, "{\"qubits\": [%d, %d], \"matrix\": ", g.A, g.B)
				writeMatrix(bw, g.M[:], 4)
				bw.WriteString("}")
			}
			bw.WriteString("]")
		}
		bw.WriteString("]")
		if c.Final != nil {
			bw.WriteString(",\n     \"final\": [")
			for q := range c.Final {
				if q > 0 {
					bw.WriteString(",\n       ")
				}
				writeMatrix(bw, c.Final[q][:], 2)
			}
			bw.WriteString("]")
		}
		bw.WriteString("}")
	}
	bw.WriteString("\n  ]\n}\n")
	return bw.Flush()
}

// writeMatrix writes a d×d row-major matrix as d rows of [re, im] pairs.
func writeMatrix(w *bufio.Writer, m []complex128, d int) {
	num := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	w.WriteString("[")
	for i := range d {
		if i > 0 {
			w.WriteString(", ")
		}
		w.WriteString("[")
		for j := range d {
			if j > 0 {
				w.WriteString(", ")
			}
			v := m[i*d+j]
			w.WriteString("[" + num(real(v)) + ", " + num(imag(v)) + "]")
		}
		w.WriteString("]")
	}
	w.WriteString("]")
}

// The JSON form of a circuit file, decoded loosely and checked by hand so
// that errors name the field.
type circuitFileJSON struct {
	Format      *string               `json:"format"`
	Version     *int                  `json:"version"`
	Conventions string                `json:"conventions"`
	Qubits      *int                  `json:"qubits"`
	Graph       string                `json:"graph"`
	GraphDigest string                `json:"graph_digest"`
	Edges       [][]int               `json:"edges"`
	Labels      []string              `json:"labels"`
	Schedule    circuits.ScheduleKind `json:"schedule"`
	Gates       string                `json:"gates"`
	Seed        uint64                `json:"seed"`
	Depth       *int                  `json:"depth"`
	Part        string                `json:"part"`
	Partial     bool                  `json:"partial"`
	Circuits    []circuitJSON         `json:"circuits"`
}

type circuitJSON struct {
	Instance *int           `json:"instance"`
	Steps    [][]gateJSON   `json:"steps"`
	Final    [][][][]number `json:"final"`
}

type gateJSON struct {
	Qubits []int        `json:"qubits"`
	Matrix [][][]number `json:"matrix"`
}

// number is a matrix entry part. encoding/json leaves a float64 as 0 when it
// reads null, without an error; a number refuses null, so that [-1, null]
// is reported rather than read as −1+0i.
type number float64

func (n *number) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		return errNullNumber
	}
	return json.Unmarshal(b, (*float64)(n))
}

var errNullNumber = errors.New("null where a number is needed")

// ReadCircuits reads a circuit file from r; name labels errors. It checks
// the format and version, the shape of every matrix and that it is unitary
// to circuits.UnitaryTolerance, that every gate acts on two distinct qubits
// in range, that the gates of a step share no qubit, that every circuit has
// "depth" steps, that instance ids are distinct and non-negative, and that
// "edges" forms a valid graph holding every gate. Errors are
// *CircuitFileError values wrapping ErrCircuitFile or ErrCircuitMismatch.
func ReadCircuits(name string, r io.Reader) (*CircuitFile, error) {
	bad := func(field, format string, args ...any) error {
		return &CircuitFileError{File: name, Field: field, Err: ErrCircuitFile, Detail: fmt.Sprintf(format, args...)}
	}
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	var fj circuitFileJSON
	if err := dec.Decode(&fj); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			return nil, bad("", "invalid JSON at byte %d: %v", se.Offset, se)
		case errors.As(err, &te):
			return nil, bad(te.Field, "holds a JSON %s, which is the wrong type", te.Value)
		case errors.Is(err, io.EOF):
			return nil, bad("", "the file is empty")
		}
		return nil, bad("", "%v", err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, bad("", "unexpected data after the JSON object")
	}
	switch {
	case fj.Format == nil || *fj.Format != CircuitFormat:
		return nil, bad("format", "want %q", CircuitFormat)
	case fj.Version == nil || *fj.Version != CircuitVersion:
		return nil, bad("version", "want %d", CircuitVersion)
	case fj.Qubits == nil:
		return nil, bad("qubits", "missing")
	case *fj.Qubits < 2 || *fj.Qubits > MaxQubits:
		return nil, bad("qubits", "%d qubits; circuits take 2 to %d", *fj.Qubits, MaxQubits)
	case fj.Depth == nil:
		return nil, bad("depth", "missing")
	case *fj.Depth < 1:
		return nil, bad("depth", "%d is not positive", *fj.Depth)
	}
	n := *fj.Qubits
	f := &CircuitFile{
		Qubits: n, Graph: fj.Graph, GraphDigest: fj.GraphDigest, Schedule: fj.Schedule, Gates: fj.Gates,
		Seed: fj.Seed, Depth: *fj.Depth, Part: fj.Part, Partial: fj.Partial,
	}
	for i, e := range fj.Edges {
		if len(e) != 2 {
			return nil, bad(fmt.Sprintf("edges[%d]", i), "has %d qubits; write each edge as [a, b]", len(e))
		}
		f.Edges = append(f.Edges, circuits.Edge{A: e[0], B: e[1]})
	}
	// A chip in parts (sample --allow-disconnected) writes its circuits
	// too; score asks for the flag again when it reads them.
	g, err := circuits.NewGraphParts(name, n, f.Edges)
	if err != nil {
		return nil, bad("edges", "%v", err)
	}
	if fj.Labels != nil {
		if len(fj.Labels) != n {
			return nil, bad("labels", "%d labels for %d qubits", len(fj.Labels), n)
		}
		f.Labels, g.Labels = fj.Labels, fj.Labels
	}
	seen := map[int]bool{}
	for ci, cj := range fj.Circuits {
		at := fmt.Sprintf("circuits[%d]", ci)
		if cj.Instance == nil {
			return nil, bad(at+".instance", "missing")
		}
		id := *cj.Instance
		if id < 0 {
			return nil, bad(at+".instance", "%d is negative", id)
		}
		if seen[id] {
			return nil, bad(at+".instance", "instance %d appears twice", id)
		}
		seen[id] = true
		if len(cj.Steps) != f.Depth {
			return nil, bad(at+".steps", "has %d steps but \"depth\" is %d", len(cj.Steps), f.Depth)
		}
		c := &Circuit{Instance: id, Qubits: n, Steps: make([][]circuits.Gate, len(cj.Steps))}
		for si, step := range cj.Steps {
			used := map[int]bool{}
			for gi, gj := range step {
				gat := fmt.Sprintf("%s.steps[%d][%d]", at, si, gi)
				if len(gj.Qubits) != 2 {
					return nil, bad(gat+".qubits", "has %d entries; write [a, b]", len(gj.Qubits))
				}
				a, b := gj.Qubits[0], gj.Qubits[1]
				switch {
				case a < 0 || b < 0 || a >= n || b >= n:
					return nil, bad(gat+".qubits", "[%d, %d] but qubits are 0..%d", a, b, n-1)
				case a == b:
					return nil, bad(gat+".qubits", "[%d, %d] acts twice on one qubit", a, b)
				case used[a] || used[b]:
					return nil, bad(gat+".qubits", "[%d, %d] shares a qubit with another gate of step %d", a, b, si)
				case !g.HasEdge(a, b):
					return nil, &CircuitFileError{File: name, Field: gat + ".qubits", Err: ErrCircuitMismatch,
						Detail: fmt.Sprintf("[%d, %d] is not in the file's \"edges\"", a, b)}
				}
				used[a], used[b] = true, true
				gate := circuits.Gate{A: a, B: b}
				if err := readMatrix(gj.Matrix, 4, gate.M[:]); err != nil {
					return nil, bad(gat+".matrix", "%v", err)
				}
				c.Steps[si] = append(c.Steps[si], gate)
			}
		}
		if cj.Final != nil {
			if len(cj.Final) != n {
				return nil, bad(at+".final", "has %d gates for %d qubits", len(cj.Final), n)
			}
			c.Final = make([][4]complex128, n)
			for q, m := range cj.Final {
				if err := readMatrix(m, 2, c.Final[q][:]); err != nil {
					return nil, bad(fmt.Sprintf("%s.final[%d]", at, q), "%v", err)
				}
			}
		}
		f.Circuits = append(f.Circuits, c)
	}
	return f, nil
}

// readMatrix copies a d×d matrix of [re, im] pairs into dst and checks that
// it is unitary.
func readMatrix(rows [][][]number, d int, dst []complex128) error {
	if len(rows) != d {
		return fmt.Errorf("has %d rows, want %d rows of %d [re, im] pairs", len(rows), d, d)
	}
	for i, row := range rows {
		if len(row) != d {
			return fmt.Errorf("row %d has %d entries, want %d", i+1, len(row), d)
		}
		for j, p := range row {
			if len(p) != 2 {
				return fmt.Errorf("row %d entry %d has %d numbers, want [re, im]", i+1, j+1, len(p))
			}
			dst[i*d+j] = complex(float64(p[0]), float64(p[1]))
		}
	}
	if dev := circuits.UnitaryDeviation(dst, d); !(dev <= circuits.UnitaryTolerance) {
		return fmt.Errorf("is not unitary: ‖M†M − I‖ = %.3g (max entry; tolerance %g)", dev, circuits.UnitaryTolerance)
	}
	return nil
}

// Check returns a *CircuitFileError wrapping ErrCircuitMismatch unless f
// fits g: the same number of qubits, and every gate on an edge of g. It
// names the first offending field.
func (f *CircuitFile) Check(g *circuits.Graph) error {
	mismatch := func(field, format string, args ...any) error {
		return &CircuitFileError{Field: field, Err: ErrCircuitMismatch, Detail: fmt.Sprintf(format, args...)}
	}
	if f.Qubits != g.Qubits {
		return mismatch("qubits", "the file has %d qubits but graph %s has %d", f.Qubits, g.Name, g.Qubits)
	}
	for ci, c := range f.Circuits {
		for si, step := range c.Steps {
			for gi, gate := range step {
				if !g.HasEdge(gate.A, gate.B) {
					return mismatch(fmt.Sprintf("circuits[%d].steps[%d][%d].qubits", ci, si, gi),
						"[%d, %d] is not a coupler of graph %s", gate.A, gate.B, g.Name)
				}
			}
		}
	}
	return nil
}

// FileGraph returns the graph formed by the file's "edges" (validated when
// the file was read), which may be in parts.
func (f *CircuitFile) FileGraph(name string) *circuits.Graph {
	g, err := circuits.NewGraphParts(name, f.Qubits, f.Edges)
	if err != nil {
		panic("sampling: circuit file edges were not validated: " + err.Error())
	}
	g.Labels = f.Labels
	return g
}
