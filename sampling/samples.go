package sampling

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"mixdepth/sim"
	"mixdepth/stats"
)

// Record is one shot to be scored: a measured or simulated bitstring of an
// instance, with its ideal probability when the table has one.
type Record struct {
	// Row is the 1-based data row (the first row after a CSV header is 1),
	// and Line the line of a CSV file (0 for other tables); both only label
	// messages.
	Row, Line int
	Instance  int
	// Bitstring lists the measured bits, qubit 0 first.
	Bitstring string
	// PIdeal is the ideal probability of the bitstring when HasP is true.
	PIdeal float64
	HasP   bool
	// written is the bitstring as its file wrote it when InOrder reversed
	// Bitstring (qubit 0 last), and "" otherwise: messages quote the file.
	written string
}

// bits parses r's bitstring; an error quotes it as its file wrote it, with
// positions counted along that string.
func (r Record) bits(n int) (uint64, error) {
	if r.written != "" {
		return parseBits(r.written, n, QubitZeroLast)
	}
	return parseBits(r.Bitstring, n, QubitZeroFirst)
}

// asWritten is r's bitstring as its file wrote it.
func (r Record) asWritten() string {
	if r.written != "" {
		return r.written
	}
	return r.Bitstring
}

// Sentinel errors wrapped by *RowError.
var (
	ErrEmpty       = errors.New("no shots")
	ErrColumn      = errors.New("missing column")
	ErrNotNumber   = errors.New("not a number")
	ErrBitstring   = errors.New("bad bitstring")
	ErrInstance    = errors.New("unknown instance")
	ErrProbability = errors.New("probability outside [0, 1]")
	ErrMismatch    = errors.New("p_ideal does not match the circuit")
)

// RowError is an error in a sample table. Row and Line are as in Record (0
// when the error concerns the whole table); Column names the offending
// column when there is one.
type RowError struct {
	File      string
	Row, Line int
	Column    string
	Err       error
	Detail    string
}

func (e *RowError) Error() string {
	var b strings.Builder
	b.WriteString("sampling: ")
	if e.File != "" {
		b.WriteString(e.File)
		b.WriteString(": ")
	}
	switch {
	case e.Line > 0:
		fmt.Fprintf(&b, "line %d: ", e.Line)
	case e.Row > 0:
		fmt.Fprintf(&b, "row %d: ", e.Row)
	}
	if e.Column != "" {
		fmt.Fprintf(&b, "column %s: ", e.Column)
	}
	b.WriteString(e.Err.Error())
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	return b.String()
}

func (e *RowError) Unwrap() error { return e.Err }

// ParseBitstring returns the basis index x = Σ b_q 2^q of a bitstring that
// lists qubit 0 first. The error wraps ErrBitstring when s does not have
// exactly n characters, each 0 or 1.
func ParseBitstring(s string, n int) (uint64, error) { return parseBits(s, n, QubitZeroFirst) }

// parseBits is ParseBitstring for a bitstring written in order o; an error
// counts characters from 1 along s as written.
func parseBits(s string, n int, o BitOrder) (uint64, error) {
	if len(s) != n {
		return 0, fmt.Errorf("%w: %q has %d characters, want %d (one per qubit, qubit 0 %s)", ErrBitstring, s, len(s), n, o)
	}
	var x uint64
	for i := 0; i < n; i++ {
		q := i
		if o == QubitZeroLast {
			q = n - 1 - i
		}
		switch s[i] {
		case '0':
		case '1':
			x |= 1 << q
		default:
			return 0, fmt.Errorf("%w: %q has %q at character %d (qubit %d); use only 0 and 1", ErrBitstring, s, s[i], i+1, q)
		}
	}
	return x, nil
}

// FormatBitstring writes the n bits of x, qubit 0 first.
func FormatBitstring(x uint64, n int) string {
	b := make([]byte, n)
	for q := range b {
		b[q] = '0' + byte(x>>q&1)
	}
	return string(b)
}

// ReadCSV reads sample records from a CSV file (encoding/csv). The first
// line is a header naming the columns; "instance" and "bitstring" are
// required, "p_ideal" is optional (an empty cell means missing), other
// columns are ignored. name labels errors, which are *RowError values
// wrapping ErrColumn, ErrNotNumber or ErrEmpty, or wrapping the
// *csv.ParseError of a malformed line.
func ReadCSV(name string, r io.Reader) ([]Record, error) {
	cr := csv.NewReader(r)
	cr.TrimLeadingSpace = true
	cr.ReuseRecord = true
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &RowError{File: name, Err: ErrEmpty, Detail: "the file is empty; want a header line with instance,bitstring"}
	}
	if err != nil {
		return nil, csvError(name, err)
	}
	col := map[string]int{}
	for j, h := range header {
		h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
		if _, dup := col[h]; !dup {
			col[h] = j
		}
	}
	for _, need := range []string{"instance", "bitstring"} {
		if _, ok := col[need]; !ok {
			return nil, &RowError{File: name, Line: 1, Column: need, Err: ErrColumn,
				Detail: fmt.Sprintf("the header %q has no %s column; it needs at least instance,bitstring", strings.Join(header, ","), need)}
		}
	}
	ci, cb := col["instance"], col["bitstring"]
	cp, hasP := col["p_ideal"]
	var recs []Record
	for {
		fields, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvError(name, err)
		}
		line, _ := cr.FieldPos(0)
		rec := Record{Row: len(recs) + 1, Line: line, Bitstring: strings.TrimSpace(fields[cb])}
		id, err := strconv.Atoi(strings.TrimSpace(fields[ci]))
		if err != nil {
			return nil, &RowError{File: name, Row: rec.Row, Line: line, Column: "instance", Err: ErrNotNumber,
				Detail: fmt.Sprintf("%q is not a whole number", fields[ci])}
		}
		rec.Instance = id
		if hasP {
			if s := strings.TrimSpace(fields[cp]); s != "" {
				p, err := strconv.ParseFloat(s, 64)
				if err != nil {
					return nil, &RowError{File: name, Row: rec.Row, Line: line, Column: "p_ideal", Err: ErrNotNumber,
						Detail: fmt.Sprintf("%q is not a number", s)}
				}
				rec.PIdeal, rec.HasP = p, true
			}
		}
		recs = append(recs, rec)
	}
	if len(recs) == 0 {
		return nil, &RowError{File: name, Err: ErrEmpty, Detail: "the table has a header but no rows"}
	}
	return recs, nil
}

func csvError(name string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &RowError{File: name, Line: pe.Line, Err: pe.Err, Detail: fmt.Sprintf("malformed CSV at column %d", pe.Column)}
	}
	return fmt.Errorf("sampling: reading %s: %w", name, err)
}

// InstanceSamples are the ideal probabilities of the shots of one instance,
// with the collision probability of its ideal output distribution.
type InstanceSamples struct {
	Instance int
	// Collision is Z_U = Σ_x p_U(x)².
	Collision float64
	// PIdeal[k] is the ideal probability of shot k.
	PIdeal []float64
}

// MatchTolerance is the relative tolerance within which a table's p_ideal
// must agree with the probability Collect computes: 1e-6 admits values
// written with 7 significant digits, while two double-precision simulators
// agree to about 1e-12. An absolute slack of 1e-9/D covers probabilities
// that are zero up to rounding.
const MatchTolerance = 1e-6

// Collect checks records against circuits of qubits qubits and groups them
// by instance, ascending. circuit returns the circuit of an instance id, or
// nil for an unknown id. Each instance that occurs is simulated once (one
// state vector at a time) for its collision probability and for the ideal
// probabilities of rows that have none; a row's own p_ideal must lie in
// [0, 1] and agree with the simulation within MatchTolerance. Errors name
// the file and row: *RowError values wrapping ErrEmpty, ErrBitstring,
// ErrInstance, ErrProbability or ErrMismatch. A qubit count outside 2 to
// MaxQubits is an error wrapping ErrConfig, and a state too large for
// memory one wrapping sim.ErrTooLarge. A cancelled ctx stops it between
// instances with ctx.Err().
func Collect(ctx context.Context, name string, records []Record, qubits int, circuit func(id int) *Circuit, workers int) ([]InstanceSamples, error) {
	if qubits < 2 || qubits > MaxQubits {
		return nil, fmt.Errorf("sampling: %s: %w", qubitRange(qubits, "scoring"), ErrConfig)
	}
	if len(records) == 0 {
		return nil, &RowError{File: name, Err: ErrEmpty, Detail: "the table has no rows"}
	}
	outcomes := make([]uint64, len(records))
	byID := map[int][]int{}
	for k, rec := range records {
		x, err := rec.bits(qubits)
		if err != nil {
			return nil, &RowError{File: name, Row: rec.Row, Line: rec.Line, Column: "bitstring", Err: err}
		}
		outcomes[k] = x
		if rec.HasP && !(rec.PIdeal >= 0 && rec.PIdeal <= 1) {
			return nil, &RowError{File: name, Row: rec.Row, Line: rec.Line, Column: "p_ideal", Err: ErrProbability,
				Detail: fmt.Sprintf("%v", rec.PIdeal)}
		}
		byID[rec.Instance] = append(byID[rec.Instance], k)
	}
	ids := make([]int, 0, len(byID))
	for id := range byID {
		ids = append(ids, id)
	}
	slices.Sort(ids)
	circs := make([]*Circuit, len(ids))
	for i, id := range ids {
		c := circuit(id)
		if c == nil || c.Qubits != qubits {
			rec := records[byID[id][0]]
			return nil, &RowError{File: name, Row: rec.Row, Line: rec.Line, Column: "instance", Err: ErrInstance,
				Detail: fmt.Sprintf("instance %d is not among the circuits", id)}
		}
		circs[i] = c
	}

	st, err := sim.NewState(qubits, 8*math.Ldexp(1, qubits))
	if err != nil {
		return nil, err
	}
	probs := make([]float64, len(st.Amp))
	dim := float64(len(st.Amp))
	out := make([]InstanceSamples, len(ids))
	for i, id := range ids {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		probs = circs[i].Probabilities(st, probs, workers)
		rows := byID[id]
		g := InstanceSamples{Instance: id, Collision: stats.Collision(probs), PIdeal: make([]float64, len(rows))}
		for j, k := range rows {
			p := probs[outcomes[k]]
			rec := records[k]
			if rec.HasP {
				if math.Abs(rec.PIdeal-p) > MatchTolerance*max(rec.PIdeal, p)+1e-9/dim {
					return nil, &RowError{File: name, Row: rec.Row, Line: rec.Line, Column: "p_ideal", Err: ErrMismatch,
						Detail: fmt.Sprintf("the table says %.10g for instance %d bitstring %s, the circuit gives %.10g; score with the circuits the table was sampled from",
							rec.PIdeal, id, rec.asWritten(), p)}
				}
				p = rec.PIdeal
			}
			g.PIdeal[j] = p
		}
		out[i] = g
	}
	return out, nil
}
