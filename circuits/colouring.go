package circuits

import "context"

// EdgeColouring returns a proper edge colouring of g with at most Δ+1 colours,
// as classes of edges in colour order, each class listing its edges in the
// order of g.Edges. It follows the constructive proof of Vizing's theorem by
// Misra and Gries ("A constructive proof of Vizing's theorem", Information
// Processing Letters 41, 131, 1992): colour the edges one at a time, each
// time building a maximal fan, inverting a two-coloured path and rotating the
// fan. Every choice takes the smallest candidate, so the result depends only
// on g.
func EdgeColouring(g *Graph) [][]Edge {
	classes, _ := EdgeColouringContext(context.Background(), g)
	return classes
}

// ctxStride is the number of edges (or class moves) between two checks of
// the context in the colouring loops: often enough to stop within a
// fraction of a second, rarely enough to cost nothing.
const ctxStride = 256

// EdgeColouringContext is EdgeColouring that stops when ctx is done,
// returning nil and ctx.Err(): the colouring of a graph with millions of
// edges takes minutes.
func EdgeColouringContext(ctx context.Context, g *Graph) ([][]Edge, error) {
	n := g.Qubits
	ncol := g.MaxDegree() + 1
	// at[u*ncol+c] is the neighbour joined to u by an edge of colour c, or -1.
	at := make([]int, n*ncol)
	for i := range at {
		at[i] = -1
	}
	colour := make(map[[2]int]int, len(g.Edges)) // absent: uncoloured
	get := func(u, v int) (int, bool) {
		c, ok := colour[key(Edge{u, v})]
		return c, ok
	}
	set := func(u, v, c int) {
		colour[key(Edge{u, v})] = c
		at[u*ncol+c] = v
		at[v*ncol+c] = u
	}
	clear := func(u, v int) {
		if c, ok := get(u, v); ok {
			delete(colour, key(Edge{u, v}))
			at[u*ncol+c] = -1
			at[v*ncol+c] = -1
		}
	}
	free := func(u, c int) bool { return at[u*ncol+c] < 0 }
	firstFree := func(u int) int {
		for c := 0; c < ncol; c++ {
			if free(u, c) {
				return c
			}
		}
		panic("circuits: no free colour; the colouring invariant is broken")
	}

	for k, e := range g.Edges {
		if k%ctxStride == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		u := e.A
		// A maximal fan of u starting at the uncoloured edge (u, e.B).
		fan := []int{e.B}
		inFan := map[int]bool{e.B: true}
		for {
			last := fan[len(fan)-1]
			next := -1
			for c := 0; c < ncol; c++ {
				if free(last, c) {
					if x := at[u*ncol+c]; x >= 0 && !inFan[x] {
						next = x
						break
					}
				}
			}
			if next < 0 {
				break
			}
			fan = append(fan, next)
			inFan[next] = true
		}
		c := firstFree(u)
		d := firstFree(fan[len(fan)-1])
		// Invert the cd-path from u: it starts with the d-edge at u (c is free on u).
		if !free(u, d) {
			var path [][2]int
			x, want := u, d
			for {
				y := at[x*ncol+want]
				if y < 0 {
					break
				}
				path = append(path, [2]int{x, y})
				x = y
				if want == d {
					want = c
				} else {
					want = d
				}
			}
			cols := make([]int, len(path))
			for i, p := range path {
				cols[i], _ = get(p[0], p[1])
				clear(p[0], p[1])
			}
			for i, p := range path {
				if cols[i] == c {
					set(p[0], p[1], d)
				} else {
					set(p[0], p[1], c)
				}
			}
		}
		// The first w in the fan such that fan[:w+1] is still a fan and d is free on w.
		w := -1
		for i := range fan {
			if i > 0 {
				ci, ok := get(u, fan[i])
				if !ok || !free(fan[i-1], ci) {
					break
				}
			}
			if free(fan[i], d) {
				w = i
				break
			}
		}
		if w < 0 {
			panic("circuits: Misra–Gries found no fan vertex; the colouring invariant is broken")
		}
		// Rotate the fan prefix and colour (u, fan[w]) with d.
		for i := 0; i < w; i++ {
			ci, _ := get(u, fan[i+1])
			clear(u, fan[i+1])
			set(u, fan[i], ci)
		}
		set(u, fan[w], d)
	}

	classes := make([][]Edge, ncol)
	for _, e := range g.Edges {
		c, _ := get(e.A, e.B)
		classes[c] = append(classes[c], e)
	}
	out := classes[:0]
	for _, cl := range classes {
		if len(cl) > 0 {
			out = append(out, cl)
		}
	}
	return out, nil
}
