package main

import (
	"fmt"
	"os"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"golang.org/x/term"

	"mixdepth/circuits"
	"mixdepth/fixtures"
)

// defaultSeed is the seed used when --seed is not given; it is always printed.
const defaultSeed = 20261201

// circuitFlags are the flags of every command that builds circuits.
type circuitFlags struct {
	graph, layout, schedule, gates string
	seed                           uint64
}

func (c *circuitFlags) add(fs *pflag.FlagSet) {
	fs.StringVar(&c.graph, "graph", "", "coupling graph: line:N, ring:N, grid:RxC, complete:N, star:N, or an edge-list file (default: the demo chip)")
	fs.StringVar(&c.layout, "layout", "", "layout file (JSON) with explicit gate layers; overrides the layered schedule's classes")
	fs.StringVar(&c.schedule, "schedule", "layered", "gate schedule: layered or random-edge")
	fs.StringVar(&c.gates, "gates", "haar", "two-qubit gate set: haar, clifford, cz+haar1, cnot+haar1, iswap+haar1, sqrt-iswap+haar1, or a gate-set JSON file")
	fs.Uint64Var(&c.seed, "seed", defaultSeed, "seed of the per-instance random streams")
}

// setup is what the circuit flags resolve to.
type setup struct {
	graph    *circuits.Graph
	schedule circuits.Schedule
	ensemble circuits.Ensemble
	// layout is the layout file name, "" when none was given.
	layout string
	demo   bool
}

// resolve builds the graph, schedule and ensemble; every failure is bad input.
func (c *circuitFlags) resolve() (*setup, error) {
	s := &setup{layout: c.layout}
	var layout *circuits.Layout
	switch {
	case c.graph == "" && c.layout == "":
		s.demo = true
		s.graph, layout = fixtures.DemoChip()
	case c.layout != "":
		l, err := circuits.ReadLayoutFile(c.layout)
		if err != nil {
			return nil, usageError{fmt.Errorf("--layout: %w", err)}
		}
		layout = l
		if c.graph == "" {
			s.graph = l.Graph(c.layout)
		} else {
			g, err := circuits.ParseGraph(c.graph)
			if err != nil {
				return nil, usageError{fmt.Errorf("--graph: %w", err)}
			}
			if err := l.Check(c.layout, g); err != nil {
				return nil, usageError{fmt.Errorf("--layout: %w", err)}
			}
			s.graph = g
		}
	default:
		g, err := circuits.ParseGraph(c.graph)
		if err != nil {
			return nil, usageError{fmt.Errorf("--graph: %w", err)}
		}
		s.graph = g
	}
	switch c.schedule {
	case "layered":
		if layout != nil {
			s.schedule = layout.Schedule()
		} else {
			s.schedule = &circuits.Layered{Classes: circuits.LayeredClasses(s.graph)}
		}
	case "random-edge":
		if c.layout != "" {
			return nil, badInput("--layout sets explicit layers, which the random-edge schedule does not use: drop one of them")
		}
		s.schedule = &circuits.RandomEdge{Edges: s.graph.Edges}
	default:
		return nil, badInput("--schedule %q: use layered or random-edge", c.schedule)
	}
	e, err := circuits.NewEnsemble(c.gates)
	if err != nil {
		return nil, usageError{fmt.Errorf("--gates: %w", err)}
	}
	s.ensemble = e
	return s, nil
}

// describe is the one-line description of the circuits for human output.
func (s *setup) describe() string {
	var sched string
	switch sc := s.schedule.(type) {
	case *circuits.Layered:
		sched = fmt.Sprintf("layered schedule, %d layers per cycle", len(sc.Classes))
		if s.layout != "" {
			sched += " from " + s.layout
		}
	default:
		sched = "random-edge schedule (one gate per step)"
	}
	return fmt.Sprintf("%s: %d qubits, %d couplers; %s; %s gates", s.graph.Name, s.graph.Qubits, len(s.graph.Edges), sched, s.ensemble.Name())
}

// maxDepth and maxDepthCount bound --depths: deeper circuits than a
// million steps, or more than ten thousand read-out depths, are typos.
const (
	maxDepth      = 1_000_000
	maxDepthCount = 10_000
)

// maxInstances bounds --instances (ids and per-instance records are held in
// memory).
const maxInstances = 10_000_000

// maxCircuitGates bounds the two-qubit gates of one stored circuit (sample,
// score, pt-plot keep whole circuits: 256 bytes per gate).
const maxCircuitGates = 1_000_000

// checkCircuitDepth refuses a depth whose circuits are too long to store.
func checkCircuitDepth(s *setup, depth int) error {
	if depth > maxDepth {
		return badInput("--depth %d: beyond the largest depth, %d", depth, maxDepth)
	}
	if g := s.schedule.GateCount(depth); g > maxCircuitGates {
		return badInput("--depth %d: %d two-qubit gates per circuit, more than the %d this command keeps in memory; use a smaller depth", depth, g, maxCircuitGates)
	}
	return nil
}

// parseDepths reads a depth list such as "1:20", "2,4,8" or "1:40:2,50".
func parseDepths(spec string) ([]int, error) {
	var out []int
	for _, item := range strings.Split(spec, ",") {
		item = strings.TrimSpace(item)
		parts := strings.Split(item, ":")
		if len(parts) > 3 || item == "" {
			return nil, badInput("--depths %q: write depths as a list like 2,4,8 or ranges FROM:TO or FROM:TO:STEP", spec)
		}
		nums := make([]int, len(parts))
		for i, p := range parts {
			v, err := strconv.Atoi(p)
			if err != nil {
				return nil, badInput("--depths %q: %q is not a whole number", spec, p)
			}
			nums[i] = v
		}
		from, to, step := nums[0], nums[0], 1
		if len(nums) >= 2 {
			to = nums[1]
		}
		if len(nums) == 3 {
			step = nums[2]
		}
		if step <= 0 || to < from {
			return nil, badInput("--depths %q: a range FROM:TO:STEP needs FROM ≤ TO and STEP ≥ 1", spec)
		}
		if to > maxDepth {
			return nil, badInput("--depths %q: depth %d is beyond the largest depth, %d; ask for fewer layers", spec, to, maxDepth)
		}
		if len(out)+(to-from)/step >= maxDepthCount {
			return nil, badInput("--depths %q: more than %d depths; use a step (FROM:TO:STEP)", spec, maxDepthCount)
		}
		for d := from; d <= to; d += step {
			if d <= 0 {
				return nil, badInput("--depths %q: depth %d is not positive; depths start at 1", spec, d)
			}
			out = append(out, d)
		}
	}
	slices.Sort(out)
	return slices.Compact(out), nil
}

// checkUnit checks that v lies in the open interval (0, 1).
func checkUnit(name string, v float64) error {
	if !(v > 0 && v < 1) {
		return badInput("--%s %v: must lie strictly between 0 and 1", name, v)
	}
	return nil
}

// defaultWorkers is the number of cores.
func defaultWorkers() int { return runtime.NumCPU() }

// isTerminal reports whether w is a terminal (for progress bars).
func isTerminal(w any) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}
