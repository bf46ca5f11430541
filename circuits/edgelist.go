package circuits

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Sentinel errors of qubit labels, wrapped by *ParseError and *LabelError.
var (
	ErrBadLabel       = errors.New("not a qubit id or name")
	ErrUnknownLabel   = errors.New("unknown qubit")
	ErrDuplicateLabel = errors.New("qubit given twice")
	ErrBadCoordinates = errors.New("bad coordinates")
)

// coordPrefix starts a comment line that gives a qubit's drawing coordinates.
const coordPrefix = "#@"

// ReadEdgeList reads an edge-list file; it is ReadEdgeListWith without
// options, so isolated qubits and disconnected chips are errors.
func ReadEdgeList(name string, r io.Reader) (*Graph, error) {
	return ReadEdgeListWith(name, r, ReadOptions{})
}

// ReadEdgeListWith reads an edge-list file. Each line is one of
//
//	A B        a coupler between qubits A and B
//	A          qubit A, declared (a qubit of the chip with no working coupler)
//	#@ A X Y   drawing coordinates of qubit A (read by graph --plot)
//
// where '#' starts a comment otherwise and blank lines are skipped. A qubit
// token is a whole number or a name of letters, digits and _ . : - that is
// not a whole number and does not begin with '-'. If every token is a number,
// the qubits are 0..max id and keep their numbers; if any token is a name,
// every token is a label and the qubits are numbered 0, 1, … in order of
// first appearance on a coupler or declaration line (Graph.Labels keeps the
// names). name labels errors. The error is a *ParseError.
func ReadEdgeListWith(name string, r io.Reader, o ReadOptions) (*Graph, error) {
	type line struct {
		n      int
		tokens []string
	}
	type coord struct {
		n     int
		token string
		xy    [2]float64
	}
	var lines []line
	var coords []coord
	named := false
	sc := bufio.NewScanner(r)
	ln := 1
	for ; sc.Scan(); ln++ {
		text := sc.Text()
		perr := func(err error, detail string) error {
			return &ParseError{File: name, Line: ln, Err: err, Detail: detail}
		}
		if rest, ok := strings.CutPrefix(strings.TrimSpace(text), coordPrefix); ok {
			f := strings.Fields(rest)
			if len(f) != 3 {
				return nil, perr(ErrBadCoordinates, fmt.Sprintf("write %q", coordPrefix+" QUBIT X Y"))
			}
			var xy [2]float64
			for k, s := range f[1:] {
				v, err := strconv.ParseFloat(s, 64)
				if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
					return nil, perr(ErrBadCoordinates, fmt.Sprintf("%q is not a finite number", s))
				}
				xy[k] = v
			}
			coords = append(coords, coord{ln, f[0], xy})
			continue
		}
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		fields := strings.Fields(text)
		if len(fields) == 0 {
			continue
		}
		if len(fields) > 2 {
			return nil, perr(ErrFieldCount, fmt.Sprintf("got %d fields %q; write two qubits \"a b\" per line, or one to declare a qubit", len(fields), strings.TrimSpace(text)))
		}
		for _, f := range fields {
			kind, err := tokenKind(f)
			if err != nil {
				return nil, perr(err, fmt.Sprintf("%q", f))
			}
			named = named || kind == tokenName
		}
		if len(fields) == 2 && fields[0] == fields[1] {
			return nil, perr(ErrSelfLoop, fmt.Sprintf("qubit %s coupled to itself", fields[0]))
		}
		lines = append(lines, line{ln, fields})
	}
	if err := sc.Err(); errors.Is(err, bufio.ErrTooLong) {
		return nil, &ParseError{File: name, Line: ln, Err: ErrLineTooLong, Detail: fmt.Sprintf("longer than %d bytes; write one qubit pair or one qubit per line", maxLineBytes)}
	} else if err != nil {
		return nil, fmt.Errorf("circuits: reading %s: %w", name, err)
	}

	// Number the qubits.
	var labels []string
	ids := map[string]int{}
	id := func(tok string) int {
		if named {
			q, ok := ids[tok]
			if !ok {
				q = len(labels)
				ids[tok] = q
				labels = append(labels, tok)
			}
			return q
		}
		v, _ := strconv.Atoi(tok) // checked by tokenKind
		return v
	}
	var edges []Edge
	var edgeLines []int
	seen := map[[2]int]int{}
	declared := map[int]int{}
	maxID := -1
	for _, l := range lines {
		perr := func(err error, detail string) error {
			return &ParseError{File: name, Line: l.n, Err: err, Detail: detail}
		}
		if len(l.tokens) == 1 {
			q := id(l.tokens[0])
			if prev, dup := declared[q]; dup {
				return nil, perr(ErrDuplicateLabel, fmt.Sprintf("qubit %s already declared on line %d", l.tokens[0], prev))
			}
			declared[q] = l.n
			maxID = max(maxID, q)
			continue
		}
		e := Edge{id(l.tokens[0]), id(l.tokens[1])}
		if e.A == e.B { // "01" and "1" name the same qubit
			return nil, perr(ErrSelfLoop, fmt.Sprintf("qubit %s coupled to itself", l.tokens[0]))
		}
		if prev, dup := seen[key(e)]; dup {
			return nil, perr(ErrDuplicateEdge, fmt.Sprintf("%s %s already on line %d", l.tokens[0], l.tokens[1], prev))
		}
		seen[key(e)] = l.n
		edges = append(edges, e)
		edgeLines = append(edgeLines, l.n)
		maxID = max(maxID, e.A, e.B)
	}
	if len(edges) == 0 {
		return nil, &ParseError{File: name, Err: ErrTooFewQubits, Detail: "the file lists no couplers"}
	}
	// Only 2·len(edges) + len(declared) ids can appear, so a larger id leaves
	// a qubit out (and maxID+1 would overflow for an id of math.MaxInt).
	if maxID >= 2*len(edges)+len(declared) || (o.AllowDisconnected && !named && !allListed(maxID+1, edges, declared)) {
		return nil, isolatedError(name, firstUnlisted(maxID, edges, declared), maxID)
	}
	g, err := newGraph(name, maxID+1, edges, o.AllowDisconnected)
	if err != nil {
		var pe *ParseError
		if errors.As(err, &pe) && pe.edge > 0 {
			pe.Line = edgeLines[pe.edge-1]
		}
		if errors.Is(err, ErrIsolatedQubit) {
			if q := firstIsolated(maxID+1, edges); declared[q] > 0 {
				label := strconv.Itoa(q)
				if named {
					label = labels[q]
				}
				return nil, &ParseError{File: name, Line: declared[q], Err: ErrIsolatedQubit, Detail: fmt.Sprintf("qubit %s is on no coupler; couple it (--allow-disconnected accepts it)", label)}
			}
		}
		return nil, err
	}
	if named {
		g.Labels = labels
	}
	if len(coords) > 0 {
		g.Coords = make([][2]float64, g.Qubits)
		given := map[int]int{}
		for _, c := range coords {
			perr := func(err error, detail string) error {
				return &ParseError{File: name, Line: c.n, Err: err, Detail: detail}
			}
			q, ok := -1, false
			if named {
				q, ok = ids[c.token]
			} else if kind, err := tokenKind(c.token); err == nil && kind == tokenNumber {
				q = id(c.token)
				ok = q < g.Qubits
			}
			if !ok {
				return nil, perr(ErrUnknownLabel, fmt.Sprintf("%s is on no coupler or declaration line", c.token))
			}
			if prev, dup := given[q]; dup {
				return nil, perr(ErrDuplicateLabel, fmt.Sprintf("coordinates of %s already on line %d", c.token, prev))
			}
			given[q] = c.n
			g.Coords[q] = c.xy
		}
		if len(given) != g.Qubits {
			for q := 0; q < g.Qubits; q++ {
				if _, ok := given[q]; !ok {
					return nil, &ParseError{File: name, Err: ErrBadCoordinates, Detail: fmt.Sprintf("qubit %s has no %s line; give every qubit coordinates or none", g.Label(q), coordPrefix)}
				}
			}
		}
	}
	return g, nil
}

// allListed reports whether every id in 0..n−1 is on an edge or declared.
func allListed(n int, edges []Edge, declared map[int]int) bool {
	return firstUnlisted(n-1, edges, declared) < 0
}

// firstUnlisted returns the smallest id in 0..maxID that is on no edge and
// not declared, or −1; the work is O(len(edges)+len(declared)).
func firstUnlisted(maxID int, edges []Edge, declared map[int]int) int {
	limit := min(maxID, 2*len(edges)+len(declared)) + 1
	on := make([]bool, limit)
	for _, e := range edges {
		if e.A < limit {
			on[e.A] = true
		}
		if e.B < limit {
			on[e.B] = true
		}
	}
	for q := range declared {
		if q < limit {
			on[q] = true
		}
	}
	for q, ok := range on {
		if !ok {
			return q
		}
	}
	return -1
}

type tokenType int

const (
	tokenNumber tokenType = iota
	tokenName
)

// tokenKind classifies a qubit token: a whole number (ErrNotNumber if it
// overflows, ErrNegativeID if it is negative) or a name (ErrBadLabel for a
// character outside letters, digits and _ . : -).
func tokenKind(tok string) (tokenType, error) {
	digits := true
	for i := 0; i < len(tok); i++ {
		if tok[i] < '0' || tok[i] > '9' {
			digits = false
		}
	}
	if digits {
		if _, err := strconv.Atoi(tok); err != nil {
			return 0, ErrNotNumber
		}
		return tokenNumber, nil
	}
	if tok[0] == '-' {
		if _, err := strconv.Atoi(tok); err == nil {
			return 0, ErrNegativeID
		}
		return 0, ErrBadLabel
	}
	if !validName(tok) {
		return 0, ErrBadLabel
	}
	return tokenName, nil
}

// validName reports whether s is made of letters, digits and _ . : - only.
func validName(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9':
		case c == '_' || c == '.' || c == ':' || c == '-':
		default:
			return false
		}
	}
	return true
}

// WriteEdgeList writes g in the form ReadEdgeListWith reads: a comment with
// the qubit count; for a labelled graph every qubit declared in order (so
// that numbering by first appearance gives the same numbers), for an
// unlabelled one the qubits on no coupler; the couplers in order; the
// coordinates when g has them. Reading it back gives the same qubits, edges,
// labels and coordinates.
func WriteEdgeList(w io.Writer, g *Graph) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# %s: %d qubits, %d couplers\n", g.Name, g.Qubits, len(g.Edges))
	deg := g.Degrees()
	for q := 0; q < g.Qubits; q++ {
		if g.Labels != nil || deg[q] == 0 {
			fmt.Fprintf(bw, "%s\n", g.Label(q))
		}
	}
	for _, e := range g.Edges {
		fmt.Fprintf(bw, "%s %s\n", g.Label(e.A), g.Label(e.B))
	}
	for q, c := range g.Coords {
		fmt.Fprintf(bw, "%s %s %s %s\n", coordPrefix, g.Label(q), strconv.FormatFloat(c[0], 'g', -1, 64), strconv.FormatFloat(c[1], 'g', -1, 64))
	}
	return bw.Flush()
}
