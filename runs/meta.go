package runs

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"mixdepth/circuits"
	"mixdepth/tables"
)

// Metadata keys of a gate set read from a file: its canonical encoding
// (circuits.GateSet.Encode) and digest. A built-in gate set is recorded by
// its name (key gates) alone.
const (
	KeyGateSet       = "gate_set"
	KeyGateSetDigest = "gate_set_digest"
)

// Metadata keys of a sampling run's per-element noise, set only when used
// (sample --calibration, --single-qubit-error): the calibration file's
// content, its digest (the first 16 hex digits of its SHA-256), and the
// uniform single-qubit Pauli error rate. With the uniform keys fidelity,
// gate_error and readout_error they rebuild the circuits.ChipNoise of the
// run. They are run parameters: tables of one run agree on them.
const (
	KeyCalibration       = "calibration"
	KeyCalibrationDigest = "calibration_digest"
	KeySingleQubitError  = "single_qubit_error"
)

// Metadata keys of a chip description: the qubit labels in qubit order
// ("Q1,Q2,…", present when the graph has labels; they enter graph_digest),
// and the out-of-service qubits and couplers removed by --drop, in the
// labels of the chip they were removed from.
const (
	KeyLabels  = "labels"
	KeyDropped = "dropped"
)

// KeyParts is the metadata key of a chip in parts (accepted with
// --allow-disconnected): the number of its connected parts, present only
// when it is more than one. It is a run parameter, so merge and resume
// refuse to mix a run on a chip in parts with one on a connected chip, and
// it tells FromMeta to accept the graph and the commands to measure R
// against Spec.Limit. Tables without it are of connected chips.
const KeyParts = "parts"

// freeKeys are the metadata keys that are not run parameters: they may differ
// between the tables of one run (its parts, a partial table and its
// continuation). Every other key is a run parameter.
var freeKeys = []string{"command_line", "part", "partial", "instances_done"}

// IsParameter reports whether the metadata key is a run parameter, which
// every table of one run records with the same value. The keys that are not
// are command_line, part, partial and instances_done.
func IsParameter(key string) bool { return !slices.Contains(freeKeys, key) }

// Meta returns the table metadata of the run's circuits, in this order:
// tool_version, command_line (as given), seed, graph, graph_digest, qubits,
// schedule, layout, gates, then gate_set and gate_set_digest for a gate set
// read from a file, edges ("a-b,c-d,…"), labels and dropped when the graph
// has them, parts for a chip in parts, and for a layered schedule layers (its classes, "a-b,c-d;e-f;…").
// FromMeta rebuilds the Spec from it.
func (s *Spec) Meta(commandLine string) tables.Meta {
	var m tables.Meta
	m.Set("tool_version", Tool+" "+Version)
	m.Set("command_line", commandLine)
	m.Set("seed", strconv.FormatUint(s.Seed, 10))
	m.Set("graph", s.Graph.Name)
	m.Set("graph_digest", s.Graph.Digest())
	m.Set("qubits", strconv.Itoa(s.Graph.Qubits))
	m.Set("schedule", string(s.Schedule.Kind()))
	m.Set("layout", s.Layout)
	m.Set("gates", s.Ensemble.Name())
	if gs, ok := s.Ensemble.(*circuits.GateSet); ok && !gs.IsBuiltin() {
		m.Set(KeyGateSet, gs.Encode())
		m.Set(KeyGateSetDigest, gs.Digest())
	}
	m.Set("edges", FormatEdges(s.Graph.Edges))
	if s.Graph.Labels != nil {
		m.Set(KeyLabels, strings.Join(s.Graph.Labels, ","))
	}
	if len(s.Graph.Dropped) > 0 {
		m.Set(KeyDropped, strings.Join(s.Graph.Dropped, ","))
	}
	if s.Parts > 1 {
		m.Set(KeyParts, strconv.Itoa(s.Parts))
	}
	if l, ok := s.Schedule.(*circuits.Layered); ok {
		m.Set("layers", formatLayers(l.Classes))
	}
	return m
}

// FromMeta rebuilds a run's circuits from the metadata of a table it wrote
// (see Spec.Meta): the graph from qubits, graph and edges, checked against
// graph_digest; the layered schedule from layers, or the random-edge
// schedule; the gate set from gate_set (checked against gate_set_digest)
// when present, so that a table does not need its gate file, else from the
// name in gates; the seed. Errors name the key at fault.
func FromMeta(meta tables.Meta) (*Spec, error) {
	get := func(key string) (string, error) {
		v, ok := meta.Get(key)
		if !ok {
			return "", fmt.Errorf("runs: metadata has no %q key: not a table written by a mixdepth command that builds circuits", key)
		}
		return v, nil
	}
	name, err := get("graph")
	if err != nil {
		return nil, err
	}
	qubits, err := MetaInt(meta, "qubits")
	if err != nil {
		return nil, err
	}
	edgeSpec, err := get("edges")
	if err != nil {
		return nil, err
	}
	edges, err := ParseEdges(edgeSpec)
	if err != nil {
		return nil, fmt.Errorf("runs: metadata edges: %w", err)
	}
	parts := 0
	if _, ok := meta.Get(KeyParts); ok {
		if parts, err = MetaInt(meta, KeyParts); err != nil {
			return nil, err
		}
	}
	newGraph := circuits.NewGraph
	if parts > 1 {
		newGraph = circuits.NewGraphParts
	}
	g, err := newGraph(name, qubits, edges)
	if err != nil {
		return nil, fmt.Errorf("runs: metadata edges: %w", err)
	}
	if c := len(g.Components()); parts > 1 && c != parts {
		return nil, fmt.Errorf("runs: metadata %s is %d but the edges form %d part(s): the metadata was altered", KeyParts, parts, c)
	}
	if v, ok := meta.Get(KeyLabels); ok {
		labels := strings.Split(v, ",")
		if len(labels) != g.Qubits {
			return nil, fmt.Errorf("runs: metadata %s has %d labels for %d qubits", KeyLabels, len(labels), g.Qubits)
		}
		g.Labels = labels
	}
	if v, ok := meta.Get(KeyDropped); ok && v != "" {
		g.Dropped = strings.Split(v, ",")
	}
	digest, err := get("graph_digest")
	if err != nil {
		return nil, err
	}
	if digest != g.Digest() {
		return nil, fmt.Errorf("runs: metadata edges give graph digest %s but graph_digest is %s: the metadata was altered", g.Digest(), digest)
	}
	s := &Spec{Graph: g}
	if parts > 1 {
		s.Parts = parts
	}
	s.Layout, _ = meta.Get("layout")
	kind, err := get("schedule")
	if err != nil {
		return nil, err
	}
	switch circuits.ScheduleKind(kind) {
	case circuits.KindLayered:
		spec, err := get("layers")
		if err != nil {
			return nil, err
		}
		var classes [][]circuits.Edge
		for i, part := range strings.Split(spec, ";") {
			class, err := ParseEdges(part)
			if err != nil || len(class) == 0 {
				return nil, fmt.Errorf("runs: metadata layers: layer %d (%q) is not a list a-b,c-d,…", i, part)
			}
			for _, e := range class {
				if !g.HasEdge(e.A, e.B) {
					return nil, fmt.Errorf("runs: metadata layers: layer %d uses %d-%d, which is not a coupler of the graph", i, e.A, e.B)
				}
			}
			classes = append(classes, class)
		}
		s.Schedule = &circuits.Layered{Classes: classes}
	case circuits.KindRandomEdge:
		s.Schedule = &circuits.RandomEdge{Edges: g.Edges}
	default:
		return nil, fmt.Errorf("runs: metadata schedule %q: expected layered or random-edge", kind)
	}
	if s.Ensemble, err = ensembleFromMeta(meta); err != nil {
		return nil, err
	}
	if s.Ensemble, err = bindCouplers(s.Ensemble, g); err != nil {
		return nil, fmt.Errorf("runs: metadata %s: %w", KeyGateSet, err)
	}
	if s.Seed, err = MetaUint(meta, "seed"); err != nil {
		return nil, err
	}
	return s, nil
}

// ensembleFromMeta rebuilds the gate set of gates and, for a file's set,
// gate_set.
func ensembleFromMeta(meta tables.Meta) (circuits.Ensemble, error) {
	gates, ok := meta.Get("gates")
	if !ok {
		return nil, fmt.Errorf("runs: metadata has no %q key: not a table written by a mixdepth command that builds circuits", "gates")
	}
	enc, ok := meta.Get(KeyGateSet)
	if !ok {
		e, err := circuits.NewEnsemble(gates)
		if err != nil {
			return nil, fmt.Errorf("runs: metadata gates: %w", err)
		}
		return e, nil
	}
	gs, err := circuits.DecodeGateSet(gates, enc)
	if err != nil {
		return nil, fmt.Errorf("runs: metadata %s: %w", KeyGateSet, err)
	}
	if d, _ := meta.Get(KeyGateSetDigest); d != gs.Digest() {
		return nil, fmt.Errorf("runs: metadata %s has digest %s but %s is %q: the metadata was altered", KeyGateSet, gs.Digest(), KeyGateSetDigest, d)
	}
	return gs, nil
}

// FormatEdges writes edges as "a-b,c-d,…", the form ParseEdges reads.
func FormatEdges(edges []circuits.Edge) string {
	parts := make([]string, len(edges))
	for i, e := range edges {
		parts[i] = strconv.Itoa(e.A) + "-" + strconv.Itoa(e.B)
	}
	return strings.Join(parts, ",")
}

// formatLayers writes the layered schedule's classes as "a-b,c-d;e-f;…".
func formatLayers(classes [][]circuits.Edge) string {
	parts := make([]string, len(classes))
	for i, c := range classes {
		parts[i] = FormatEdges(c)
	}
	return strings.Join(parts, ";")
}

// ParseEdges reads the "a-b,c-d,…" form written by FormatEdges; "" is no
// edge.
func ParseEdges(spec string) ([]circuits.Edge, error) {
	if spec == "" {
		return nil, nil
	}
	var edges []circuits.Edge
	for _, item := range strings.Split(spec, ",") {
		as, bs, ok := strings.Cut(item, "-")
		a, err1 := strconv.Atoi(as)
		b, err2 := strconv.Atoi(bs)
		if !ok || err1 != nil || err2 != nil {
			return nil, fmt.Errorf("runs: %q is not an edge a-b", item)
		}
		edges = append(edges, circuits.Edge{A: a, B: b})
	}
	return edges, nil
}

// MetaInt reads an integer metadata value.
func MetaInt(meta tables.Meta, key string) (int, error) {
	v, ok := meta.Get(key)
	if !ok {
		return 0, fmt.Errorf("runs: metadata has no %q key", key)
	}
	n, err := strconv.Atoi(v)
	if err != nil {
		return 0, fmt.Errorf("runs: metadata %s %q is not a whole number", key, v)
	}
	return n, nil
}

// MetaUint reads an unsigned integer metadata value, such as the seed.
func MetaUint(meta tables.Meta, key string) (uint64, error) {
	v, ok := meta.Get(key)
	if !ok {
		return 0, fmt.Errorf("runs: metadata has no %q key", key)
	}
	n, err := strconv.ParseUint(v, 10, 64)
	if err != nil {
		return 0, fmt.Errorf("runs: metadata %s %q is not a whole number", key, v)
	}
	return n, nil
}

// MetaFloatOr reads a float metadata value, or returns def when the key is
// absent or unreadable (tables written before the key existed).
func MetaFloatOr(meta tables.Meta, key string, def float64) float64 {
	v, ok := meta.Get(key)
	if !ok {
		return def
	}
	x, err := strconv.ParseFloat(v, 64)
	if err != nil {
		return def
	}
	return x
}
