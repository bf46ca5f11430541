package circuits

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
)

// ErrCalibration marks an invalid calibration file; it is wrapped by every
// data error of ReadCalibration.
var ErrCalibration = errors.New("invalid calibration file")

// CalibrationLimit is the largest calibration file ReadCalibration reads,
// in bytes: the same 64 MiB as edge lists and layouts
// (inputfile.SmallLimit).
const CalibrationLimit = 64 << 20

// The columns of a calibration file.
const (
	CalQubit     = "qubit"        // a qubit; with coupled_to, one end of a coupler
	CalCoupledTo = "coupled_to"   // the other end of the coupler, empty on a qubit row
	CalPair      = "pair_error"   // two-qubit Pauli error rate of the coupler (ChipNoise.Pair)
	CalSingle    = "single_error" // single-qubit Pauli error rate of the qubit (ChipNoise.Single)
	CalReadout01 = "readout_01"   // probability that the qubit's 0 is read as 1
	CalReadout10 = "readout_10"   // probability that the qubit's 1 is read as 0
)

// calColumns lists the columns a calibration header may name.
var calColumns = []string{CalQubit, CalCoupledTo, CalPair, CalSingle, CalReadout01, CalReadout10}

// Calibration is what ReadCalibration read: the noise and how many
// elements the file set.
type Calibration struct {
	// Noise is the base noise with the file's entries.
	Noise *ChipNoise
	// Couplers and Qubits count the coupler and qubit rows applied (rows of
	// dropped elements are not counted).
	Couplers, Qubits int
	// Skipped counts the rows of elements that Drop removed.
	Skipped int
}

// ReadCalibration reads a calibration file for the graph g and returns a
// copy of base with the file's entries; see ReadCalibrationInfo for the
// format. It panics if base does not have g's sizes.
func ReadCalibration(name string, r io.Reader, g *Graph, base *ChipNoise) (*ChipNoise, error) {
	c, err := ReadCalibrationInfo(name, r, g, base)
	if err != nil {
		return nil, err
	}
	return c.Noise, nil
}

// ReadCalibrationInfo reads a calibration file for the graph g: a table
// of comma-separated cells, one element of the chip per row. '#' starts a
// comment (to the end of the line) and blank lines are skipped; cells are
// trimmed of spaces. The first row is the header: it names the columns, in
// any order, each at most once, from
//
//	qubit         a qubit of g (required)
//	coupled_to    the other qubit of a coupler (needed for coupler rows)
//	pair_error    two-qubit Pauli error rate of the coupler
//	single_error  single-qubit Pauli error rate of the qubit
//	readout_01    probability that the qubit's 0 is read as 1
//	readout_10    probability that the qubit's 1 is read as 0
//
// Every later row has one cell per column. A row with coupled_to set is a
// coupler row: it may set only pair_error. A row with coupled_to empty is a
// qubit row: it may set single_error, readout_01 and readout_10 but not
// pair_error. Qubits are written as g names them: their labels when g has
// labels, else their numbers 0..n−1; a coupler may be written in either
// orientation. The rates mean what ChipNoise says. An empty rate cell keeps
// base's value. Rows for qubits or couplers that Drop removed (listed in
// g.Dropped), or couplers of a removed qubit, are skipped, so that one file
// serves the whole chip whatever is out of service.
//
// Errors are *ParseError values wrapping ErrCalibration that name the file
// and line: a header with an unknown or repeated column or without qubit,
// a row with the wrong number of cells, an unknown qubit or a pair of
// qubits that g does not couple, a qubit or coupler given twice, a rate
// that is not a number, not finite or outside [0, 1], a coupler row with a
// qubit rate or a qubit row with pair_error, a line longer than
// bufio.MaxScanTokenSize, or a file beyond CalibrationLimit bytes. name
// labels errors. It panics if base does not have g's sizes.
func ReadCalibrationInfo(name string, r io.Reader, g *Graph, base *ChipNoise) (*Calibration, error) {
	if len(base.Pair) != len(g.Edges) || base.Qubits() != g.Qubits || len(base.Readout01) != g.Qubits || len(base.Readout10) != g.Qubits {
		panic(fmt.Sprintf("circuits: ReadCalibration with noise for %d couplers and %d qubits on a graph with %d couplers and %d qubits", len(base.Pair), base.Qubits(), len(g.Edges), g.Qubits))
	}
	out := &Calibration{Noise: base.clone(g)}
	c := out.Noise
	qubit := make(map[string]int, g.Qubits)
	for q := range g.Qubits {
		qubit[g.Label(q)] = q
	}
	dropped := make(map[string]bool, len(g.Dropped))
	for _, d := range g.Dropped {
		dropped[d] = true
	}

	lr := &io.LimitedReader{R: r, N: CalibrationLimit + 1}
	sc := bufio.NewScanner(lr)
	var cols []string // the header, once read
	index := map[string]int{}
	qubitLine := map[int]int{}
	pairLine := map[[2]int]int{}
	ln := 0
	for sc.Scan() {
		ln++
		perr := func(format string, args ...any) error {
			return &ParseError{File: name, Line: ln, Err: ErrCalibration, Detail: fmt.Sprintf(format, args...)}
		}
		text := sc.Text()
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		if strings.TrimSpace(text) == "" {
			continue
		}
		cells := strings.Split(text, ",")
		for i := range cells {
			cells[i] = strings.TrimSpace(cells[i])
		}
		if cols == nil {
			for i, h := range cells {
				switch {
				case !slices.Contains(calColumns, h):
					return nil, perr("header column %q is not one of %s", h, strings.Join(calColumns, ", "))
				}
				if _, dup := index[h]; dup {
					return nil, perr("header names column %s twice", h)
				}
				index[h] = i
				cols = append(cols, h)
			}
			if _, ok := index[CalQubit]; !ok {
				return nil, perr("the header has no %s column; the first row names the columns, e.g. %q", CalQubit, strings.Join(calColumns, ","))
			}
			continue
		}
		if len(cells) != len(cols) {
			return nil, perr("%d cells for the %d columns of the header; write one cell per column, empty to keep the default", len(cells), len(cols))
		}
		cell := func(col string) string {
			if i, ok := index[col]; ok {
				return cells[i]
			}
			return ""
		}
		// lookup returns the qubit a names; skip is true for a dropped one.
		lookup := func(a string) (q int, skip bool, err error) {
			if q, ok := qubit[a]; ok {
				return q, false, nil
			}
			if dropped[a] {
				return -1, true, nil
			}
			if a == "" {
				return -1, false, perr("empty %s cell", CalQubit)
			}
			if g.Labels != nil {
				return -1, false, perr("unknown qubit %q: %s names its qubits by label", a, g.Name)
			}
			return -1, false, perr("unknown qubit %q: %s has qubits 0 to %d", a, g.Name, g.Qubits-1)
		}
		rate := func(col string) (v float64, set bool, err error) {
			s := cell(col)
			if s == "" {
				return 0, false, nil
			}
			v, perrNum := strconv.ParseFloat(s, 64)
			switch {
			case perrNum != nil && !errors.Is(perrNum, strconv.ErrRange):
				return 0, false, perr("%s %q is not a number", col, s)
			case math.IsNaN(v) || math.IsInf(v, 0) || perrNum != nil:
				return 0, false, perr("%s %q is not a finite number", col, s)
			case v < 0 || v > 1:
				return 0, false, perr("%s %s lies outside [0, 1]: write a probability, not a percentage", col, s)
			}
			return v, true, nil
		}
		a, b := cell(CalQubit), cell(CalCoupledTo)
		if b != "" { // a coupler row
			for _, col := range []string{CalSingle, CalReadout01, CalReadout10} {
				if cell(col) != "" {
					return nil, perr("coupler %s-%s has a %s cell; give qubit rates on a row of their own, with %s empty", a, b, col, CalCoupledTo)
				}
			}
			v, set, err := rate(CalPair)
			if err != nil {
				return nil, err
			}
			qa, skipA, err := lookup(a)
			if err != nil {
				return nil, err
			}
			qb, skipB, err := lookup(b)
			if err != nil {
				return nil, err
			}
			if skipA || skipB || dropped[a+"-"+b] || dropped[b+"-"+a] {
				out.Skipped++
				continue
			}
			if qa == qb {
				return nil, perr("coupler %s-%s couples a qubit to itself", a, b)
			}
			i, ok := c.edges[key(Edge{qa, qb})]
			if !ok {
				return nil, perr("%s does not couple qubits %s and %s", g.Name, a, b)
			}
			k := key(Edge{qa, qb})
			if prev, dup := pairLine[k]; dup {
				return nil, perr("coupler %s-%s already on line %d", a, b, prev)
			}
			pairLine[k] = ln
			if set {
				c.Pair[i] = v
			}
			out.Couplers++
			continue
		}
		if cell(CalPair) != "" {
			return nil, perr("qubit %s has a %s cell but no %s: a coupler row names both qubits", a, CalPair, CalCoupledTo)
		}
		var vals [3]float64
		var sets [3]bool
		for j, col := range []string{CalSingle, CalReadout01, CalReadout10} {
			v, set, err := rate(col)
			if err != nil {
				return nil, err
			}
			vals[j], sets[j] = v, set
		}
		q, skip, err := lookup(a)
		if err != nil {
			return nil, err
		}
		if skip {
			out.Skipped++
			continue
		}
		if prev, dup := qubitLine[q]; dup {
			return nil, perr("qubit %s already on line %d", a, prev)
		}
		qubitLine[q] = ln
		for j, dst := range [][]float64{c.Single, c.Readout01, c.Readout10} {
			if sets[j] {
				dst[q] = vals[j]
			}
		}
		out.Qubits++
	}
	switch err := sc.Err(); {
	case lr.N <= 0:
		return nil, &ParseError{File: name, Line: ln, Err: ErrCalibration, Detail: fmt.Sprintf("more than the %d MiB a calibration file may have", CalibrationLimit>>20)}
	case errors.Is(err, bufio.ErrTooLong):
		return nil, &ParseError{File: name, Line: ln + 1, Err: ErrCalibration, Detail: fmt.Sprintf("line longer than %d bytes; write one qubit or coupler per line", bufio.MaxScanTokenSize)}
	case err != nil:
		return nil, fmt.Errorf("circuits: reading %s: %w: %w", name, ErrCalibration, err)
	case cols == nil:
		return nil, &ParseError{File: name, Err: ErrCalibration, Detail: fmt.Sprintf("no header row; the first row names the columns, e.g. %q", strings.Join(calColumns, ","))}
	}
	return out, nil
}

// clone returns a deep copy of c for the graph g.
func (c *ChipNoise) clone(g *Graph) *ChipNoise {
	d := UniformNoise(g, 0, 0, 0, 0, c.Fidelity)
	copy(d.Pair, c.Pair)
	copy(d.Single, c.Single)
	copy(d.Readout01, c.Readout01)
	copy(d.Readout10, c.Readout10)
	return d
}
