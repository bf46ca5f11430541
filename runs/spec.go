package runs

import (
	"fmt"

	"mixdepth/circuits"
	"mixdepth/fixtures"
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
// schedule's classes of circuits.LayeredClasses unless a layout gives them.
// Every failure is an *OptionError.
func NewSpec(o Options) (*Spec, error) {
	s := &Spec{Layout: o.Layout, Seed: o.Seed}
	var layout *circuits.Layout
	switch {
	case o.Graph == "" && o.Layout == "":
		s.Demo = true
		s.Graph, layout = fixtures.DemoChip()
	case o.Layout != "":
		l, err := circuits.ReadLayoutFile(o.Layout)
		if err != nil {
			return nil, &OptionError{Option: "layout", Err: err}
		}
		layout = l
		if o.Graph == "" {
			s.Graph = l.Graph(o.Layout)
		} else {
			g, err := circuits.ParseGraph(o.Graph)
			if err != nil {
				return nil, &OptionError{Option: "graph", Err: err}
			}
			if err := l.Check(o.Layout, g); err != nil {
				return nil, &OptionError{Option: "layout", Err: err}
			}
			s.Graph = g
		}
	default:
		g, err := circuits.ParseGraph(o.Graph)
		if err != nil {
			return nil, &OptionError{Option: "graph", Err: err}
		}
		s.Graph = g
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
			s.Schedule = &circuits.Layered{Classes: circuits.LayeredClasses(s.Graph)}
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
	e, err := circuits.NewEnsemble(gates)
	if err != nil {
		return nil, &OptionError{Option: "gates", Err: err}
	}
	s.Ensemble = e
	return s, nil
}

var (
	errLayoutRandomEdge = fmt.Errorf("sets explicit layers, which the random-edge schedule does not use: drop one of them")
	errSchedule         = fmt.Errorf("use layered or random-edge")
)
