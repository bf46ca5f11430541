package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"mixdepth/chip"
	"mixdepth/circuits"
	"mixdepth/moments"
	"mixdepth/plots"
	"mixdepth/runs"
)

func init() {
	register(command{name: "graph", summary: "show a chip: qubits, couplers, degrees, parts, layers, spectral figures; draw it", run: runGraph})
}

// graphListMax is the number of qubits or couplers the text output lists
// before it says how many more --json holds.
const graphListMax = 64

func runGraph(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("graph [SPEC|FILE]", "SPEC is a graph family, FILE an edge-list file; with neither, the demo chip.\n"+
		"Families: "+strings.Join(circuits.Families, ", ")+".\n\n"+
		"Prints what the other commands will use: the qubits and couplers (with their labels), the\n"+
		"degree histogram, the connected parts, the diameter, whether the chip is bipartite, the layers\n"+
		"of the layered schedule and where they come from, the algebraic connectivity of the graph\n"+
		"Laplacian and, up to 20 qubits, the spectral gap of the random-edge schedule with Haar gates\n"+
		"(about a minute of computing at 20 qubits).\n"+
		"--plot draws the chip with its couplers coloured by layer and dropped elements faded.",
		"mixdepth graph chip.edges --drop Q7,Q3-Q4 --plot chip.png", stdout)
	layout := fs.String("layout", "", "layout file (JSON) with explicit gate layers")
	drop := fs.String("drop", "", "out-of-service qubits and couplers to remove, as Q,Q,A-B,… in the graph's labels")
	allow := fs.Bool("allow-disconnected", false, "accept a chip with isolated qubits or several parts, as the run commands do with this flag")
	asJSON := fs.Bool("json", false, "print one JSON document instead of text")
	plot := fs.String("plot", "", "draw the chip to FILE.png or FILE.svg")
	workers := fs.Int("workers", defaultWorkers(), "goroutines for the spectral gap")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 1 {
		return badInput("graph takes one graph spec or file (got %d arguments): mixdepth graph SPEC|FILE", fs.NArg())
	}
	if *plot != "" {
		if err := plots.CheckPath(*plot); err != nil {
			return badInput("--plot %s: %v", *plot, err)
		}
	}
	var spec string
	if fs.NArg() == 1 {
		spec = fs.Arg(0)
	}
	cf := circuitFlags{graph: spec, layout: *layout, drop: *drop}
	s, err := cf.resolveWith(ctx, func(o *runs.Options) { o.AllowDisconnected = *allow })
	var ue usageError
	if errors.As(err, &ue) && spec != "" {
		// The graph is an argument here, not --graph.
		return usageError{errors.New(strings.Replace(ue.Error(), "--graph: ", "", 1))}
	}
	if err != nil {
		return err
	}
	sp := s.spec
	layers := s.schedule.(*circuits.Layered).Classes
	source := circuits.ClassSource(sp.Graph)
	switch {
	case sp.Layout != "":
		source = "the layout file " + sp.Layout
	case sp.Demo:
		source = "the demo chip's layout"
	}
	r, err := chip.Describe(ctx, sp.Graph, layers, source, *workers)
	if err != nil {
		return err
	}
	if *plot != "" {
		if err := plots.SaveChipPlot(*plot, chipDrawing(sp, layers)); err != nil {
			return err
		}
	}
	if *asJSON {
		return writeJSON(stdout, graphDoc(sp, r))
	}
	printGraph(stdout, sp, r)
	if *plot != "" {
		fmt.Fprintf(stdout, "Plot: %s\n", *plot)
	}
	return nil
}

// chipDrawing places the whole chip, dropped elements included, and colours
// each working coupler by its layer.
func chipDrawing(sp *runs.Spec, layers [][]circuits.Edge) *plots.ChipDrawing {
	full := sp.Chip
	xy := chip.Coordinates(full)
	layerOf := map[[2]int]int{}
	for l, cl := range layers {
		for _, e := range cl {
			layerOf[[2]int{min(e.A, e.B), max(e.A, e.B)}] = l
		}
	}
	newID := func(q int) int { return keptID(sp, q) }
	d := &plots.ChipDrawing{Title: graphTitle(sp.Graph), Layers: len(layers)}
	for _, cl := range layers {
		d.LayerSizes = append(d.LayerSizes, len(cl))
	}
	for q := 0; q < full.Qubits; q++ {
		d.Qubits = append(d.Qubits, plots.ChipQubit{X: xy[q][0], Y: xy[q][1], Label: full.Label(q), Faded: newID(q) < 0})
	}
	for _, e := range full.Edges {
		a, b := newID(e.A), newID(e.B)
		layer := -1
		if l, ok := layerOf[[2]int{min(a, b), max(a, b)}]; ok && a >= 0 && b >= 0 {
			layer = l
		}
		d.Couplers = append(d.Couplers, plots.ChipCoupler{A: e.A, B: e.B, Layer: layer})
	}
	return d
}

// keptID is the number in sp.Graph of qubit q of the whole chip, −1 when it
// was dropped.
func keptID(sp *runs.Spec, q int) int {
	if sp.Kept == nil {
		return q
	}
	return sp.Kept[q]
}

func graphTitle(g *circuits.Graph) string {
	t := g.Name
	if len(g.Dropped) > 0 {
		t += " without " + strings.Join(g.Dropped, ",")
	}
	return fmt.Sprintf("%s: %d qubits, %d couplers", t, g.Qubits, len(g.Edges))
}

// listItems joins up to graphListMax items and says how many more there are.
func listItems(items []string) string {
	if len(items) <= graphListMax {
		return strings.Join(items, " ")
	}
	return strings.Join(items[:graphListMax], " ") + fmt.Sprintf(" … (%d more; --json lists all)", len(items)-graphListMax)
}

func edgeLabels(g *circuits.Graph, edges []circuits.Edge) []string {
	out := make([]string, len(edges))
	for i, e := range edges {
		out[i] = g.EdgeLabel(e)
	}
	return out
}

func printGraph(w io.Writer, sp *runs.Spec, r *chip.Report) {
	g := sp.Graph
	fmt.Fprintln(w, graphTitle(g))
	qs := make([]string, g.Qubits)
	plain := true
	for q := range qs {
		qs[q] = strconv.Itoa(q) + "=" + g.Label(q)
		plain = plain && g.Label(q) == strconv.Itoa(q)
	}
	switch {
	case plain:
		fmt.Fprintf(w, "qubits: 0..%d\n", g.Qubits-1)
	case len(g.Dropped) > 0:
		fmt.Fprintf(w, "qubits (number=label; numbers are dense after the drop, labels those of the chip): %s\n", listItems(qs))
	default:
		fmt.Fprintf(w, "qubits (number=label, numbered in order of first appearance in the file): %s\n", listItems(qs))
	}
	fmt.Fprintf(w, "couplers: %s\n", listItems(edgeLabels(g, g.Edges)))
	if len(g.Dropped) > 0 {
		note := "dropped"
		if sp.Chip.Qubits != g.Qubits {
			note += "; the other qubits renumbered"
		}
		fmt.Fprintf(w, "out of service (%s): %s\n", note, strings.Join(g.Dropped, " "))
	}
	var hist []string
	for d, k := range r.Degrees {
		if k > 0 {
			hist = append(hist, fmt.Sprintf("%d×degree %d", k, d))
		}
	}
	fmt.Fprintf(w, "degrees: %s\n", strings.Join(hist, ", "))
	if len(r.Components) == 1 {
		fmt.Fprintln(w, "connected: yes")
	} else {
		sizes := make([]string, len(r.Components))
		for i, c := range r.Components {
			sizes[i] = strconv.Itoa(len(c))
		}
		fmt.Fprintf(w, "connected: no, %d parts of %s qubits\n", len(r.Components), strings.Join(sizes, ", "))
	}
	if r.Diameter >= 0 {
		fmt.Fprintf(w, "diameter: %d couplers", r.Diameter)
		if len(r.Components) > 1 {
			fmt.Fprint(w, " (largest within a part)")
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "bipartite: %s\n", yesNo(r.Bipartite))
	sizes := make([]string, len(r.Layers))
	for i, l := range r.Layers {
		sizes[i] = strconv.Itoa(len(l))
	}
	fmt.Fprintf(w, "layered schedule: %d layers per cycle, from %s; couplers per layer %s\n", len(r.Layers), r.LayerSource, strings.Join(sizes, ", "))
	for i, l := range r.Layers {
		fmt.Fprintf(w, "  layer %d: %s\n", i, listItems(edgeLabels(g, l)))
	}
	if !math.IsNaN(r.AlgebraicConnectivity) {
		fmt.Fprintf(w, "Laplacian algebraic connectivity λ₂(L): %.6g\n", r.AlgebraicConnectivity)
	}
	switch {
	case r.Gap != nil:
		fmt.Fprintf(w, "random-edge schedule, Haar gates: second eigenvalue λ₂(M) = %.9f of the moment operator M, Hamiltonian gap Δ = |E|(1 − λ₂(M)) = %.6g\n", r.Gap.SecondEigenvalue, r.Gap.HamiltonianGap)
	case len(r.Components) == 1:
		fmt.Fprintf(w, "random-edge gap: not computed above %d qubits\n", moments.GapMaxQubits)
	default:
		fmt.Fprintln(w, "random-edge gap: 0 (identity on one part and swap on another stay fixed, so the second eigenvalue is 1)")
	}
	if len(r.Components) > 1 {
		fmt.Fprintf(w, "a chip in parts never reaches the Haar value 2/(D+1) = %.6g: E[Z] tends to the product of the parts' Haar values, %.6g (an isolated qubit counts 1)\n",
			r.HaarCollision, r.HaarLimit)
	}
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

// graphJSON is the document of graph --json.
type graphJSON struct {
	runs.Producer
	Graph       string     `json:"graph"`
	GraphDigest string     `json:"graph_digest"`
	Qubits      int        `json:"qubits"`
	Labels      []string   `json:"labels"`
	Couplers    [][2]int   `json:"coupler_list"`
	Dropped     []string   `json:"dropped"`
	Degrees     []int      `json:"degree_histogram"`
	Components  [][]int    `json:"components"`
	Diameter    *int       `json:"diameter"`
	Bipartite   bool       `json:"bipartite"`
	LayerSource string     `json:"layer_source"`
	Layers      [][][2]int `json:"layers"`
	// AlgebraicConnectivity is null above chip.MaxSpectrumQubits qubits.
	AlgebraicConnectivity *float64 `json:"algebraic_connectivity"`
	// RandomEdgeSecondEigenvalue and RandomEdgeHamiltonianGap (Δ = |E|(1 − λ₂),
	// the key exact --json calls hamiltonian_gap) are null for a chip in
	// parts or above moments.GapMaxQubits qubits.
	RandomEdgeSecondEigenvalue *float64 `json:"random_edge_second_eigenvalue"`
	RandomEdgeHamiltonianGap   *float64 `json:"random_edge_hamiltonian_gap"`
	HaarCollision              float64  `json:"haar_collision"`
	// CollisionLimit is the large-depth E[Z]: the Haar value for a connected
	// chip, the product of the parts' values otherwise.
	CollisionLimit float64 `json:"collision_limit"`
	// Coordinates are the drawing coordinates of --plot, one (x, y) per qubit.
	Coordinates [][2]float64 `json:"coordinates"`
}

func pairs(edges []circuits.Edge) [][2]int {
	out := make([][2]int, len(edges))
	for i, e := range edges {
		out[i] = [2]int{e.A, e.B}
	}
	return out
}

func graphDoc(sp *runs.Spec, r *chip.Report) graphJSON {
	g := sp.Graph
	doc := graphJSON{
		Producer: runs.Producer{Tool: runs.Tool, Version: runs.Version},
		Graph:    g.Name, GraphDigest: g.Digest(), Qubits: g.Qubits, Labels: make([]string, g.Qubits),
		Couplers: pairs(g.Edges), Dropped: g.Dropped, Degrees: r.Degrees, Components: r.Components,
		Bipartite: r.Bipartite, LayerSource: r.LayerSource, HaarCollision: r.HaarCollision,
		CollisionLimit: r.HaarLimit, Coordinates: make([][2]float64, g.Qubits),
	}
	full := chip.Coordinates(sp.Chip)
	for q, xy := range full {
		if n := keptID(sp, q); n >= 0 {
			doc.Coordinates[n] = xy
		}
	}
	if doc.Dropped == nil {
		doc.Dropped = []string{}
	}
	for q := range doc.Labels {
		doc.Labels[q] = g.Label(q)
	}
	if r.Diameter >= 0 {
		doc.Diameter = &r.Diameter
	}
	for _, l := range r.Layers {
		doc.Layers = append(doc.Layers, pairs(l))
	}
	if !math.IsNaN(r.AlgebraicConnectivity) {
		doc.AlgebraicConnectivity = &r.AlgebraicConnectivity
	}
	if r.Gap != nil {
		doc.RandomEdgeSecondEigenvalue, doc.RandomEdgeHamiltonianGap = &r.Gap.SecondEigenvalue, &r.Gap.HamiltonianGap
	}
	return doc
}
