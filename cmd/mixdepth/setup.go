package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"golang.org/x/term"

	"mixdepth/circuits"
	"mixdepth/runs"
	"mixdepth/sim"
)

// defaultSeed is the seed used when --seed is not given; it is always printed.
const defaultSeed = 20261201

// circuitFlags are the flags of every command that builds circuits.
type circuitFlags struct {
	graph, layout, schedule, gates, drop string
	seed                                 uint64
	unitarize                            bool
	// allowDisconnected accepts a chip with isolated qubits or several
	// parts (--allow-disconnected); R is then measured against the
	// product of the parts' Haar values (runs.Spec.Limit).
	allowDisconnected bool
	// checkGraph, when not nil, lets resolve refuse a graph before any
	// costly set-up (the edge colouring of a large graph).
	checkGraph func(*circuits.Graph) error
}

func (c *circuitFlags) add(fs *pflag.FlagSet) {
	fs.StringVar(&c.graph, "graph", "", "coupling graph: a family ("+strings.Join(circuits.Families, ", ")+") or an edge-list file (default: the demo chip); mixdepth graph shows it")
	fs.StringVar(&c.drop, "drop", "", "out-of-service qubits and couplers to remove, as Q,Q,A-B,… in the graph's labels")
	fs.StringVar(&c.layout, "layout", "", "layout file (JSON) with explicit gate layers; overrides the layered schedule's classes")
	fs.StringVar(&c.schedule, "schedule", "layered", "gate schedule: layered or random-edge")
	fs.StringVar(&c.gates, "gates", "haar", "two-qubit gate set: haar, clifford, cz+haar1, cnot+haar1, iswap+haar1, sqrt-iswap+haar1, or a gate-set JSON file")
	fs.Uint64Var(&c.seed, "seed", defaultSeed, "seed of the per-instance random streams")
	fs.BoolVar(&c.allowDisconnected, "allow-disconnected", false, "accept a chip with isolated qubits or several parts; it never reaches the Haar value 2/(D+1): E[Z] tends to the product of the parts' Haar values, against which R is then measured")
	fs.BoolVar(&c.unitarize, "unitarize", false, "replace each matrix of a gate-set file by its nearest unitary (measured matrices are unitary only to the digits written)")
}

// setup is what the circuit flags resolve to: a view of a runs.Spec with
// the names the command files use.
type setup struct {
	spec     *runs.Spec
	graph    *circuits.Graph
	schedule circuits.Schedule
	ensemble circuits.Ensemble
	// layout is the layout file name, "" when none was given.
	layout string
	demo   bool
}

// newSetup returns the view of sp.
func newSetup(sp *runs.Spec) *setup {
	return &setup{spec: sp, graph: sp.Graph, schedule: sp.Schedule, ensemble: sp.Ensemble, layout: sp.Layout, demo: sp.Demo}
}

// resolve builds the graph, schedule and ensemble; every failure is bad
// input, except an interruption (ctx done during the colouring of a large
// graph), which wraps ctx.Err().
func (c *circuitFlags) resolve(ctx context.Context) (*setup, error) {
	return c.resolveWith(ctx, func(*runs.Options) {})
}

// resolveWith is resolve with a change to the options before the spec is
// built.
func (c *circuitFlags) resolveWith(ctx context.Context, change func(*runs.Options)) (*setup, error) {
	o := runs.Options{Graph: c.graph, Layout: c.layout, Schedule: c.schedule, Gates: c.gates, Seed: c.seed, Drop: c.drop, Unitarize: c.unitarize,
		AllowDisconnected: c.allowDisconnected}
	o.CheckGraph = c.checkGraph
	change(&o)
	sp, err := runs.NewSpecContext(ctx, o)
	var oe *runs.OptionError
	if errors.As(err, &oe) {
		if oe.Value != "" {
			return nil, badInput("--%s %q: %v", oe.Option, echo(oe.Value), oe.Err)
		}
		return nil, usageError{fmt.Errorf("--%s: %w", oe.Option, oe.Err)}
	}
	if err != nil {
		return nil, err
	}
	return newSetup(sp), nil
}

// checkStateVector refuses a graph whose smallest state vector (single
// precision, 8 bytes per amplitude) cannot fit in memory.
func checkStateVector(g *circuits.Graph) error {
	return sim.CheckVector(g.Qubits, 8, fmt.Sprintf("a %d-qubit state vector (single precision, the smallest)", g.Qubits))
}

// describe is the one-line description of the circuits for human output.
func (s *setup) describe() string {
	var sched string
	switch sc := s.schedule.(type) {
	case *circuits.Layered:
		sizes := make([]string, len(sc.Classes))
		for i, cl := range sc.Classes {
			sizes[i] = strconv.Itoa(len(cl))
		}
		sched = fmt.Sprintf("layered schedule, %d layers per cycle (%s couplers)", len(sc.Classes), strings.Join(sizes, "+"))
		if s.layout != "" {
			sched += " from " + s.layout
		}
	default:
		sched = "random-edge schedule (one gate per step)"
	}
	name := s.graph.Name
	if d := s.graph.Dropped; len(d) > 0 {
		name += " without " + strings.Join(d, ",")
	}
	gates := s.ensemble.Name() + " gates"
	if gs, ok := s.ensemble.(*circuits.GateSet); ok {
		if len(gs.Couplers) > 0 {
			gates += fmt.Sprintf(" (%d couplers calibrated)", len(gs.EdgeEntanglers())/2)
		}
		if gs.Unitarized > 0 {
			gates += fmt.Sprintf(" (made unitary: largest entry change %.2g)", gs.Unitarized)
		}
	}
	return fmt.Sprintf("%s: %d qubits, %d couplers; %s; %s", name, s.graph.Qubits, len(s.graph.Edges), sched, gates)
}

// partsNote says, for a chip in parts, that it never reaches the Haar value
// and what R is measured against instead; "" for a connected chip.
func (s *setup) partsNote() string {
	if s.spec.Parts < 2 {
		return ""
	}
	return fmt.Sprintf("The chip is in %d parts and never reaches the Haar value 2/(D+1): E[Z] tends to the product of the parts' Haar values, %.6g;\nR below is measured against that limit, not 2/(D+1).",
		s.spec.Parts, s.spec.Limit())
}

// The bounds of --depths and --instances.
const (
	maxDepth      = runs.MaxDepth
	maxDepthCount = runs.MaxDepthCount
	maxInstances  = runs.MaxInstances
)

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

// parseDepths reads a depth list such as "1:20", "2,4,8" or "1:40:2,50"
// (runs.ParseDepths); an error is bad input naming --depths.
func parseDepths(spec string) ([]int, error) {
	d, err := runs.ParseDepths(spec)
	if err != nil {
		return nil, listInput("--depths", err)
	}
	return d, nil
}

// listInput turns a runs.ListError into bad input naming flag.
func listInput(flag string, err error) error {
	var le *runs.ListError
	if errors.As(err, &le) {
		return badInput("%s %q: %s", flag, echo(le.List), le.Detail)
	}
	return usageError{err}
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
