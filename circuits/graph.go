package circuits

import (
	"bufio"
	"cmp"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"mixdepth/internal/inputfile"
)

// Edge is an unordered coupling between qubits A and B, stored as given.
type Edge struct{ A, B int }

// Graph is a coupling graph: which qubit pairs can take a two-qubit gate.
// A valid Graph has at least two qubits, no self-loops, no duplicate edges,
// every qubit on an edge, and is connected. Edges keep the order in which they
// were listed; schedules depend on that order.
type Graph struct {
	// Name is the family spec ("grid:3x4") or the file the graph came from.
	Name string
	// Family is the family name ("line", "ring", "grid", "complete", "star"),
	// or "" for a graph read from a file.
	Family string
	// Rows and Cols are the grid shape when Family is "grid".
	Rows, Cols int
	// Qubits is the number of qubits n.
	Qubits int
	// Edges lists the couplings.
	Edges []Edge
	// Labels names the qubits, Labels[q] for qubit q, when the graph came
	// from an edge file with named qubits (or from such a graph by Drop);
	// nil means the qubits are known by their numbers (see Label).
	Labels []string
	// Coords are drawing coordinates (x, y), one per qubit: the family's
	// lattice positions, or those an edge file gives; nil when unknown.
	// They do not enter the Digest.
	Coords [][2]float64
	// Classes are the family's own layered classes (see LayeredClasses),
	// or nil when the graph has none or they follow from Family, Rows and
	// Cols (line, ring, grid).
	Classes [][]Edge
	// Dropped lists the qubits and couplers that Drop removed, in the
	// labels of the graph they were removed from; nil if none.
	Dropped []string
}

// Label returns the name of qubit q: Labels[q], or q in decimal when the
// graph has no labels. It panics if q is out of range.
func (g *Graph) Label(q int) string {
	if q < 0 || q >= g.Qubits {
		panic(fmt.Sprintf("circuits: qubit %d out of range 0..%d", q, g.Qubits-1))
	}
	if g.Labels != nil {
		return g.Labels[q]
	}
	return strconv.Itoa(q)
}

// EdgeLabel returns the coupler e as "A-B" in the qubits' labels.
func (g *Graph) EdgeLabel(e Edge) string { return g.Label(e.A) + "-" + g.Label(e.B) }

// Sentinel errors wrapped by *ParseError and by NewGraph.
var (
	ErrUnknownFamily  = errors.New("unknown graph family")
	ErrBadSize        = errors.New("bad graph size")
	ErrFieldCount     = errors.New("wrong number of fields")
	ErrNotNumber      = errors.New("not a whole number")
	ErrNegativeID     = errors.New("negative qubit id")
	ErrSelfLoop       = errors.New("self-loop")
	ErrDuplicateEdge  = errors.New("duplicate edge")
	ErrIsolatedQubit  = errors.New("isolated qubit")
	ErrDisconnected   = errors.New("disconnected graph")
	ErrTooFewQubits   = errors.New("fewer than 2 qubits")
	ErrQubitRange     = errors.New("qubit id out of range")
	ErrOverlap        = errors.New("gates in one layer share a qubit")
	ErrNotInGraph     = errors.New("edge not in the graph")
	ErrLayoutMismatch = errors.New("layout does not match the graph")
	ErrLayoutSyntax   = errors.New("malformed layout")
	ErrLineTooLong    = errors.New("line too long")
)

// maxLineBytes is the longest line of an edge-list file (bufio's default
// token limit).
const maxLineBytes = bufio.MaxScanTokenSize

// ParseError is an error in a graph or layout file, or in a graph spec.
// Line is 1-based; 0 means the error concerns the whole input.
type ParseError struct {
	File string
	Line int
	Err  error
	// Detail says what exactly is wrong, for the message.
	Detail string
	// edge is the 1-based position of the offending coupler in the list
	// given to newGraph (0: none), which ReadEdgeList turns into its line.
	edge int
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString("circuits: ")
	if e.File != "" {
		b.WriteString(e.File)
		if e.Line > 0 {
			fmt.Fprintf(&b, ":%d", e.Line)
		}
		b.WriteString(": ")
	} else if e.Line > 0 {
		fmt.Fprintf(&b, "line %d: ", e.Line)
	}
	b.WriteString(e.Err.Error())
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	return b.String()
}

func (e *ParseError) Unwrap() error { return e.Err }

// NewGraph validates edges on qubits 0..n-1 and returns the graph.
// The error, if any, is a *ParseError with Line 0; its message names the
// 1-based position of an offending coupler in edges.
func NewGraph(name string, n int, edges []Edge) (*Graph, error) {
	return newGraph(name, n, edges, false)
}

// NewGraphParts is NewGraph for a chip that may have isolated qubits and
// several connected parts; it still needs at least one edge.
func NewGraphParts(name string, n int, edges []Edge) (*Graph, error) {
	return newGraph(name, n, edges, true)
}

func newGraph(name string, n int, edges []Edge, parts bool) (*Graph, error) {
	if n < 2 {
		return nil, &ParseError{File: name, Err: ErrTooFewQubits, Detail: fmt.Sprintf("%d qubit(s); a coupling graph needs at least one coupler", n)}
	}
	if len(edges) == 0 {
		return nil, &ParseError{File: name, Err: ErrTooFewQubits, Detail: "no couplers; a coupling graph needs at least one"}
	}
	dupAt, dupOf := firstDuplicate(edges)
	for i, e := range edges {
		if i == dupAt {
			return nil, &ParseError{File: name, edge: i + 1, Err: ErrDuplicateEdge, Detail: fmt.Sprintf("coupler %d (%d %d) repeats coupler %d", i+1, e.A, e.B, dupOf+1)}
		}
		if e.A < 0 || e.B < 0 {
			return nil, &ParseError{File: name, edge: i + 1, Err: ErrNegativeID, Detail: fmt.Sprintf("coupler %d (%d %d)", i+1, e.A, e.B)}
		}
		if e.A >= n || e.B >= n {
			return nil, &ParseError{File: name, edge: i + 1, Err: ErrQubitRange, Detail: fmt.Sprintf("coupler %d (%d %d) on %d qubits", i+1, e.A, e.B, n)}
		}
		if e.A == e.B {
			return nil, &ParseError{File: name, edge: i + 1, Err: ErrSelfLoop, Detail: fmt.Sprintf("coupler %d (%d %d)", i+1, e.A, e.B)}
		}
	}
	g := &Graph{Name: name, Qubits: n, Edges: append([]Edge(nil), edges...)}
	if parts {
		return g, nil
	}
	// Each edge covers at most two qubits, so with n > 2·len(edges) some qubit
	// is isolated; finding it without an n-sized table keeps a huge id in a
	// file from allocating gigabytes.
	if q := firstIsolated(n, edges); q >= 0 {
		return nil, isolatedError(name, q, n-1)
	}
	if comps := len(g.Components()); comps > 1 {
		return nil, &ParseError{File: name, Err: ErrDisconnected, Detail: fmt.Sprintf("%d separate parts; random circuits on it never mix between them (--allow-disconnected accepts it)", comps)}
	}
	return g, nil
}

// firstDuplicate returns the index of the first edge that repeats an earlier
// one (either orientation) and the index of that earlier edge, or -1, -1. It
// sorts indices instead of filling a map, so that the two million edges of
// complete:2048 take a fraction of a second.
func firstDuplicate(edges []Edge) (at, of int) {
	idx := make([]int, len(edges))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(i, j int) int {
		a, b := key(edges[i]), key(edges[j])
		return cmp.Or(cmp.Compare(a[0], b[0]), cmp.Compare(a[1], b[1]), cmp.Compare(i, j))
	})
	at, of = -1, -1
	for k := 1; k < len(idx); k++ {
		if key(edges[idx[k]]) == key(edges[idx[k-1]]) && (at < 0 || idx[k] < at) {
			// idx[k-1] is not necessarily the first occurrence; find it.
			first := k - 1
			for first > 0 && key(edges[idx[first-1]]) == key(edges[idx[k]]) {
				first--
			}
			at, of = idx[k], idx[first]
		}
	}
	return at, of
}

// firstIsolated returns the smallest qubit in 0..n-1 on no edge of edges, or
// -1 if every qubit is on an edge. The ids in edges must lie in 0..n-1 (n may
// be math.MaxInt for "unbounded"); the work is O(len(edges)) whatever n is.
func firstIsolated(n int, edges []Edge) int { return firstUnlisted(n-1, edges, nil) }

func isolatedError(name string, q, maxID int) error {
	return &ParseError{File: name, Err: ErrIsolatedQubit, Detail: fmt.Sprintf("qubit %d is on no coupler (qubits are 0..%d); couple it or renumber the qubits (--allow-disconnected accepts it)", q, maxID)}
}

func key(e Edge) [2]int {
	if e.A > e.B {
		return [2]int{e.B, e.A}
	}
	return [2]int{e.A, e.B}
}

// Components returns the connected components of g, each a sorted list of
// qubits, ordered by their smallest qubit. A valid Graph has one; a graph
// read with AllowDisconnected may have several.
func (g *Graph) Components() [][]int { return componentsOf(g.Qubits, g.Edges) }

// componentsOf returns the connected components of the graph on 0..n−1 with
// the given edges (ids in range), by union-find.
func componentsOf(n int, edges []Edge) [][]int {
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	find := func(x int) int {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	for _, e := range edges {
		ra, rb := find(e.A), find(e.B)
		if ra != rb {
			parent[max(ra, rb)] = min(ra, rb)
		}
	}
	index := map[int]int{}
	var comps [][]int
	for q := 0; q < n; q++ {
		r := find(q)
		k, ok := index[r]
		if !ok {
			k = len(comps)
			index[r] = k
			comps = append(comps, nil)
		}
		comps[k] = append(comps[k], q)
	}
	return comps
}

// Degrees returns the degree of every qubit.
func (g *Graph) Degrees() []int {
	deg := make([]int, g.Qubits)
	for _, e := range g.Edges {
		deg[e.A]++
		deg[e.B]++
	}
	return deg
}

// MaxDegree returns Δ, the largest qubit degree.
func (g *Graph) MaxDegree() int {
	m := 0
	for _, d := range g.Degrees() {
		m = max(m, d)
	}
	return m
}

// MinDegree returns δ, the smallest qubit degree.
func (g *Graph) MinDegree() int {
	deg := g.Degrees()
	m := deg[0]
	for _, d := range deg {
		m = min(m, d)
	}
	return m
}

// HasEdge reports whether a and b are coupled.
func (g *Graph) HasEdge(a, b int) bool {
	k := key(Edge{a, b})
	for _, e := range g.Edges {
		if key(e) == k {
			return true
		}
	}
	return false
}

// Digest returns a short hex digest of the qubit count, the edge list in
// order and the labels (if any), identifying the graph in table metadata.
func (g *Graph) Digest() string {
	h := sha256.New()
	fmt.Fprintf(h, "qubits %d\n", g.Qubits)
	for _, e := range g.Edges {
		fmt.Fprintf(h, "%d %d\n", e.A, e.B)
	}
	// Labels enter only when present, so that the digest of an unlabelled
	// graph is the one tables have always recorded.
	for q, l := range g.Labels {
		fmt.Fprintf(h, "label %d %s\n", q, l)
	}
	return hex.EncodeToString(h.Sum(nil))[:16]
}

// Families lists the built-in graph families with their spec syntax.
var Families = []string{"line:N", "ring:N", "grid:RxC", "complete:N", "star:N",
	"honeycomb:RxC", "triangular:RxC", "diagonal:RxC", "torus:RxC", "subdivide:SPEC",
	"regular:N,K[,SEED]", "gnp:N,P[,SEED]", "tree:N[,SEED]", "btree:DEPTH"}

// ReadOptions relax the validation of a graph read from a file.
type ReadOptions struct {
	// AllowDisconnected accepts isolated qubits and several connected parts.
	AllowDisconnected bool
}

// ParseGraph returns the graph named by spec: a family (see Families and
// Family) or the path of an edge-list file (see ReadEdgeList).
func ParseGraph(spec string) (*Graph, error) { return ParseGraphWith(spec, ReadOptions{}) }

// ParseGraphWith is ParseGraph with options for a file's graph.
func ParseGraphWith(spec string, o ReadOptions) (*Graph, error) {
	fam, arg, isFamily := strings.Cut(spec, ":")
	if isFamily && isFamilyName(fam) {
		return Family(fam, arg)
	}
	f, err := inputfile.Open(spec, inputfile.SmallLimit)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, &ParseError{File: spec, Err: ErrUnknownFamily, Detail: fmt.Sprintf("no such file, and not one of %s", strings.Join(Families, ", "))}
		}
		return nil, fmt.Errorf("circuits: reading graph file: %w", err)
	}
	defer f.Close()
	return ReadEdgeListWith(spec, f, o)
}

func isFamilyName(fam string) bool {
	switch fam {
	case "line", "ring", "complete", "star", "grid":
		return true
	}
	_, ok := newFamilies[fam]
	return ok
}

// Family builds the graph of a named family with its size argument; the
// numbering and classes of each family are documented in the README's
// conventions and beside latticeFamily.
func Family(fam, arg string) (*Graph, error) {
	spec := fam + ":" + arg
	switch fam {
	case "line", "ring", "grid", "complete", "star":
	default:
		if _, ok := newFamilies[fam]; ok {
			return latticeFamily(fam, arg)
		}
		return nil, &ParseError{File: spec, Err: ErrUnknownFamily, Detail: "use one of " + strings.Join(Families, ", ")}
	}
	bad := func(detail string) error {
		return &ParseError{File: spec, Err: ErrBadSize, Detail: detail}
	}
	if fam == "grid" {
		rs, cs, ok := strings.Cut(arg, "x")
		r, err1 := strconv.Atoi(rs)
		c, err2 := strconv.Atoi(cs)
		if !ok || err1 != nil || err2 != nil {
			return nil, bad("write the grid size as RxC, for example grid:3x4")
		}
		if r < 1 || c < 1 || r > 1<<20 || c > 1<<20 || r*c < 2 || r*c > maxFamilyQubits("grid") {
			return nil, bad("a grid needs R, C ≥ 1 and between 2 and 2^20 qubits")
		}
		g, err := NewGraph(spec, r*c, gridEdges(r, c))
		if err != nil {
			return nil, err
		}
		g.Family, g.Rows, g.Cols = fam, r, c
		g.Coords = make([][2]float64, r*c)
		for q := range g.Coords {
			g.Coords[q] = [2]float64{float64(q % c), -float64(q / c)}
		}
		return g, nil
	}
	n, err := strconv.Atoi(arg)
	if err != nil {
		return nil, bad(fmt.Sprintf("write the qubit count as a whole number, for example %s:8", fam))
	}
	least := 2
	if fam == "ring" {
		least = 3
	}
	if n < least {
		return nil, bad(fmt.Sprintf("%s needs N ≥ %d", fam, least))
	}
	if most := maxFamilyQubits(fam); n > most {
		return nil, bad(fmt.Sprintf("%s:%d is larger than the %d qubits a %s graph may have here", fam, n, most, fam))
	}
	var edges []Edge
	switch fam {
	case "line":
		for i := 0; i+1 < n; i++ {
			edges = append(edges, Edge{i, i + 1})
		}
	case "ring":
		for i := 0; i+1 < n; i++ {
			edges = append(edges, Edge{i, i + 1})
		}
		edges = append(edges, Edge{n - 1, 0})
	case "complete":
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				edges = append(edges, Edge{i, j})
			}
		}
	case "star":
		for i := 1; i < n; i++ {
			edges = append(edges, Edge{0, i})
		}
	}
	g, err := NewGraph(spec, n, edges)
	if err != nil {
		return nil, err
	}
	g.Family = fam
	g.Coords = make([][2]float64, n)
	for i := range g.Coords {
		switch fam {
		case "line":
			g.Coords[i] = [2]float64{float64(i), 0}
		case "star":
			if i > 0 {
				g.Coords[i] = circlePoint(i-1, n-1)
			}
		default:
			g.Coords[i] = circlePoint(i, n)
		}
	}
	return g, nil
}

// circlePoint is point i of n evenly spaced on the unit circle, the first at
// the top, going clockwise.
func circlePoint(i, n int) [2]float64 {
	a := math.Pi/2 - 2*math.Pi*float64(i)/float64(n)
	return [2]float64{math.Cos(a), math.Sin(a)}
}

// maxFamilyQubits bounds family sizes so a typo cannot ask for billions of
// edges: a complete graph is limited by its N(N−1)/2 edges, the others by
// far more qubits than any simulation here can take.
func maxFamilyQubits(fam string) int {
	if fam == "complete" {
		return 2048
	}
	return 1 << 20
}

// gridEdges lists the horizontal edges row by row, then the vertical ones.
func gridEdges(r, c int) []Edge {
	var edges []Edge
	for i := 0; i < r; i++ {
		for j := 0; j+1 < c; j++ {
			edges = append(edges, Edge{i*c + j, i*c + j + 1})
		}
	}
	for i := 0; i+1 < r; i++ {
		for j := 0; j < c; j++ {
			edges = append(edges, Edge{i*c + j, (i+1)*c + j})
		}
	}
	return edges
}
