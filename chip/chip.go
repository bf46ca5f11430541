// Package chip describes a coupling graph as the tool will use it: degrees,
// connected parts, diameter, bipartiteness, the layers of the layered
// schedule, the Laplacian's algebraic connectivity, the random-edge
// second-moment gap for small chips, the Haar limit of a chip in parts, and
// drawing coordinates. The CLI's graph command prints a Report.
package chip

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/iterator"
	"gonum.org/v1/gonum/graph/layout"
	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/mat"

	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/stats"
)

// MaxSpectrumQubits bounds the chips whose Laplacian is diagonalised (a
// dense n×n eigenproblem); larger chips report no algebraic connectivity.
const MaxSpectrumQubits = 2000

// MaxDiameterQubits bounds the chips whose diameter is found (a
// breadth-first search from every qubit).
const MaxDiameterQubits = 20000

// Report is what Describe finds about a chip.
type Report struct {
	Graph *circuits.Graph
	// Degrees[d] is the number of qubits of degree d, for d = 0..Δ.
	Degrees []int
	// Components are the connected parts (Graph.Components).
	Components [][]int
	// Diameter is the largest distance between two qubits of one part, or −1
	// when the chip has more than MaxDiameterQubits qubits.
	Diameter int
	// Bipartite reports whether the qubits split into two sets with every
	// coupler between them.
	Bipartite bool
	// Layers are the classes of the layered schedule, LayerSource says where
	// they come from.
	Layers      [][]circuits.Edge
	LayerSource string
	// AlgebraicConnectivity is the second-smallest eigenvalue of the graph
	// Laplacian L = D − A (Fiedler 1973), 0 for a chip in parts; NaN when
	// the chip has more than MaxSpectrumQubits qubits.
	AlgebraicConnectivity float64
	// Gap is the random-edge second-moment gap with Haar gates
	// (moments.SpectralGap), nil for a chip in parts or of more than
	// moments.GapMaxQubits qubits.
	Gap *moments.Gap
	// HaarCollision is the Haar value 2/(D+1) of the whole chip, D = 2^n
	// (stats.HaarCollision).
	HaarCollision float64
	// HaarLimit is the value E[Z] tends to at large depth: the product over
	// the parts of their Haar collision probabilities (moments.PartsLimit,
	// without a final single-qubit layer); it equals HaarCollision for a
	// connected chip.
	HaarLimit float64
}

// Describe computes the Report of g with the layered classes layers (from
// LayerSource source). workers bounds the goroutines of the gap
// computation. Cancelling ctx stops the gap computation. It panics if g is
// nil.
func Describe(ctx context.Context, g *circuits.Graph, layers [][]circuits.Edge, source string, workers int) (*Report, error) {
	r := &Report{Graph: g, Layers: layers, LayerSource: source}
	r.Degrees = make([]int, g.MaxDegree()+1)
	for _, d := range g.Degrees() {
		r.Degrees[d]++
	}
	r.Components = g.Components()
	r.Diameter = -1
	if g.Qubits <= MaxDiameterQubits {
		r.Diameter = Diameter(g)
	}
	r.Bipartite = Bipartite(g)
	r.AlgebraicConnectivity = math.NaN()
	if g.Qubits <= MaxSpectrumQubits {
		r.AlgebraicConnectivity = AlgebraicConnectivity(g)
	}
	r.HaarCollision = stats.HaarCollision(math.Ldexp(1, g.Qubits))
	r.HaarLimit = moments.PartsLimit(g, false)
	if len(r.Components) == 1 && g.Qubits <= moments.GapMaxQubits {
		gap, err := moments.SpectralGap(ctx, g, workers)
		if err != nil {
			return nil, fmt.Errorf("chip: spectral gap: %w", err)
		}
		r.Gap = &gap
	}
	return r, nil
}

// adjacency returns the neighbours of each qubit.
func adjacency(g *circuits.Graph) [][]int {
	adj := make([][]int, g.Qubits)
	for _, e := range g.Edges {
		adj[e.A] = append(adj[e.A], e.B)
		adj[e.B] = append(adj[e.B], e.A)
	}
	return adj
}

// Diameter returns the largest distance, in couplers, between two qubits of
// the same connected part, by a breadth-first search from every qubit.
func Diameter(g *circuits.Graph) int {
	adj := adjacency(g)
	dist := make([]int, g.Qubits)
	queue := make([]int, 0, g.Qubits)
	best := 0
	for s := range adj {
		for i := range dist {
			dist[i] = -1
		}
		dist[s] = 0
		queue = append(queue[:0], s)
		for len(queue) > 0 {
			u := queue[0]
			queue = queue[1:]
			best = max(best, dist[u])
			for _, v := range adj[u] {
				if dist[v] < 0 {
					dist[v] = dist[u] + 1
					queue = append(queue, v)
				}
			}
		}
	}
	return best
}

// Bipartite reports whether g's qubits split into two sets with every
// coupler between them (a two-colouring by breadth-first search).
func Bipartite(g *circuits.Graph) bool {
	adj := adjacency(g)
	side := make([]int, g.Qubits)
	for s := range side {
		if side[s] != 0 {
			continue
		}
		side[s] = 1
		queue := []int{s}
		for len(queue) > 0 {
			u := queue[0]
			queue = queue[1:]
			for _, v := range adj[u] {
				switch side[v] {
				case 0:
					side[v] = -side[u]
					queue = append(queue, v)
				case side[u]:
					return false
				}
			}
		}
	}
	return true
}

// AlgebraicConnectivity returns the second-smallest eigenvalue of the graph
// Laplacian L = D − A (Fiedler, "Algebraic connectivity of graphs",
// Czechoslovak Math. J. 23, 298, 1973), found with gonum's symmetric
// eigensolver; it is 0 exactly when g is in parts. It panics if the
// eigensolver fails, which it does not for a symmetric matrix.
func AlgebraicConnectivity(g *circuits.Graph) float64 {
	n := g.Qubits
	l := mat.NewSymDense(n, nil)
	for _, e := range g.Edges {
		l.SetSym(e.A, e.B, l.At(e.A, e.B)-1)
		l.SetSym(e.A, e.A, l.At(e.A, e.A)+1)
		l.SetSym(e.B, e.B, l.At(e.B, e.B)+1)
	}
	var eig mat.EigenSym
	if !eig.Factorize(l, false) {
		panic("chip: Laplacian eigendecomposition failed")
	}
	vals := eig.Values(nil)
	slices.Sort(vals)
	// The smallest eigenvalue is 0 (constant vector); round-off leaves a
	// value of order 1e-15·n, which must not read as a connectivity.
	if v := vals[1]; v > 1e-9*float64(n) {
		return v
	}
	return 0
}

// layoutSeed fixes the force-directed layout so that a file's drawing is the
// same on every run.
const layoutSeed = 1984

// Coordinates returns drawing coordinates for g's qubits: g.Coords when the
// family or the edge file gives them, otherwise a force-directed layout of
// Eades ("A heuristic for graph drawing", Congressus Numerantium 42, 149,
// 1984) by gonum's graph/layout, started from a fixed seed.
func Coordinates(g *circuits.Graph) [][2]float64 {
	if g.Coords != nil {
		return g.Coords
	}
	sg := simple.NewUndirectedGraph()
	for q := 0; q < g.Qubits; q++ {
		sg.AddNode(simple.Node(q))
	}
	for _, e := range g.Edges {
		sg.SetEdge(sg.NewEdge(simple.Node(e.A), simple.Node(e.B)))
	}
	eades := layout.EadesR2{Repulsion: 1, Rate: 0.05, Updates: 60, Theta: 0.2, Src: rand.NewPCG(layoutSeed, uint64(g.Qubits))}
	opt := layout.NewOptimizerR2(ordered{sg}, eades.Update)
	for opt.Update() {
	}
	out := make([][2]float64, g.Qubits)
	for q := range out {
		c := opt.Coord2(int64(q))
		out[q] = [2]float64{c.X, c.Y}
	}
	return out
}

// ordered is an undirected graph whose node and neighbour iterators run in
// id order: simple.UndirectedGraph iterates a map, which would make the
// layout's random start and its sums differ from run to run.
type ordered struct{ *simple.UndirectedGraph }

func (g ordered) Nodes() graph.Nodes { return sortedNodes(g.UndirectedGraph.Nodes()) }

func (g ordered) From(id int64) graph.Nodes { return sortedNodes(g.UndirectedGraph.From(id)) }

func sortedNodes(it graph.Nodes) graph.Nodes {
	var nodes []graph.Node
	for it.Next() {
		nodes = append(nodes, it.Node())
	}
	slices.SortFunc(nodes, func(a, b graph.Node) int { return int(a.ID() - b.ID()) })
	return iterator.NewOrderedNodes(nodes)
}
