package circuits

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"strings"
)

// The lattice and random families beyond line, ring, grid, complete and star.
// Each builder lists its edges in a documented order, gives its qubits
// lattice coordinates where the family has them, and sets Graph.Classes to
// the family's natural layered classes where it has them (the README's
// conventions section repeats these rules):
//
//   - honeycomb:RxC, R rows of C hexagonal cells drawn as a brick wall: vertex
//     rows i = 0..R, columns j = 0..2C+1, with the two corner vertices of
//     degree 1 removed; qubits numbered row by row, left to right. Edges: the
//     horizontal ones row by row, then the rungs (i, j)–(i+1, j) where i+j is
//     even. 2(R+1)(C+1)−2 qubits, (R+1)(2C+1)−2+R(C+1) couplers. Classes:
//     horizontal with j even, horizontal with j odd, rungs.
//   - triangular:RxC, the grid plus the diagonal (r, c)–(r+1, c+1) of every
//     cell; qubit (r, c) = r·C+c. Edges: horizontal, vertical, diagonal, each
//     row by row. Classes: horizontal c even, c odd; vertical r even, r odd;
//     diagonal r even, r odd.
//   - diagonal:RxC, R rows of C qubits with odd rows shifted half a step, each
//     qubit coupled to its diagonal neighbours in the rows above and below
//     (interior degree 4, the layout of a square lattice rotated by 45°);
//     qubit (r, c) = r·C+c. Row r even couples (r, c) to (r+1, c−1) and
//     (r+1, c); row r odd couples it to (r+1, c) and (r+1, c+1). Edges row by
//     row, c ascending, the left neighbour first. Classes: down-right r even,
//     down-right r odd, down-left r even, down-left r odd.
//   - torus:RxC, the grid with wrap-around couplers, R, C ≥ 3; qubit (r, c) =
//     r·C+c. Edges: (r, c)–(r, c+1 mod C) row by row, then (r, c)–(r+1 mod R, c).
//     Classes: horizontal c even, horizontal c odd, the wrap coupler
//     (r, C−1)–(r, 0) in a class of its own when C is odd (in the odd class
//     when C is even); then the same for the vertical couplers.
//   - subdivide:SPEC, a qubit on every coupler of the graph SPEC (n qubits, m
//     couplers): qubits 0..n−1 are SPEC's, qubit n+k sits on SPEC's coupler
//     k = (a, b), which becomes the couplers (a, n+k) and (n+k, b) in that
//     order. Classes: for each class of SPEC's layered schedule, its (a, n+k)
//     couplers, then its (n+k, b) couplers.
//   - regular:N,K[,SEED], a uniformly random-looking connected K-regular
//     graph: random pairing of N·K half-edges without loops or repeats
//     (Steger and Wormald, Combinatorics, Probability and Computing 8, 377,
//     1999), redrawn until connected. Edges sorted by (smaller, larger).
//   - gnp:N,P[,SEED], the Erdős–Rényi graph G(N, P), each pair (i, j), i < j,
//     in that order, drawn with probability P; redrawn until connected.
//   - tree:N[,SEED], a uniformly random labelled tree on N qubits: a uniform
//     Prüfer sequence of length N−2 decoded into its tree (Prüfer 1918),
//     edges in decoding order.
//   - btree:DEPTH, the complete binary tree of 2^(DEPTH+1)−1 qubits in heap
//     order: qubit i has children 2i+1 and 2i+2; edge (i, child) in order of
//     the child. Classes: the root's left edge in class 0, its right edge in
//     class 1; below a qubit whose parent edge is in class c, the left child's
//     edge takes the smaller and the right child's the larger of the other two.
//
// A random family draws from math/rand/v2's PCG seeded with (SEED,
// familyStream); SEED defaults to 1 and the graph's Name always shows it, so
// a name stands for one graph.
const familyStream = 0x6d69786465707468

// familyAttempts bounds the redraws of a random family that must be connected.
const familyAttempts = 200

// Limits of the family parameters, which the error messages quote.
const (
	maxLatticeQubits = 1 << 20
	maxRandomQubits  = 4096
	maxGnpQubits     = 1024
	maxTreeDepth     = 19
)

// newFamilies are the families built in this file, with their spec syntax.
var newFamilies = map[string]string{
	"honeycomb":  "honeycomb:RxC",
	"triangular": "triangular:RxC",
	"diagonal":   "diagonal:RxC",
	"torus":      "torus:RxC",
	"subdivide":  "subdivide:SPEC",
	"regular":    "regular:N,K[,SEED]",
	"gnp":        "gnp:N,P[,SEED]",
	"tree":       "tree:N[,SEED]",
	"btree":      "btree:DEPTH",
}

// latticeFamily builds one of the new families; spec is fam:arg.
func latticeFamily(fam, arg string) (*Graph, error) {
	spec := fam + ":" + arg
	bad := func(format string, args ...any) error {
		return &ParseError{File: spec, Err: ErrBadSize, Detail: fmt.Sprintf(format, args...)}
	}
	switch fam {
	case "honeycomb", "triangular", "diagonal", "torus":
		r, c, ok := parseShape(arg)
		least := 1
		if fam == "torus" {
			least = 3
		}
		if !ok {
			return nil, bad("write the size as RxC, for example %s:3x4", fam)
		}
		if r < least || c < least || r > 1<<10 || c > 1<<10 || (fam == "diagonal" && r < 2) || (fam != "honeycomb" && r*c < 2) {
			switch fam {
			case "torus":
				return nil, bad("a torus needs 3 ≤ R, C ≤ 1024 (smaller sizes repeat couplers)")
			case "diagonal":
				return nil, bad("a diagonal lattice needs 2 ≤ R ≤ 1024 and 1 ≤ C ≤ 1024")
			}
			return nil, bad("%s needs 1 ≤ R, C ≤ 1024 and at least 2 qubits", fam)
		}
		var b latticeBuilder
		switch fam {
		case "honeycomb":
			b = honeycomb(r, c)
		case "triangular":
			b = triangular(r, c)
		case "diagonal":
			b = diagonal(r, c)
		case "torus":
			b = torus(r, c)
		}
		return b.graph(spec, fam, r, c)
	case "subdivide":
		base, err := ParseGraph(arg)
		if err != nil {
			return nil, err
		}
		if base.Qubits+len(base.Edges) > maxLatticeQubits {
			return nil, bad("%d qubits, more than the %d a family may have here", base.Qubits+len(base.Edges), maxLatticeQubits)
		}
		return subdivide(spec, base)
	case "regular", "gnp", "tree":
		return randomFamily(fam, arg)
	case "btree":
		d, err := strconv.Atoi(arg)
		if err != nil || d < 1 || d > maxTreeDepth {
			return nil, bad("btree:DEPTH needs a whole DEPTH from 1 to %d", maxTreeDepth)
		}
		return binaryTree(spec, d)
	}
	return nil, &ParseError{File: spec, Err: ErrUnknownFamily, Detail: "use one of " + strings.Join(Families, ", ")}
}

// parseShape reads "RxC".
func parseShape(arg string) (r, c int, ok bool) {
	rs, cs, ok := strings.Cut(arg, "x")
	r, err1 := strconv.Atoi(rs)
	c, err2 := strconv.Atoi(cs)
	return r, c, ok && err1 == nil && err2 == nil
}

// latticeBuilder collects a lattice family's qubits, edges and classes.
type latticeBuilder struct {
	ids     map[[2]int]int // lattice position → qubit, for lattices with holes
	coords  [][2]float64
	edges   []Edge
	classes [][]Edge
}

func newLattice(nclass int) latticeBuilder {
	return latticeBuilder{ids: map[[2]int]int{}, classes: make([][]Edge, nclass)}
}

// qubit adds the qubit at lattice position p drawn at (x, y).
func (b *latticeBuilder) qubit(p [2]int, x, y float64) {
	b.ids[p] = len(b.coords)
	b.coords = append(b.coords, [2]float64{x, y})
}

// edge couples the qubits at positions p and q, in class cl; it is skipped
// when either position holds no qubit.
func (b *latticeBuilder) edge(p, q [2]int, cl int) {
	a, okA := b.ids[p]
	c, okB := b.ids[q]
	if !okA || !okB {
		return
	}
	e := Edge{a, c}
	b.edges = append(b.edges, e)
	b.classes[cl] = append(b.classes[cl], e)
}

func (b latticeBuilder) graph(spec, fam string, r, c int) (*Graph, error) {
	g, err := NewGraph(spec, len(b.coords), b.edges)
	if err != nil {
		return nil, err
	}
	g.Family, g.Rows, g.Cols = fam, r, c
	g.Coords = b.coords
	g.Classes = nonEmpty(b.classes)
	return g, nil
}

// nonEmpty returns classes without its empty classes, in place.
func nonEmpty(classes [][]Edge) [][]Edge {
	out := classes[:0]
	for _, cl := range classes {
		if len(cl) > 0 {
			out = append(out, cl)
		}
	}
	return out
}

func honeycomb(r, c int) latticeBuilder {
	b := newLattice(3)
	w := 2*c + 2
	// The corner vertex that would have degree 1: (0, 2C+1) on top, and on
	// the bottom row R the end that no rung of band R−1 reaches.
	skip := func(i, j int) bool {
		if i == 0 && j == w-1 {
			return true
		}
		if i == r {
			if (r-1)%2 == 0 {
				return j == w-1
			}
			return j == 0
		}
		return false
	}
	const h = 0.8660254037844386 // √3/2: regular hexagons of side 1
	for i := 0; i <= r; i++ {
		for j := 0; j < w; j++ {
			if skip(i, j) {
				continue
			}
			y := -1.5 * float64(i)
			if (i+j)%2 == 0 { // a rung goes down from here: the lower corner
				y -= 0.25
			} else {
				y += 0.25
			}
			b.qubit([2]int{i, j}, h*float64(j), y)
		}
	}
	for i := 0; i <= r; i++ {
		for j := 0; j+1 < w; j++ {
			b.edge([2]int{i, j}, [2]int{i, j + 1}, j%2)
		}
	}
	for i := 0; i < r; i++ {
		for j := 0; j < w; j++ {
			if (i+j)%2 == 0 {
				b.edge([2]int{i, j}, [2]int{i + 1, j}, 2)
			}
		}
	}
	return b
}

func triangular(r, c int) latticeBuilder {
	b := newLattice(6)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			b.qubit([2]int{i, j}, float64(j)-0.5*float64(i), -0.8660254037844386*float64(i))
		}
	}
	for i := 0; i < r; i++ {
		for j := 0; j+1 < c; j++ {
			b.edge([2]int{i, j}, [2]int{i, j + 1}, j%2)
		}
	}
	for i := 0; i+1 < r; i++ {
		for j := 0; j < c; j++ {
			b.edge([2]int{i, j}, [2]int{i + 1, j}, 2+i%2)
		}
	}
	for i := 0; i+1 < r; i++ {
		for j := 0; j+1 < c; j++ {
			b.edge([2]int{i, j}, [2]int{i + 1, j + 1}, 4+i%2)
		}
	}
	return b
}

func diagonal(r, c int) latticeBuilder {
	b := newLattice(4)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			b.qubit([2]int{i, j}, float64(j)+0.5*float64(i%2), -0.5*float64(i))
		}
	}
	for i := 0; i+1 < r; i++ {
		left, right := -1, 0 // column offsets of the neighbours below
		if i%2 == 1 {
			left, right = 0, 1
		}
		for j := 0; j < c; j++ {
			b.edge([2]int{i, j}, [2]int{i + 1, j + left}, 2+i%2)
			b.edge([2]int{i, j}, [2]int{i + 1, j + right}, i%2)
		}
	}
	return b
}

func torus(r, c int) latticeBuilder {
	b := newLattice(6)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			b.qubit([2]int{i, j}, float64(j), -float64(i))
		}
	}
	// cycleClass is the class of the coupler from position k to k+1 mod n on
	// a cycle of n: the ring rule.
	cycleClass := func(k, n int) int {
		if k == n-1 && n%2 == 1 {
			return 2
		}
		return k % 2
	}
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			b.edge([2]int{i, j}, [2]int{i, (j + 1) % c}, cycleClass(j, c))
		}
	}
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			b.edge([2]int{i, j}, [2]int{(i + 1) % r, j}, 3+cycleClass(i, r))
		}
	}
	return b
}

func subdivide(spec string, base *Graph) (*Graph, error) {
	n := base.Qubits
	index := make(map[[2]int]int, len(base.Edges))
	var edges []Edge
	for k, e := range base.Edges {
		index[key(e)] = k
		edges = append(edges, Edge{e.A, n + k}, Edge{n + k, e.B})
	}
	g, err := NewGraph(spec, n+len(base.Edges), edges)
	if err != nil {
		return nil, err
	}
	g.Family = "subdivide"
	for _, cl := range LayeredClasses(base) {
		var first, second []Edge
		for _, e := range cl {
			k := index[key(e)]
			first = append(first, edges[2*k])
			second = append(second, edges[2*k+1])
		}
		g.Classes = append(g.Classes, first, second)
	}
	if base.Labels != nil {
		g.Labels = append([]string(nil), base.Labels...)
		for _, e := range base.Edges {
			g.Labels = append(g.Labels, base.EdgeLabel(e))
		}
	}
	if base.Coords != nil {
		g.Coords = append([][2]float64(nil), base.Coords...)
		for _, e := range base.Edges {
			p, q := base.Coords[e.A], base.Coords[e.B]
			g.Coords = append(g.Coords, [2]float64{(p[0] + q[0]) / 2, (p[1] + q[1]) / 2})
		}
	}
	return g, nil
}

func binaryTree(spec string, depth int) (*Graph, error) {
	n := 1<<(depth+1) - 1
	edges := make([]Edge, 0, n-1)
	parentClass := make([]int, n)
	classes := make([][]Edge, 3)
	coords := make([][2]float64, n)
	for i := 0; i < n; i++ {
		level := bits(i + 1)
		pos := i + 1 - 1<<level // position within its level
		width := float64(int(1) << (depth - level))
		coords[i] = [2]float64{width*float64(pos) + width/2, -float64(level)}
		if i == 0 {
			continue
		}
		p := (i - 1) / 2
		var cl int
		if p == 0 {
			cl = i - 1 // left edge 0, right edge 1
		} else {
			others := [2]int{}
			k := 0
			for c := 0; c < 3; c++ {
				if c != parentClass[p] {
					others[k] = c
					k++
				}
			}
			cl = others[(i-1)%2]
		}
		parentClass[i] = cl
		e := Edge{p, i}
		edges = append(edges, e)
		classes[cl] = append(classes[cl], e)
	}
	g, err := NewGraph(spec, n, edges)
	if err != nil {
		return nil, err
	}
	g.Family, g.Coords, g.Classes = "btree", coords, nonEmpty(classes)
	return g, nil
}

// bits returns ⌊log2 x⌋ for x ≥ 1.
func bits(x int) int {
	b := -1
	for ; x > 0; x >>= 1 {
		b++
	}
	return b
}

// randomFamily builds regular, gnp or tree from "N,K[,SEED]", "N,P[,SEED]"
// or "N[,SEED]".
func randomFamily(fam, arg string) (*Graph, error) {
	spec := fam + ":" + arg
	bad := func(format string, args ...any) error {
		return &ParseError{File: spec, Err: ErrBadSize, Detail: fmt.Sprintf(format, args...)}
	}
	fields := strings.Split(arg, ",")
	params := 2
	if fam == "tree" {
		params = 1
	}
	if len(fields) < params || len(fields) > params+1 {
		return nil, bad("write %s", newFamilies[fam])
	}
	n, err := strconv.Atoi(fields[0])
	most := maxRandomQubits
	if fam == "gnp" {
		most = maxGnpQubits
	}
	if fam == "tree" {
		most = maxLatticeQubits
	}
	if err != nil || n < 2 || n > most {
		return nil, bad("N must be a whole number from 2 to %d", most)
	}
	seed := uint64(1)
	if len(fields) == params+1 {
		seed, err = strconv.ParseUint(fields[params], 10, 64)
		if err != nil {
			return nil, bad("SEED %q must be a whole number from 0 to 2^64−1", fields[params])
		}
	}
	rng := rand.New(rand.NewPCG(seed, familyStream))
	var edges []Edge
	var name string
	switch fam {
	case "tree":
		name = fmt.Sprintf("tree:%d,%d", n, seed)
		seq := make([]int, n-2)
		for i := range seq {
			seq[i] = rng.IntN(n)
		}
		edges = PruferTree(seq)
	case "regular":
		k, err := strconv.Atoi(fields[1])
		if err != nil || k < 1 || k > n-1 || n*k%2 != 0 {
			return nil, bad("K must be a whole number from 1 to N−1 = %d with N·K even", n-1)
		}
		name = fmt.Sprintf("regular:%d,%d,%d", n, k, seed)
		for attempt := 0; edges == nil; attempt++ {
			if attempt == familyAttempts {
				return nil, &ParseError{File: name, Err: ErrDisconnected, Detail: fmt.Sprintf("no connected %d-regular graph in %d draws; use K ≥ 3, or another SEED", k, familyAttempts)}
			}
			if e, ok := randomRegular(n, k, rng); ok && connected(n, e) {
				edges = e
			}
		}
	case "gnp":
		p, err := strconv.ParseFloat(fields[1], 64)
		if err != nil || !(p > 0 && p <= 1) {
			return nil, bad("P must be a probability in (0, 1]")
		}
		name = fmt.Sprintf("gnp:%d,%s,%d", n, fields[1], seed)
		for attempt := 0; edges == nil; attempt++ {
			if attempt == familyAttempts {
				return nil, &ParseError{File: name, Err: ErrDisconnected, Detail: fmt.Sprintf("no connected graph in %d draws; G(N, P) is connected with high probability once P > ln(N)/N = %.3g", familyAttempts, math.Log(float64(n))/float64(n))}
			}
			var e []Edge
			for i := 0; i < n; i++ {
				for j := i + 1; j < n; j++ {
					if rng.Float64() < p {
						e = append(e, Edge{i, j})
					}
				}
			}
			if len(e) > 0 && connected(n, e) {
				edges = e
			}
		}
	}
	g, err := NewGraph(name, n, edges)
	if err != nil {
		return nil, err
	}
	g.Family = fam
	return g, nil
}

// PruferTree decodes a Prüfer sequence over 0..n−1, n = len(seq)+2, into
// the edges of its labelled tree (Prüfer, Archiv der Mathematik und Physik
// 27, 142, 1918): repeatedly join the smallest leaf to the next entry. Edge
// i is (leaf, seq[i]) and the last edge joins the two remaining qubits. It
// panics if an entry is outside 0..n−1.
func PruferTree(seq []int) []Edge {
	n := len(seq) + 2
	degree := make([]int, n)
	for i := range degree {
		degree[i] = 1
	}
	for _, v := range seq {
		if v < 0 || v >= n {
			panic(fmt.Sprintf("circuits: Prüfer entry %d outside 0..%d", v, n-1))
		}
		degree[v]++
	}
	ptr := 0
	for degree[ptr] != 1 {
		ptr++
	}
	leaf := ptr
	edges := make([]Edge, 0, n-1)
	for _, v := range seq {
		edges = append(edges, Edge{leaf, v})
		degree[v]--
		if degree[v] == 1 && v < ptr {
			leaf = v
			continue
		}
		ptr++
		for degree[ptr] != 1 {
			ptr++
		}
		leaf = ptr
	}
	return append(edges, Edge{leaf, n - 1})
}

// randomRegular pairs the n·k half-edges at random, never making a loop or
// a repeated edge, and reports false if it gets stuck (Steger and Wormald
// 1999). Edges come sorted.
func randomRegular(n, k int, rng *rand.Rand) ([]Edge, bool) {
	points := make([]int, 0, n*k)
	for v := 0; v < n; v++ {
		for range k {
			points = append(points, v)
		}
	}
	has := make(map[[2]int]bool, n*k/2)
	var edges []Edge
	take := func(i, j int) {
		u, v := points[i], points[j]
		edges = append(edges, Edge{min(u, v), max(u, v)})
		has[key(Edge{u, v})] = true
		hi, lo := max(i, j), min(i, j)
		points[hi] = points[len(points)-1]
		points = points[:len(points)-1]
		points[lo] = points[len(points)-1]
		points = points[:len(points)-1]
	}
	ok := func(i, j int) bool {
		u, v := points[i], points[j]
		return u != v && !has[key(Edge{u, v})]
	}
	for len(points) > 0 {
		found := false
		for try := 0; try < 64 && !found; try++ {
			i, j := rng.IntN(len(points)), rng.IntN(len(points))
			if i != j && ok(i, j) {
				take(i, j)
				found = true
			}
		}
		for i := 0; i < len(points) && !found; i++ {
			for j := i + 1; j < len(points) && !found; j++ {
				if ok(i, j) {
					take(i, j)
					found = true
				}
			}
		}
		if !found {
			return nil, false
		}
	}
	slices.SortFunc(edges, func(a, b Edge) int {
		if a.A != b.A {
			return a.A - b.A
		}
		return a.B - b.B
	})
	return edges, true
}

// connected reports whether the edges join all of 0..n−1.
func connected(n int, edges []Edge) bool {
	return len(componentsOf(n, edges)) == 1
}
