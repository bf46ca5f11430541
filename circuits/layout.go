package circuits

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"

	"mixdepth/internal/inputfile"
)

// Layout is an explicit layered schedule read from a JSON file of the form
//
//	{"qubits": n, "layers": [[[a, b], …], …]}
//
// Depth d applies the layers cyclically, like the classes of Layered.
type Layout struct {
	Qubits int
	Layers [][]Edge
}

type layoutFile struct {
	Qubits *int      `json:"qubits"`
	Layers [][][]int `json:"layers"`
}

// ReadLayoutFile reads and checks a layout file.
func ReadLayoutFile(path string) (*Layout, error) {
	f, err := inputfile.Open(path, inputfile.SmallLimit)
	if err != nil {
		return nil, fmt.Errorf("circuits: reading layout file: %w", err)
	}
	defer f.Close()
	return ReadLayout(path, f)
}

// ReadLayout reads a layout from r; name labels errors. Every layer must be
// non-empty, its gates on distinct qubits in 0..qubits−1, and the union of the
// layers must form a valid Graph (no qubit left out, connected).
func ReadLayout(name string, r io.Reader) (*Layout, error) {
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	var lf layoutFile
	if err := dec.Decode(&lf); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		detail := err.Error()
		switch {
		case errors.As(err, &se):
			detail = fmt.Sprintf("invalid JSON at byte %d: %v", se.Offset, se)
		case errors.As(err, &te):
			detail = fmt.Sprintf("field %q has the wrong type (want {\"qubits\": n, \"layers\": [[[a, b], …], …]})", te.Field)
		}
		return nil, &ParseError{File: name, Err: ErrLayoutSyntax, Detail: detail}
	}
	bad := func(err error, detail string, args ...any) error {
		return &ParseError{File: name, Err: err, Detail: fmt.Sprintf(detail, args...)}
	}
	// Decode stops after the first JSON value; anything after it is an error
	// rather than silently ignored.
	if _, err := dec.Token(); err != io.EOF {
		return nil, bad(ErrLayoutSyntax, "unexpected data after the layout object (at byte %d)", dec.InputOffset())
	}
	if lf.Qubits == nil {
		return nil, bad(ErrLayoutSyntax, `missing "qubits"`)
	}
	n := *lf.Qubits
	if n < 2 {
		return nil, bad(ErrTooFewQubits, `"qubits" is %d`, n)
	}
	if len(lf.Layers) == 0 {
		return nil, bad(ErrLayoutSyntax, `"layers" is empty; give at least one layer of gates`)
	}
	l := &Layout{Qubits: n}
	seen := map[[2]int]bool{}
	var union []Edge
	for i, layer := range lf.Layers {
		if len(layer) == 0 {
			return nil, bad(ErrLayoutSyntax, "layer %d is empty", i)
		}
		used := map[int]bool{}
		var edges []Edge
		for j, p := range layer {
			if len(p) != 2 {
				return nil, bad(ErrFieldCount, "layer %d gate %d has %d qubits; write each gate as [a, b]", i, j, len(p))
			}
			e := Edge{p[0], p[1]}
			switch {
			case e.A < 0 || e.B < 0:
				return nil, bad(ErrNegativeID, "layer %d gate %d is [%d, %d]", i, j, e.A, e.B)
			case e.A >= n || e.B >= n:
				return nil, bad(ErrQubitRange, "layer %d gate %d is [%d, %d] but qubits are 0..%d", i, j, e.A, e.B, n-1)
			case e.A == e.B:
				return nil, bad(ErrSelfLoop, "layer %d gate %d is [%d, %d]", i, j, e.A, e.B)
			case used[e.A] || used[e.B]:
				return nil, bad(ErrOverlap, "layer %d gate %d [%d, %d] reuses a qubit of the same layer", i, j, e.A, e.B)
			}
			used[e.A], used[e.B] = true, true
			edges = append(edges, e)
			if !seen[key(e)] {
				seen[key(e)] = true
				union = append(union, e)
			}
		}
		l.Layers = append(l.Layers, edges)
	}
	// A layout's graph is the union of its layers, which must reach every
	// qubit and be connected: --allow-disconnected does not apply to it, so
	// these messages say what to change in the file instead of naming it.
	if q := firstIsolated(n, union); q >= 0 {
		return nil, bad(ErrIsolatedQubit, "no layer has a gate on qubit %d (qubits are 0..%d); add a gate on it to a layer", q, n-1)
	}
	g, err := NewGraphParts(name, n, union)
	if err != nil {
		return nil, err
	}
	if comps := len(g.Components()); comps > 1 {
		return nil, bad(ErrDisconnected, "the layers' gates split the qubits into %d separate parts, between which random circuits never mix; add gates that join them", comps)
	}
	return l, nil
}

// Graph returns the coupling graph formed by the union of the layers, edges in
// order of first appearance.
func (l *Layout) Graph(name string) *Graph {
	seen := map[[2]int]bool{}
	var union []Edge
	for _, layer := range l.Layers {
		for _, e := range layer {
			if !seen[key(e)] {
				seen[key(e)] = true
				union = append(union, e)
			}
		}
	}
	g, err := NewGraph(name, l.Qubits, union)
	if err != nil {
		panic("circuits: layout was not validated: " + err.Error())
	}
	return g
}

// Check returns an error unless every gate of l acts on an edge of g and the
// qubit counts agree.
func (l *Layout) Check(name string, g *Graph) error {
	if l.Qubits != g.Qubits {
		return &ParseError{File: name, Err: ErrLayoutMismatch, Detail: fmt.Sprintf("layout has %d qubits but graph %s has %d", l.Qubits, g.Name, g.Qubits)}
	}
	for i, layer := range l.Layers {
		for _, e := range layer {
			if !g.HasEdge(e.A, e.B) {
				return &ParseError{File: name, Err: ErrNotInGraph, Detail: fmt.Sprintf("layer %d uses [%d, %d], which graph %s does not couple", i, e.A, e.B, g.Name)}
			}
		}
	}
	return nil
}

// Schedule returns the layered schedule that cycles through the layers.
func (l *Layout) Schedule() *Layered { return &Layered{Classes: l.Layers} }

// ReadLayoutFileFor reads a layout file for the graph g (see ReadLayoutFor).
func ReadLayoutFileFor(path string, g *Graph) (*Layout, error) {
	f, err := inputfile.Open(path, inputfile.SmallLimit)
	if err != nil {
		return nil, fmt.Errorf("circuits: reading layout file: %w", err)
	}
	defer f.Close()
	return ReadLayoutFor(path, f, g)
}

// ReadLayoutFor reads a layout for the graph g, in which a gate's qubits
// may be numbers or, as JSON strings, qubit labels of g (Graph.Label):
//
//	{"qubits": n, "layers": [[["Q1", "Q2"], …], …]}
//
// "qubits" may be left out, and must equal g's qubit count when given. The
// layout is then read as ReadLayout does and checked against g (Check).
// Errors are *ParseError values; an unknown label wraps ErrUnknownLabel.
func ReadLayoutFor(name string, r io.Reader, g *Graph) (*Layout, error) {
	var lf struct {
		Qubits *int                  `json:"qubits"`
		Layers [][][]json.RawMessage `json:"layers"`
	}
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("circuits: reading %s: %w", name, err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if dec.Decode(&lf) != nil {
		// Not of the labelled form: the numeric reader gives the message.
		return readNumericFor(name, bytes.NewReader(data), g)
	}
	index := make(map[string]int, g.Qubits)
	for q := 0; q < g.Qubits; q++ {
		index[g.Label(q)] = q
	}
	if lf.Qubits != nil && *lf.Qubits != g.Qubits {
		return nil, &ParseError{File: name, Err: ErrLayoutMismatch, Detail: fmt.Sprintf("layout has %d qubits but graph %s has %d", *lf.Qubits, g.Name, g.Qubits)}
	}
	layers := make([][][2]int, len(lf.Layers))
	for i, layer := range lf.Layers {
		for j, gate := range layer {
			if len(gate) != 2 {
				return nil, &ParseError{File: name, Err: ErrFieldCount, Detail: fmt.Sprintf("layer %d gate %d has %d qubits; write each gate as [a, b]", i, j, len(gate))}
			}
			var ids [2]int
			for k, raw := range gate {
				var label string
				if err := json.Unmarshal(raw, &label); err == nil {
					q, ok := index[label]
					if !ok {
						return nil, &ParseError{File: name, Err: ErrUnknownLabel, Detail: fmt.Sprintf("layer %d gate %d names %q, which is not a qubit of %s", i, j, label, g.Name)}
					}
					ids[k] = q
				} else if err := json.Unmarshal(raw, &ids[k]); err != nil {
					return nil, &ParseError{File: name, Err: ErrLayoutSyntax, Detail: fmt.Sprintf("layer %d gate %d: %s is neither a qubit number nor a label", i, j, raw)}
				}
			}
			layers[i] = append(layers[i], ids)
		}
	}
	numeric, _ := json.Marshal(map[string]any{"qubits": g.Qubits, "layers": layers})
	return readNumericFor(name, bytes.NewReader(numeric), g)
}

// readNumericFor reads a numeric layout and checks it against g.
func readNumericFor(name string, r io.Reader, g *Graph) (*Layout, error) {
	l, err := ReadLayout(name, r)
	if err != nil {
		return nil, err
	}
	if err := l.Check(name, g); err != nil {
		return nil, err
	}
	return l, nil
}
