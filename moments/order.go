package moments

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"mixdepth/circuits"
)

// ErrOrder is wrapped by ReadOrder and CheckOrder for a qubit order that is
// not a permutation of the graph's qubits.
var ErrOrder = errors.New("bad qubit order")

// Bandwidth returns the largest distance in order (order[k] is the qubit at
// site k) between two coupled qubits of g. It panics if order is not a
// permutation of g's qubits.
func Bandwidth(g *circuits.Graph, order []int) int {
	if err := CheckOrder(g, order); err != nil {
		panic(err.Error())
	}
	site := make([]int, g.Qubits)
	for k, q := range order {
		site[q] = k
	}
	w := 0
	for _, e := range g.Edges {
		w = max(w, abs(site[e.A]-site[e.B]))
	}
	return w
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// orderCost returns the bandwidth and the total distance of the edges of g
// in order: the MPS cost of a layer grows with the second, its bond with
// the first.
func orderCost(g *circuits.Graph, order []int) (width, total int) {
	site := make([]int, g.Qubits)
	for k, q := range order {
		site[q] = k
	}
	for _, e := range g.Edges {
		d := abs(site[e.A] - site[e.B])
		width = max(width, d)
		total += d
	}
	return width, total
}

// QubitOrder returns the linear order of the qubits of g that the MPS
// engine uses unless told otherwise: the candidate with the smallest
// bandwidth, then the smallest total edge distance, among the reverse
// Cuthill–McKee order (Cuthill, McKee, "Reducing the bandwidth of sparse
// symmetric matrices", ACM 1969; George 1971 for the reversal) started from
// each of the first orderStarts qubits of minimum degree, and, for grid:RxC, the rows (or columns)
// in turn along the shorter side. The row-by-row order has bandwidth
// min(R, C), while the snake (boustrophedon) order has 2·min(R, C)−1 at the
// turns, so the row order is the one kept for grids.
func QubitOrder(g *circuits.Graph) []int {
	var cands [][]int
	if g.Family == "grid" && g.Rows*g.Cols == g.Qubits {
		rows := make([]int, 0, g.Qubits)
		if g.Cols <= g.Rows {
			for q := range g.Qubits {
				rows = append(rows, q)
			}
		} else {
			for c := range g.Cols {
				for r := range g.Rows {
					rows = append(rows, r*g.Cols+c)
				}
			}
		}
		cands = append(cands, rows)
	}
	deg := g.Degrees()
	dmin := slices.Min(deg)
	starts := 0
	for q, d := range deg {
		if d == dmin && starts < orderStarts {
			cands = append(cands, reverseCuthillMcKee(g, q, deg))
			starts++
		}
	}
	best := cands[0]
	bw, bt := orderCost(g, best)
	for _, c := range cands[1:] {
		w, t := orderCost(g, c)
		if w < bw || w == bw && t < bt {
			best, bw, bt = c, w, t
		}
	}
	return best
}

// orderStarts bounds the starting qubits QubitOrder tries, so that dense
// graphs do not pay |V| searches.
const orderStarts = 8

// reverseCuthillMcKee returns the reverse Cuthill–McKee order of g from
// start: a breadth-first search that visits the neighbours of each qubit
// by increasing degree (then index), reversed. Unreached qubits (g is
// connected, so there are none for a valid Graph) follow in index order.
func reverseCuthillMcKee(g *circuits.Graph, start int, deg []int) []int {
	n := g.Qubits
	adj := make([][]int, n)
	for _, e := range g.Edges {
		adj[e.A] = append(adj[e.A], e.B)
		adj[e.B] = append(adj[e.B], e.A)
	}
	for q := range adj {
		slices.SortFunc(adj[q], func(a, b int) int {
			if deg[a] != deg[b] {
				return deg[a] - deg[b]
			}
			return a - b
		})
	}
	seen := make([]bool, n)
	order := []int{start}
	seen[start] = true
	for i := 0; i < len(order); i++ {
		for _, v := range adj[order[i]] {
			if !seen[v] {
				seen[v] = true
				order = append(order, v)
			}
		}
	}
	for q := range n {
		if !seen[q] {
			order = append(order, q)
		}
	}
	slices.Reverse(order)
	return order
}

// CheckOrder returns an error wrapping ErrOrder unless order lists every
// qubit of g exactly once.
func CheckOrder(g *circuits.Graph, order []int) error {
	n := g.Qubits
	if len(order) != n {
		return fmt.Errorf("moments: the qubit order lists %d qubits but %s has %d: %w", len(order), g.Name, n, ErrOrder)
	}
	seen := make([]bool, n)
	for _, q := range order {
		if q < 0 || q >= n {
			return fmt.Errorf("moments: the qubit order names qubit %d, but %s has qubits 0..%d: %w", q, g.Name, n-1, ErrOrder)
		}
		if seen[q] {
			return fmt.Errorf("moments: the qubit order lists qubit %d twice: %w", q, ErrOrder)
		}
		seen[q] = true
	}
	return nil
}

// ReadOrder reads a qubit order for g from r: the qubit ids in order,
// separated by white space or commas, with '#' starting a comment that runs
// to the end of the line. name names the source in errors. The result is
// checked by CheckOrder; every error wraps ErrOrder.
func ReadOrder(name string, r io.Reader, g *circuits.Graph) ([]int, error) {
	var order []int
	sc := bufio.NewScanner(r)
	for line := 1; sc.Scan(); line++ {
		text, _, _ := strings.Cut(sc.Text(), "#")
		for _, f := range strings.FieldsFunc(text, func(c rune) bool { return c == ',' || c == ' ' || c == '\t' || c == '\r' }) {
			q, err := strconv.Atoi(f)
			if err != nil {
				return nil, fmt.Errorf("moments: %s line %d: %q is not a qubit id: %w", name, line, f, ErrOrder)
			}
			order = append(order, q)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("moments: reading %s: %w", name, err)
	}
	if err := CheckOrder(g, order); err != nil {
		return nil, fmt.Errorf("%w (in %s)", err, name)
	}
	return order, nil
}
