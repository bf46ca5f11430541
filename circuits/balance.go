package circuits

import "context"

// BalanceClasses evens out the sizes of the classes of a proper edge
// colouring, in place, so that any two classes differ by at most one edge,
// and returns classes. Each class must be a set of disjoint edges, and stays
// one: the edges of two classes form alternating paths and even cycles, and
// swapping the two classes along a path that holds one more edge of the
// larger class moves one edge from it to the smaller one (a Kempe-chain
// exchange). Such a path exists whenever the sizes differ, which is why an
// equitable colouring with the same number of colours always exists
// (McDiarmid, "The solution of a timetabling problem", J. Inst. Maths
// Applics 9, 23, 1972). The classes keep their order, and each lists its
// edges in the order of g.Edges, the edges the classes cover. Choices are
// deterministic.
func BalanceClasses(g *Graph, classes [][]Edge) [][]Edge {
	out, _ := BalanceClassesContext(context.Background(), g, classes)
	return out
}

// BalanceClassesContext is BalanceClasses that stops when ctx is done,
// returning nil and ctx.Err() (classes is then partly balanced, still a
// proper colouring).
func BalanceClassesContext(ctx context.Context, g *Graph, classes [][]Edge) ([][]Edge, error) {
	if len(classes) < 2 {
		return classes, nil
	}
	order := make(map[[2]int]int, len(g.Edges))
	for i, e := range g.Edges {
		order[key(e)] = i
	}
	for k := 0; ; k++ {
		if k%ctxStride == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		big, small := 0, 0
		for i, cl := range classes {
			if len(cl) > len(classes[big]) {
				big = i
			}
			if len(cl) < len(classes[small]) {
				small = i
			}
		}
		if len(classes[big])-len(classes[small]) <= 1 {
			return classes, nil
		}
		classes[big], classes[small] = kempeMove(classes[big], classes[small], order)
	}
}

// kempeMove swaps big and small along the first alternating path (in the
// order of big's edges) that has one more edge of big than of small.
func kempeMove(big, small []Edge, order map[[2]int]int) ([]Edge, []Edge) {
	// at[q] holds the edges of each class at qubit q (at most one each).
	type slot struct{ big, small int }
	at := map[int]*slot{}
	get := func(q int) *slot {
		s, ok := at[q]
		if !ok {
			s = &slot{-1, -1}
			at[q] = s
		}
		return s
	}
	for i, e := range big {
		get(e.A).big, get(e.B).big = i, i
	}
	for i, e := range small {
		get(e.A).small, get(e.B).small = i, i
	}
	for start, e := range big {
		// A path component has an end at a qubit without a small edge; walk
		// from big edge start in both directions and collect the component.
		inBig := map[int]bool{start: true}
		inSmall := map[int]bool{}
		isPath := true
		for _, q0 := range []int{e.A, e.B} {
			q, fromBig := q0, true
			for {
				s := at[q]
				var next int
				var other Edge
				if fromBig {
					next = s.small
					if next < 0 {
						break
					}
					if inSmall[next] {
						isPath = false
						break
					}
					inSmall[next] = true
					other = small[next]
				} else {
					next = s.big
					if next < 0 {
						break
					}
					if inBig[next] {
						isPath = false
						break
					}
					inBig[next] = true
					other = big[next]
				}
				if other.A == q {
					q = other.B
				} else {
					q = other.A
				}
				fromBig = !fromBig
			}
			if !isPath {
				break
			}
		}
		if !isPath || len(inBig) != len(inSmall)+1 {
			continue
		}
		var nb, ns []Edge
		for i, e := range big {
			if inBig[i] {
				ns = append(ns, e)
			} else {
				nb = append(nb, e)
			}
		}
		for i, e := range small {
			if inSmall[i] {
				nb = append(nb, e)
			} else {
				ns = append(ns, e)
			}
		}
		sortByOrder(nb, order)
		sortByOrder(ns, order)
		return nb, ns
	}
	panic("circuits: no Kempe path between classes of different sizes; the classes are not matchings")
}

// sortByOrder sorts edges by their position in order (insertion sort: the
// two merged runs are each already in order).
func sortByOrder(edges []Edge, order map[[2]int]int) {
	for i := 1; i < len(edges); i++ {
		for j := i; j > 0 && order[key(edges[j])] < order[key(edges[j-1])]; j-- {
			edges[j], edges[j-1] = edges[j-1], edges[j]
		}
	}
}
