package runs

import (
	"context"
	"fmt"

	"mixdepth/circuits"
	"mixdepth/fixtures"
	"mixdepth/moments"
	"mixdepth/scan"
	"mixdepth/stats"
)

// Options are the string options that select a run's circuits, as a user
// writes them. The zero value of Graph and Layout selects the demo chip.
type Options struct {
	// Graph is a family spec (line:N, ring:N, grid:RxC, complete:N,
	// star:N) or an edge-list file; "" for the demo chip, or for the graph
	// of Layout.
	Graph string
	// Layout is a layout file with explicit gate layers, or "".
	Layout string
	// Schedule is "layered" (the default when empty) or "random-edge".
	Schedule string
	// Gates is a gate-set spec of circuits.NewEnsemble ("haar" when empty).
	Gates string
	// Seed keys the per-instance random streams.
	Seed uint64
	// Drop lists out-of-service qubits and couplers (circuits.Drop), or "".
	Drop string
	// AllowDisconnected accepts a chip with isolated qubits or several
	// parts. Such a chip never reaches the Haar value of the whole chip:
	// its E[Z] tends to Spec.Limit, the product of the parts' Haar values,
	// against which the commands then measure R.
	AllowDisconnected bool
	// Unitarize replaces the matrices of a gate-set file by their nearest
	// unitaries (circuits.GateOptions).
	Unitarize bool
	// CheckGraph, when not nil, is called with the graph before the
	// schedule is built (the edge colouring of a large graph is slow), so
	// that a command can refuse a graph it cannot simulate before any
	// costly set-up. Its error becomes an *OptionError for graph.
	CheckGraph func(*circuits.Graph) error
}

// Spec is a run's circuits: what a table must record to rebuild every gate of
// every instance.
type Spec struct {
	Graph    *circuits.Graph
	Schedule circuits.Schedule
	Ensemble circuits.Ensemble
	// Layout is the name of the layout file the schedule comes from, "" when
	// none was given.
	Layout string
	// Demo is set when no graph and no layout were given: the demo chip and
	// its layout.
	Demo bool
	Seed uint64
	// Chip is the graph before Drop removed anything, and Kept maps its
	// qubits to those of Graph (−1 for a dropped qubit); Chip is Graph and
	// Kept nil when nothing was dropped.
	Chip *circuits.Graph
	Kept []int
	// Parts is the number of connected parts of Graph (an isolated qubit is
	// a part) when it has more than one, which only
	// Options.AllowDisconnected accepts; 0 for a connected graph. Meta
	// records it (key parts), so that FromMeta accepts the graph again.
	Parts int
}

// Limit is the value E[Z] tends to at large depth: the Haar value 2/(D+1)
// of the whole chip for a connected graph, the product of the parts' Haar
// values for a chip in parts (moments.PartsLimit: the parts' states are
// independent). The commands measure R = E[Z]/Limit.
func (s *Spec) Limit() float64 {
	_, final := s.Ensemble.(circuits.Finisher)
	return moments.PartsLimit(s.Graph, final)
}

// OptionError reports an option that does not select valid circuits. Option
// is the name of the field of Options ("graph", "layout", "schedule",
// "gates"), Value the offending value when the message is about the value
// itself, Err the reason.
type OptionError struct {
	Option, Value string
	Err           error
}

// Error names the option and the reason.
func (e *OptionError) Error() string {
	if e.Value != "" {
		return fmt.Sprintf("runs: %s %q: %v", e.Option, e.Value, e.Err)
	}
	return fmt.Sprintf("runs: %s: %v", e.Option, e.Err)
}

// Unwrap returns the reason, so that errors.Is sees the circuits sentinels.
func (e *OptionError) Unwrap() error { return e.Err }

// NewSpec builds the graph, schedule and ensemble that o selects: the demo
// chip with its layout when o names neither a graph nor a layout; a layout
// file's graph (or the given graph, checked against it); the layered
// schedule's classes of circuits.LayeredClasses unless a layout gives them;
// then the elements of Drop removed from the graph and the layout. Every
// failure is an *OptionError.
func NewSpec(o Options) (*Spec, error) { return NewSpecContext(context.Background(), o) }

// NewSpecContext is NewSpec that stops when ctx is done, returning an error
// wrapping ctx.Err() (not an *OptionError): the edge colouring of a large
// graph's layered classes takes minutes.
func NewSpecContext(ctx context.Context, o Options) (*Spec, error) {
	s := &Spec{Layout: o.Layout, Seed: o.Seed}
	ro := circuits.ReadOptions{AllowDisconnected: o.AllowDisconnected}
	var layout *circuits.Layout
	switch {
	case o.Graph == "" && o.Layout == "":
		s.Demo = true
		s.Graph, layout = fixtures.DemoChip()
	case o.Layout != "" && o.Graph == "":
		l, err := circuits.ReadLayoutFile(o.Layout)
		if err != nil {
			return nil, &OptionError{Option: "layout", Err: err}
		}
		layout = l
		s.Graph = l.Graph(o.Layout)
	case o.Layout != "":
		g, err := circuits.ParseGraphWith(o.Graph, ro)
		if err != nil {
			return nil, &OptionError{Option: "graph", Err: err}
		}
		// With a graph the layout may name qubits by their labels.
		if layout, err = circuits.ReadLayoutFileFor(o.Layout, g); err != nil {
			return nil, &OptionError{Option: "layout", Err: err}
		}
		s.Graph = g
	default:
		g, err := circuits.ParseGraphWith(o.Graph, ro)
		if err != nil {
			return nil, &OptionError{Option: "graph", Err: err}
		}
		s.Graph = g
	}
	s.Chip = s.Graph
	if o.Drop != "" {
		d, err := circuits.Drop(s.Graph, o.Drop, ro)
		if err != nil {
			return nil, &OptionError{Option: "drop", Err: err}
		}
		s.Graph, s.Kept = d.Graph, d.New
		if layout != nil {
			layout = layout.Drop(d)
		}
	}
	if p := len(s.Graph.Components()); p > 1 {
		s.Parts = p
	}
	if o.CheckGraph != nil {
		if err := o.CheckGraph(s.Graph); err != nil {
			return nil, &OptionError{Option: "graph", Err: err}
		}
	}
	switch o.Schedule {
	case "layered", "":
		if layout != nil {
			s.Schedule = layout.Schedule()
		} else {
			classes, err := circuits.LayeredClassesContext(ctx, s.Graph)
			if err != nil {
				return nil, fmt.Errorf("runs: colouring the couplers of %s into layers: %w", s.Graph.Name, err)
			}
			s.Schedule = &circuits.Layered{Classes: classes}
		}
	case "random-edge":
		if o.Layout != "" {
			return nil, &OptionError{Option: "layout", Err: errLayoutRandomEdge}
		}
		s.Schedule = &circuits.RandomEdge{Edges: s.Graph.Edges}
	default:
		return nil, &OptionError{Option: "schedule", Value: o.Schedule, Err: errSchedule}
	}
	gates := o.Gates
	if gates == "" {
		gates = "haar"
	}
	e, err := circuits.NewEnsembleWith(gates, circuits.GateOptions{Unitarize: o.Unitarize})
	if err != nil {
		return nil, &OptionError{Option: "gates", Err: err}
	}
	if e, err = bindCouplers(e, s.Graph); err != nil {
		return nil, &OptionError{Option: "gates", Err: err}
	}
	s.Ensemble = e
	return s, nil
}

var (
	errLayoutRandomEdge = fmt.Errorf("sets explicit layers, which the random-edge schedule does not use: drop one of them")
	errSchedule         = fmt.Errorf("use layered or random-edge")
)

// bindCouplers binds a gate set with calibrated couplers to the graph
// (circuits.GateSet.Bind); other ensembles are returned as they are.
func bindCouplers(e circuits.Ensemble, g *circuits.Graph) (circuits.Ensemble, error) {
	if gs, ok := e.(*circuits.GateSet); ok && len(gs.Couplers) > 0 {
		return gs.Bind(g)
	}
	return e, nil
}

// Estimate summarises the scan records of the run per depth against
// Limit (scan.EstimateLimit): R = mean(Z)/(2/(D+1)) on a connected chip,
// mean(Z) over the product of the parts' Haar values on a chip in parts.
func (s *Spec) Estimate(records []scan.Record, c stats.Criteria) *scan.Curve {
	return scan.EstimateLimit(s.Graph.Qubits, s.Limit(), records, c)
}
