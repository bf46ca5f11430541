package circuits

import (
	"fmt"
	"strconv"
	"strings"
)

// ErrDropAll is wrapped when a drop list leaves fewer than two qubits or no
// coupler.
var ErrDropAll = fmt.Errorf("drop list removes too much")

// Dropped is the result of Drop: the remaining graph and how its qubits
// relate to the original ones.
type Dropped struct {
	// Graph is the remaining chip, qubits renumbered 0..n'−1 in their
	// original order, labels kept (a graph without labels gets its original
	// numbers as labels), Dropped listing what was removed.
	Graph *Graph
	// New maps an original qubit to its new number, −1 if it was dropped.
	New []int
}

// Drop removes out-of-service qubits (with their couplers) and couplers from
// g. list is a comma-separated list of items: a qubit label (or number, for
// a graph without labels), or a coupler A-B of two qubits. A label may itself
// hold '-': an item that names a qubit is a qubit; otherwise it must split at
// exactly one '-' into two qubits. The remaining graph keeps g's layered
// classes where g has a family rule (minus the dropped couplers); otherwise
// its classes come from the colouring of what remains. The remaining graph
// must still be a valid Graph (connected, every qubit on a coupler) unless
// o.AllowDisconnected. Errors are *ParseError wrapping ErrUnknownLabel,
// ErrDuplicateLabel, ErrNotInGraph, ErrDropAll, ErrIsolatedQubit or
// ErrDisconnected.
func Drop(g *Graph, list string, o ReadOptions) (*Dropped, error) {
	bad := func(err error, format string, args ...any) error {
		return &ParseError{Err: err, Detail: fmt.Sprintf(format, args...)}
	}
	index := make(map[string]int, g.Qubits)
	for q := 0; q < g.Qubits; q++ {
		index[g.Label(q)] = q
	}
	deadQubit := make([]bool, g.Qubits)
	deadEdge := map[[2]int]bool{}
	seen := map[string]bool{}
	var items []string
	for _, item := range strings.Split(list, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			return nil, bad(ErrUnknownLabel, "empty item in %q; write qubits and couplers A-B separated by commas", list)
		}
		if seen[item] {
			return nil, bad(ErrDuplicateLabel, "%s is listed twice", item)
		}
		seen[item] = true
		items = append(items, item)
		if q, ok := index[item]; ok {
			deadQubit[q] = true
			continue
		}
		var found []Edge
		for i := 0; i < len(item); i++ {
			if item[i] != '-' {
				continue
			}
			a, okA := index[item[:i]]
			b, okB := index[item[i+1:]]
			if okA && okB {
				found = append(found, Edge{a, b})
			}
		}
		switch {
		case len(found) == 0:
			return nil, bad(ErrUnknownLabel, "%s is neither a qubit nor a coupler A-B of %s", item, g.Name)
		case len(found) > 1:
			return nil, bad(ErrUnknownLabel, "%s splits into a coupler in %d ways; rename the qubits", item, len(found))
		}
		e := found[0]
		if !g.HasEdge(e.A, e.B) {
			return nil, bad(ErrNotInGraph, "%s couples qubits that %s does not couple", item, g.Name)
		}
		if deadEdge[key(e)] {
			return nil, bad(ErrDuplicateLabel, "coupler %s is listed twice", item)
		}
		deadEdge[key(e)] = true
	}
	keep := func(e Edge) bool { return !deadQubit[e.A] && !deadQubit[e.B] && !deadEdge[key(e)] }
	newID := make([]int, g.Qubits)
	var labels []string
	var coords [][2]float64
	for q := range newID {
		newID[q] = -1
		if !deadQubit[q] {
			newID[q] = len(labels)
			labels = append(labels, g.Label(q))
			if g.Coords != nil {
				coords = append(coords, g.Coords[q])
			}
		}
	}
	renumber := func(edges []Edge) []Edge {
		var out []Edge
		for _, e := range edges {
			if keep(e) {
				out = append(out, Edge{newID[e.A], newID[e.B]})
			}
		}
		return out
	}
	edges := renumber(g.Edges)
	if len(labels) < 2 || len(edges) == 0 {
		return nil, bad(ErrDropAll, "%d qubits and %d couplers would remain; a chip needs at least one coupler", len(labels), len(edges))
	}
	h, err := newGraph(g.Name, len(labels), edges, o.AllowDisconnected)
	if err != nil {
		sentinel := err
		if pe, ok := err.(*ParseError); ok {
			sentinel = pe.Err
		}
		return nil, bad(sentinel, "what remains of %s: %v", g.Name, dropDetail(err, labels))
	}
	h.Family, h.Rows, h.Cols = g.Family, g.Rows, g.Cols
	h.Labels, h.Coords = labels, coords
	h.Dropped = append(append([]string(nil), g.Dropped...), items...)
	if hasFamilyRule(g) {
		for _, cl := range LayeredClasses(g) {
			h.Classes = append(h.Classes, renumber(cl))
		}
		h.Classes = nonEmpty(h.Classes)
	} else {
		h.Family = ""
	}
	return &Dropped{Graph: h, New: newID}, nil
}

// dropDetail restates a validation error of the remaining graph in labels.
func dropDetail(err error, labels []string) string {
	pe, ok := err.(*ParseError)
	if !ok {
		return err.Error()
	}
	d := pe.Detail
	if pe.Err == ErrIsolatedQubit {
		// "qubit N is on no coupler …": name it by label.
		var q int
		if _, e := fmt.Sscanf(d, "qubit %d", &q); e == nil && q < len(labels) {
			return "qubit " + labels[q] + " would be left on no coupler; drop it too (--allow-disconnected accepts a chip in parts)"
		}
	}
	if pe.Err == ErrDisconnected {
		return "it falls into parts; drop less (--allow-disconnected accepts a chip in parts)"
	}
	return d
}

// hasFamilyRule reports whether g's layered classes come from its family's
// rule rather than from the colouring.
func hasFamilyRule(g *Graph) bool {
	switch {
	case g.Classes != nil:
		return true
	case g.Family == "line", g.Family == "ring", g.Family == "grid":
		return true
	}
	return false
}

// ClassSource says where LayeredClasses(g) comes from: "the <family> rule",
// "the <family> rule without the dropped couplers", or "the edge colouring
// (balanced)".
func ClassSource(g *Graph) string {
	if !hasFamilyRule(g) {
		return "the edge colouring (Misra–Gries, balanced)"
	}
	s := "the " + g.Family + " rule"
	if len(g.Dropped) > 0 {
		s += " without the dropped couplers"
	}
	return s
}

// Drop returns the layout without the gates on dropped qubits and couplers,
// renumbered by d.New, and without layers left empty; it panics if l does not
// match the original graph's qubit count.
func (l *Layout) Drop(d *Dropped) *Layout {
	if l.Qubits != len(d.New) {
		panic("circuits: Layout.Drop: layout has " + strconv.Itoa(l.Qubits) + " qubits, the graph " + strconv.Itoa(len(d.New)))
	}
	out := &Layout{Qubits: d.Graph.Qubits}
	for _, layer := range l.Layers {
		var kept []Edge
		for _, e := range layer {
			a, b := d.New[e.A], d.New[e.B]
			if a >= 0 && b >= 0 && d.Graph.HasEdge(a, b) {
				kept = append(kept, Edge{a, b})
			}
		}
		if len(kept) > 0 {
			out.Layers = append(out.Layers, kept)
		}
	}
	return out
}
