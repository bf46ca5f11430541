package circuits

import (
	"context"
	"fmt"
	"math/rand/v2"
)

// Schedule places gates on the edges of a graph, step by step. A step of a
// layered schedule is one layer of disjoint gates; a step of the random-edge
// schedule is a single gate on a uniformly drawn edge.
type Schedule interface {
	// Kind is KindLayered or KindRandomEdge.
	Kind() ScheduleKind
	// Step appends the edges of step t (0-based) to dst and returns it. A
	// random schedule draws from rng; a deterministic one ignores it.
	Step(t int, rng *rand.Rand, dst []Edge) []Edge
	// GateCount returns the number of gates in the first depth steps.
	GateCount(depth int) int
}

// ScheduleKind names a kind of schedule; its values are the spellings of
// the --schedule flag and of the "schedule" metadata key.
type ScheduleKind string

// The schedule kinds.
const (
	KindLayered    ScheduleKind = "layered"
	KindRandomEdge ScheduleKind = "random-edge"
)

// Layered cycles through classes of disjoint edges: depth d applies the
// classes 0, 1, …, C−1, 0, 1, … for d layers.
type Layered struct {
	Classes [][]Edge
}

// Kind returns KindLayered.
func (l *Layered) Kind() ScheduleKind { return KindLayered }

// Step appends class t mod C.
func (l *Layered) Step(t int, _ *rand.Rand, dst []Edge) []Edge {
	return append(dst, l.Classes[t%len(l.Classes)]...)
}

// GateCount returns the number of gates in the first depth layers.
func (l *Layered) GateCount(depth int) int {
	c := len(l.Classes)
	per := 0
	for _, cl := range l.Classes {
		per += len(cl)
	}
	n := depth / c * per
	for t := 0; t < depth%c; t++ {
		n += len(l.Classes[t])
	}
	return n
}

// RandomEdge applies one gate per step on an edge drawn uniformly from Edges.
type RandomEdge struct {
	Edges []Edge
}

// Kind returns KindRandomEdge.
func (r *RandomEdge) Kind() ScheduleKind { return KindRandomEdge }

// Step appends one uniformly drawn edge.
func (r *RandomEdge) Step(_ int, rng *rand.Rand, dst []Edge) []Edge {
	return append(dst, r.Edges[rng.IntN(len(r.Edges))])
}

// GateCount returns depth: a random-edge step is one gate.
func (r *RandomEdge) GateCount(depth int) int { return depth }

// Schedules lists the schedule names accepted by NewSchedule.
var Schedules = []ScheduleKind{KindLayered, KindRandomEdge}

// NewSchedule returns the named schedule for g: "layered" uses the class
// conventions of LayeredClasses, "random-edge" draws edges of g uniformly.
func NewSchedule(kind ScheduleKind, g *Graph) (Schedule, error) {
	switch kind {
	case KindLayered:
		return &Layered{Classes: LayeredClasses(g)}, nil
	case KindRandomEdge:
		return &RandomEdge{Edges: g.Edges}, nil
	}
	return nil, fmt.Errorf("circuits: unknown schedule %q: use layered or random-edge", kind)
}

// LayeredClasses splits the edges of g into classes of disjoint edges:
//
//   - line:N: class A holds edges (i, i+1) with i even, class B those with i odd;
//   - ring:N: as line, with the closing edge (N−1, 0) in class B when N is even
//     and in a class C of its own when N is odd;
//   - grid:RxC: horizontal edges with c even, horizontal with c odd, vertical
//     with r even, vertical with r odd, where qubit (r, c) has id r·C + c;
//   - a graph with its own Classes (the lattice families, a dropped graph):
//     those;
//   - every other graph: the colour classes of EdgeColouring, in colour order,
//     balanced by BalanceClasses.
//
// Empty classes are dropped.
func LayeredClasses(g *Graph) [][]Edge {
	classes, _ := LayeredClassesContext(context.Background(), g)
	return classes
}

// LayeredClassesContext is LayeredClasses that stops when ctx is done,
// returning nil and ctx.Err(): the colouring of a large graph
// (EdgeColouringContext, BalanceClassesContext) takes minutes.
func LayeredClassesContext(ctx context.Context, g *Graph) ([][]Edge, error) {
	var classes [][]Edge
	switch {
	case g.Classes != nil:
		classes = make([][]Edge, len(g.Classes))
		for i, cl := range g.Classes {
			classes[i] = append([]Edge(nil), cl...)
		}
		return nonEmpty(classes), nil
	}
	switch g.Family {
	case "line", "ring":
		classes = make([][]Edge, 3)
		for _, e := range g.Edges {
			lo := min(e.A, e.B)
			switch {
			case e.A == g.Qubits-1 && e.B == 0: // the ring's closing edge
				if g.Qubits%2 == 0 {
					classes[1] = append(classes[1], e)
				} else {
					classes[2] = append(classes[2], e)
				}
			case lo%2 == 0:
				classes[0] = append(classes[0], e)
			default:
				classes[1] = append(classes[1], e)
			}
		}
	case "grid":
		classes = make([][]Edge, 4)
		c := g.Cols
		for _, e := range g.Edges {
			lo, hi := min(e.A, e.B), max(e.A, e.B)
			row, col := lo/c, lo%c
			if hi == lo+1 && hi/c == row { // horizontal
				classes[col%2] = append(classes[col%2], e)
			} else { // vertical
				classes[2+row%2] = append(classes[2+row%2], e)
			}
		}
	default:
		var err error
		if classes, err = EdgeColouringContext(ctx, g); err != nil {
			return nil, err
		}
		if classes, err = BalanceClassesContext(ctx, g, classes); err != nil {
			return nil, err
		}
	}
	out := classes[:0]
	for _, cl := range classes {
		if len(cl) > 0 {
			out = append(out, cl)
		}
	}
	return out, nil
}
