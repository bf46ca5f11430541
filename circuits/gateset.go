package circuits

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"

	"mixdepth/internal/inputfile"
	"mixdepth/internal/pinned"
)

// Sentinel errors of gate-set specs and files, wrapped by *ParseError.
var (
	// ErrUnknownGateSet marks a --gates spec that is neither a built-in gate
	// set nor an existing file.
	ErrUnknownGateSet = errors.New("unknown gate set")
	// ErrGateSet marks an invalid gate-set file: malformed JSON, a matrix of
	// the wrong shape, a matrix that is not unitary, an empty or unknown
	// single-qubit set.
	ErrGateSet = errors.New("invalid gate set")
)

// UnitaryTolerance is the largest max-entry deviation ‖M†M − I‖ a gate-set
// file's matrices may have: ample for entries written with 12 or more
// significant digits, far below any physically different gate.
const UnitaryTolerance = 1e-9

// EntanglerNames lists the entanglers accepted in "NAME+haar1" specs.
var EntanglerNames = []string{"cz", "cnot", "iswap", "sqrt-iswap"}

// Entangler returns the named two-qubit entangler in the basis 2·b_a + b_b;
// ok is false for an unknown name.
//
//	cz          diag(1, 1, 1, −1)
//	cnot        control a, target b: |10⟩ ↔ |11⟩
//	iswap       |01⟩ → i|10⟩, |10⟩ → i|01⟩
//	sqrt-iswap  cos(π/4) on |01⟩, |10⟩ and i·sin(π/4) between them
func Entangler(name string) (g [16]complex128, ok bool) {
	switch name {
	case "cz":
		g = [16]complex128{0: 1, 5: 1, 10: 1, 15: -1}
	case "cnot":
		g = [16]complex128{0: 1, 5: 1, 11: 1, 14: 1}
	case "iswap":
		g = [16]complex128{0: 1, 6: 1i, 9: 1i, 15: 1}
	case "sqrt-iswap":
		c, s := complex(math.Cos(math.Pi/4), 0), complex(0, math.Sin(math.Pi/4))
		g = [16]complex128{0: 1, 5: c, 6: s, 9: s, 10: c, 15: 1}
	default:
		return g, false
	}
	return g, true
}

// GateSet is a two-qubit ensemble built on a fixed entangler G: each gate is
//
//	G · (u_a ⊗ u_b)
//
// with u_a (qubit a) and u_b drawn independently, in that order, from Haar
// U(2) when Single is nil, or uniformly from the finite set Single
// otherwise. Circuits of a GateSet end with a final layer of single-qubit
// gates on every qubit, drawn the same way (see Finisher). Build one with
// NewGateSet or ReadGateSet, which validate it.
type GateSet struct {
	// Spec is the name that selects the set: "cz+haar1" or a file path.
	Spec string
	// G is the entangler, row-major in the basis 2·b_a + b_b.
	G [16]complex128
	// Single is the finite single-qubit set (row-major 2×2); nil means Haar
	// U(2).
	Single [][4]complex128
	// Couplers are calibrated entanglers of single couplers, which replace
	// G on them once the set is bound to a graph (Bind); G is the default.
	Couplers []CouplerGate
	// Unitarized is the largest entry change made by replacing the file's
	// matrices by their nearest unitaries (GateOptions.Unitarize), 0 when
	// none was replaced.
	Unitarized float64
	// bound maps both orientations (a, b) of a coupler of the bound graph
	// to its entangler in that orientation.
	bound map[[2]int]*[16]complex128
}

// CouplerGate is the entangler of one coupler, between the qubits labelled
// A and B (Graph.Label), in the basis 2·b_A + b_B.
type CouplerGate struct {
	A, B string
	G    [16]complex128
}

// EdgeEnsemble is an Ensemble whose gates depend on the coupler: the
// Builder calls GateOn instead of Gate, with the same draws from rng.
type EdgeEnsemble interface {
	Ensemble
	GateOn(e Edge, rng *rand.Rand, m *[16]complex128)
}

// GateOptions change how a gate-set file is read.
type GateOptions struct {
	// Unitarize replaces every matrix by its nearest unitary (NearestUnitary)
	// instead of refusing one that is unitary only to the digits written.
	Unitarize bool
}

// NewGateSet validates g and single (every matrix unitary to
// UnitaryTolerance; single nil for Haar U(2), otherwise non-empty) and
// returns the gate set named spec. Errors are *ParseError values wrapping
// ErrGateSet.
func NewGateSet(spec string, g [16]complex128, single [][4]complex128) (*GateSet, error) {
	bad := func(format string, args ...any) error {
		return &ParseError{File: spec, Err: ErrGateSet, Detail: fmt.Sprintf(format, args...)}
	}
	if dev := UnitaryDeviation(g[:], 4); !(dev <= UnitaryTolerance) {
		return nil, bad("entangler is not unitary: ‖G†G − I‖ = %.3g (max entry; tolerance %g)", dev, UnitaryTolerance)
	}
	if single != nil && len(single) == 0 {
		return nil, bad("the single-qubit set is empty: list at least one 2×2 unitary or write \"haar\"")
	}
	for k := range single {
		if dev := UnitaryDeviation(single[k][:], 2); !(dev <= UnitaryTolerance) {
			return nil, bad("single_qubit matrix %d is not unitary: ‖u†u − I‖ = %.3g (max entry; tolerance %g)", k+1, dev, UnitaryTolerance)
		}
	}
	return &GateSet{Spec: spec, G: g, Single: single}, nil
}

// Name returns the spec that selects the set.
func (s *GateSet) Name() string { return s.Spec }

// Gate draws u_a, then u_b, and writes G·(u_a ⊗ u_b) into m.
func (s *GateSet) Gate(rng *rand.Rand, m *[16]complex128) { s.gate(&s.G, rng, m) }

// GateOn is Gate with the entangler of coupler e when the set is bound to a
// graph and calibrates e, and G otherwise; the draws are those of Gate.
func (s *GateSet) GateOn(e Edge, rng *rand.Rand, m *[16]complex128) {
	if g, ok := s.bound[[2]int{e.A, e.B}]; ok {
		s.gate(g, rng, m)
		return
	}
	s.gate(&s.G, rng, m)
}

func (s *GateSet) gate(g *[16]complex128, rng *rand.Rand, m *[16]complex128) {
	var ua, ub [4]complex128
	s.single(rng, &ua)
	s.single(rng, &ub)
	var k [16]complex128
	kron2(&k, &ua, &ub)
	mul4(m, g, &k)
}

// EdgeEntanglers returns the calibrated entangler of every coupler (a, b) of
// the bound graph that has one, in the orientation (a, b) of the key; nil
// when the set is not bound or calibrates no coupler.
func (s *GateSet) EdgeEntanglers() map[[2]int][16]complex128 {
	if len(s.bound) == 0 {
		return nil
	}
	out := make(map[[2]int][16]complex128, len(s.bound))
	for k, g := range s.bound {
		out[k] = *g
	}
	return out
}

// swapped returns SWAP·g·SWAP, the gate g with its two qubits exchanged.
func swapped(g *[16]complex128) [16]complex128 {
	perm := [4]int{0, 2, 1, 3} // 2·b_a + b_b ↔ 2·b_b + b_a
	var out [16]complex128
	for i := 0; i < 4; i++ {
		for j := 0; j < 4; j++ {
			out[perm[i]*4+perm[j]] = g[i*4+j]
		}
	}
	return out
}

// Bind returns a copy of s whose calibrated couplers are resolved against g:
// each CouplerGate's labels must name qubits of g joined by a coupler, except
// that entries on qubits or couplers g.Dropped removed are skipped (a
// calibration sheet lists the broken couplers too). A coupler given twice is
// an error. Errors are *ParseError values wrapping ErrUnknownLabel,
// ErrNotInGraph or ErrDuplicateEdge.
func (s *GateSet) Bind(g *Graph) (*GateSet, error) {
	if len(s.Couplers) == 0 {
		return s, nil
	}
	bad := func(err error, format string, args ...any) error {
		return &ParseError{File: s.Spec, Err: err, Detail: fmt.Sprintf(format, args...)}
	}
	index := make(map[string]int, g.Qubits)
	for q := 0; q < g.Qubits; q++ {
		index[g.Label(q)] = q
	}
	dropped := map[string]bool{}
	for _, d := range g.Dropped {
		dropped[d] = true
	}
	out := *s
	out.bound = map[[2]int]*[16]complex128{}
	for i, c := range s.Couplers {
		a, okA := index[c.A]
		b, okB := index[c.B]
		pair := c.A + "-" + c.B
		switch {
		case (!okA && dropped[c.A]) || (!okB && dropped[c.B]) || dropped[pair] || dropped[c.B+"-"+c.A]:
			continue
		case !okA || !okB:
			return nil, bad(ErrUnknownLabel, "coupler %d names %s, but %s has no such qubit", i+1, pair, g.Name)
		case !g.HasEdge(a, b):
			return nil, bad(ErrNotInGraph, "coupler %d is %s, which %s does not couple", i+1, pair, g.Name)
		}
		if _, dup := out.bound[[2]int{a, b}]; dup {
			return nil, bad(ErrDuplicateEdge, "coupler %s is calibrated twice", pair)
		}
		m, r := c.G, swapped(&c.G)
		out.bound[[2]int{a, b}], out.bound[[2]int{b, a}] = &m, &r
	}
	return &out, nil
}

// Final draws one gate of the final single-qubit layer into m.
func (s *GateSet) Final(rng *rand.Rand, m *[4]complex128) { s.single(rng, m) }

// SecondMoments reports EntanglerMoments with G when the single-qubit gates
// are Haar, and NoMoments for a finite single-qubit set (its average does not
// project onto span{I, S}).
func (s *GateSet) SecondMoments() (MomentKind, [16]complex128) {
	if s.Single != nil {
		return NoMoments, [16]complex128{}
	}
	return EntanglerMoments, s.G
}

func (s *GateSet) single(rng *rand.Rand, m *[4]complex128) {
	if s.Single == nil {
		HaarUnitary(rng, 2, m[:])
		return
	}
	*m = s.Single[rng.IntN(len(s.Single))]
}

// MomentKind says how the exact second-moment engine treats an ensemble.
type MomentKind int

const (
	// NoMoments: the ensemble is not invariant under single-qubit Haar
	// rotations, so its two-copy average leaves span{I, S} and the exact
	// engine does not apply (GateSets with a finite single-qubit set).
	NoMoments MomentKind = iota
	// HaarMoments: every gate has the two-copy average of Haar U(4), so its
	// transfer is the Haar one (Haar, and Clifford, a 2-design). No final
	// layer: a qubit no gate touched reads out as |0⟩⟨0|^⊗2 (contribution 1).
	HaarMoments
	// EntanglerMoments: every gate is a fixed entangler G after independent
	// Haar U(2) gates on both qubits, and the circuit ends with a Haar
	// single-qubit layer (the ensemble is a Finisher). The transfer is that of
	// G; a qubit no gate touched reads out as (I+S)/6 after the final layer
	// (contribution 2/3, the collision probability of a Haar qubit state).
	EntanglerMoments
)

// String returns "none", "haar" or "entangler".
func (k MomentKind) String() string {
	switch k {
	case HaarMoments:
		return "haar"
	case EntanglerMoments:
		return "entangler"
	}
	return "none"
}

// SecondMomenter is implemented by ensembles that report how the exact
// second-moment engine must treat them.
type SecondMomenter interface {
	// SecondMoments returns the kind and, for EntanglerMoments, the
	// entangler G.
	SecondMoments() (MomentKind, [16]complex128)
}

// SecondMoments returns how the exact engine treats e: HaarMoments for Haar
// and Clifford, EntanglerMoments with the entangler g for Haar-dressed gate
// sets, and ok false (kind NoMoments) for any other ensemble.
func SecondMoments(e Ensemble) (kind MomentKind, g [16]complex128, ok bool) {
	switch e := e.(type) {
	case Haar, *Haar:
		return HaarMoments, g, true
	case SecondMomenter:
		kind, g = e.SecondMoments()
		return kind, g, kind != NoMoments
	}
	return NoMoments, g, false
}

// namedEnsemble resolves the specs NewEnsemble does not handle itself:
// "clifford", "NAME+haar1" and gate-set files.
func namedEnsemble(spec string, o GateOptions) (Ensemble, error) {
	if spec == "clifford" {
		return Clifford{}, nil
	}
	if name, ok := strings.CutSuffix(spec, "+haar1"); ok {
		if g, ok := Entangler(name); ok {
			return &GateSet{Spec: spec, G: g}, nil
		}
	}
	detail := "no such file, and not one of " + strings.Join(Ensembles, ", ")
	if st, err := os.Stat(spec); err == nil {
		if !st.IsDir() {
			return ReadGateSetFileWith(spec, o)
		}
		detail = "a directory, not a gate-set file or one of " + strings.Join(Ensembles, ", ")
	}
	return nil, &ParseError{File: spec, Err: ErrUnknownGateSet, Detail: detail}
}

// gateSetFile is the JSON form of a gate-set file.
type gateSetFile struct {
	Entangler   json.RawMessage `json:"entangler"`
	Couplers    []couplerFile   `json:"couplers"`
	SingleQubit json.RawMessage `json:"single_qubit"`
}

type couplerFile struct {
	Qubits    []json.RawMessage `json:"qubits"`
	Entangler json.RawMessage   `json:"entangler"`
}

// ReadGateSetFile reads the gate-set file at path (see ReadGateSet).
func ReadGateSetFile(path string) (*GateSet, error) {
	return ReadGateSetFileWith(path, GateOptions{})
}

// ReadGateSetFileWith reads the gate-set file at path with options (see
// ReadGateSetWith).
func ReadGateSetFileWith(path string, o GateOptions) (*GateSet, error) {
	data, err := inputfile.ReadFile(path, inputfile.SmallLimit)
	if err != nil {
		return nil, fmt.Errorf("circuits: reading gate-set file: %w", err)
	}
	return ReadGateSetWith(path, bytes.NewReader(data), o)
}

// ReadGateSet reads a gate-set file without options; see ReadGateSetWith.
func ReadGateSet(name string, r io.Reader) (*GateSet, error) {
	return ReadGateSetWith(name, r, GateOptions{})
}

// ReadGateSetWith reads a gate-set file from r; name labels errors and
// becomes the set's Spec. The format is one JSON object,
//
//	{"entangler": [[[re, im], …4 entries…], …4 rows…],
//	 "couplers": [{"qubits": ["Q1", "Q2"], "entangler": [[[re, im], …], …]}, …],
//	 "single_qubit": "haar"}
//
// or with "single_qubit": [[[[re, im], [re, im]], [[re, im], [re, im]]], …],
// a finite set of 2×2 unitaries drawn uniformly. "couplers" is optional: the
// calibrated entanglers of single couplers, named by the qubit labels of the
// graph (or numbers, written as strings or numbers), each in the basis
// 2·b_first + b_second; "entangler" is the default for the other couplers.
// Matrices are row-major, the entangler in the basis 2·b_a + b_b; rows,
// entries and matrices are counted from 1 in messages. A matrix must be
// unitary to UnitaryTolerance unless o.Unitarize, which replaces it by its
// nearest unitary. Errors are *ParseError values wrapping ErrGateSet.
func ReadGateSetWith(name string, r io.Reader, o GateOptions) (*GateSet, error) {
	bad := func(format string, args ...any) error {
		return &ParseError{File: name, Err: ErrGateSet, Detail: fmt.Sprintf(format, args...)}
	}
	dec := json.NewDecoder(r)
	dec.DisallowUnknownFields()
	var f gateSetFile
	if err := dec.Decode(&f); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			return nil, bad("invalid JSON at byte %d: %v", se.Offset, se)
		case errors.As(err, &te):
			return nil, bad("the file holds a JSON %s, want an object {\"entangler\": …, \"single_qubit\": …}", te.Value)
		case strings.HasPrefix(err.Error(), "json: unknown field "):
			// encoding/json has no typed error for DisallowUnknownFields.
			return nil, bad("%s: a gate-set file has only \"entangler\", \"couplers\" and \"single_qubit\" (a coupler only \"qubits\" and \"entangler\")", strings.TrimPrefix(err.Error(), "json: "))
		case errors.Is(err, io.ErrUnexpectedEOF):
			return nil, bad("invalid JSON: the file ends inside a value")
		case errors.Is(err, io.EOF):
			return nil, bad("the file is empty: want {\"entangler\": …, \"single_qubit\": …}")
		}
		return nil, bad("%v (want {\"entangler\": [[[re, im], …], …], \"single_qubit\": \"haar\" or [2×2 matrices]})", err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, bad("unexpected data after the JSON object")
	}
	if isNull(f.Entangler) {
		return nil, bad("missing \"entangler\": a 4×4 matrix of [re, im] pairs")
	}
	if isNull(f.SingleQubit) {
		return nil, bad("missing \"single_qubit\": \"haar\" or a list of 2×2 unitaries")
	}
	var g [16]complex128
	if err := readMatrix(f.Entangler, 4, g[:], "entangler"); err != nil {
		return nil, bad("%s", err)
	}
	var couplers []CouplerGate
	for i, c := range f.Couplers {
		what := fmt.Sprintf("coupler %d", i+1)
		if len(c.Qubits) != 2 {
			return nil, bad("%s has %d qubits; write \"qubits\": [\"A\", \"B\"]", what, len(c.Qubits))
		}
		var labels [2]string
		for k, raw := range c.Qubits {
			var str string
			var num int
			switch {
			case json.Unmarshal(raw, &str) == nil && validName(str):
				labels[k] = str
			case json.Unmarshal(raw, &num) == nil && num >= 0:
				labels[k] = strconv.Itoa(num)
			default:
				return nil, bad("%s qubit %s is not a qubit label or number", what, raw)
			}
		}
		if labels[0] == labels[1] {
			return nil, bad("%s couples %s to itself", what, labels[0])
		}
		cg := CouplerGate{A: labels[0], B: labels[1]}
		if isNull(c.Entangler) {
			return nil, bad("%s (%s-%s) has no \"entangler\"", what, cg.A, cg.B)
		}
		if err := readMatrix(c.Entangler, 4, cg.G[:], what+" entangler"); err != nil {
			return nil, bad("%s", err)
		}
		couplers = append(couplers, cg)
	}
	var single [][4]complex128
	var sname string
	if json.Unmarshal(f.SingleQubit, &sname) == nil {
		if sname != "haar" {
			return nil, bad("unknown \"single_qubit\" set %q: write \"haar\" or a list of 2×2 unitaries", sname)
		}
	} else {
		var list []json.RawMessage
		if err := json.Unmarshal(f.SingleQubit, &list); err != nil {
			return nil, bad("\"single_qubit\" must be \"haar\" or a list of 2×2 matrices of [re, im] pairs")
		}
		single = make([][4]complex128, len(list))
		for k, raw := range list {
			if err := readMatrix(raw, 2, single[k][:], fmt.Sprintf("single_qubit matrix %d", k+1)); err != nil {
				return nil, bad("%s", err)
			}
		}
	}
	var change float64
	if o.Unitarize {
		fix := func(m []complex128, d int, what string) error {
			u, c, err := NearestUnitary(m, d)
			if err != nil {
				return bad("%s: %v", what, err)
			}
			copy(m, u)
			change = max(change, c)
			return nil
		}
		if err := fix(g[:], 4, "entangler"); err != nil {
			return nil, err
		}
		for i := range couplers {
			if err := fix(couplers[i].G[:], 4, fmt.Sprintf("coupler %d entangler", i+1)); err != nil {
				return nil, err
			}
		}
		for k := range single {
			if err := fix(single[k][:], 2, fmt.Sprintf("single_qubit matrix %d", k+1)); err != nil {
				return nil, err
			}
		}
	}
	for i, c := range couplers {
		if dev := UnitaryDeviation(c.G[:], 4); !(dev <= UnitaryTolerance) {
			return nil, bad("coupler %d (%s-%s) entangler is not unitary: ‖G†G − I‖ = %.3g (max entry; tolerance %g); --unitarize replaces each matrix by its nearest unitary", i+1, c.A, c.B, dev, UnitaryTolerance)
		}
	}
	s, err := NewGateSet(name, g, single)
	if err != nil {
		var pe *ParseError
		if errors.As(err, &pe) && strings.Contains(pe.Detail, "not unitary") {
			pe.Detail += "; --unitarize replaces each matrix by its nearest unitary"
		}
		return nil, err
	}
	s.Couplers, s.Unitarized = couplers, change
	return s, nil
}

// readMatrix decodes a d×d matrix of [re, im] pairs into dst (row-major);
// what names the matrix in errors.
func readMatrix(raw json.RawMessage, d int, dst []complex128, what string) error {
	var rows []json.RawMessage
	if err := json.Unmarshal(raw, &rows); err != nil {
		return fmt.Errorf("%s must be a list of %d rows of [re, im] pairs", what, d)
	}
	if len(rows) != d {
		return fmt.Errorf("%s has %d rows, want %d", what, len(rows), d)
	}
	for i, rraw := range rows {
		var entries []json.RawMessage
		if err := json.Unmarshal(rraw, &entries); err != nil {
			return fmt.Errorf("%s row %d must be a list of %d [re, im] pairs", what, i+1, d)
		}
		if len(entries) != d {
			return fmt.Errorf("%s row %d has %d entries, want %d", what, i+1, len(entries), d)
		}
		for j, eraw := range entries {
			var p []*float64 // a pointer tells null from 0
			if err := json.Unmarshal(eraw, &p); err != nil || len(p) != 2 || p[0] == nil || p[1] == nil {
				return fmt.Errorf("%s row %d entry %d is %s, want a [re, im] pair of numbers", what, i+1, j+1, echoJSON(eraw))
			}
			dst[i*d+j] = complex(*p[0], *p[1])
		}
	}
	return nil
}

// echoJSON returns raw for a message, cut to 64 bytes.
func echoJSON(raw json.RawMessage) string {
	if len(raw) > 64 {
		return string(raw[:64]) + "…"
	}
	return string(raw)
}

func isNull(raw json.RawMessage) bool {
	return len(raw) == 0 || string(raw) == "null"
}

// unitaryDeviation returns max |(M†M − I)_ij| for the d×d row-major m, or
// +Inf when an entry is not finite.
func UnitaryDeviation(m []complex128, d int) float64 {
	var dev float64
	for i := 0; i < d; i++ {
		for j := 0; j < d; j++ {
			var s complex128
			for k := 0; k < d; k++ {
				s += cmplx.Conj(m[k*d+i]) * m[k*d+j]
			}
			if i == j {
				s--
			}
			a := cmplx.Abs(s)
			if math.IsNaN(a) {
				return math.Inf(1)
			}
			dev = max(dev, a)
		}
	}
	return dev
}

// kron2 writes a ⊗ b into dst: (a ⊗ b)[2i+j][2k+l] = a[i][k]·b[j][l], so a
// acts on the high bit (qubit a of an edge) in the basis 2·b_a + b_b.
func kron2(dst *[16]complex128, a, b *[4]complex128) {
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			for k := 0; k < 2; k++ {
				for l := 0; l < 2; l++ {
					dst[(2*i+j)*4+2*k+l] = pinned.Mul(a[2*i+k], b[2*j+l])
				}
			}
		}
	}
}

// mul4 writes the 4×4 product a·b into dst; dst must not alias a or b.
func mul4(dst, a, b *[16]complex128) {
	for i := 0; i < 4; i++ {
		for j := 0; j < 4; j++ {
			var s complex128
			for k := 0; k < 4; k++ {
				s += pinned.Mul(a[i*4+k], b[k*4+j])
			}
			dst[i*4+j] = s
		}
	}
}

// IsBuiltin reports whether the set is one of the built-in "NAME+haar1"
// sets, which a name alone rebuilds; a set read from a file is not.
func (s *GateSet) IsBuiltin() bool {
	if name, ok := strings.CutSuffix(s.Spec, "+haar1"); ok && s.Single == nil && len(s.Couplers) == 0 {
		g, known := Entangler(name)
		return known && g == s.G
	}
	return false
}

// Encode returns the canonical encoding of the set's matrices: a gate-set
// file (see ReadGateSet) on one line, without spaces, with every number in
// the shortest form that reads back to the same float64. Equal sets encode
// to equal strings, and DecodeGateSet rebuilds the set exactly to the bit.
func (s *GateSet) Encode() string {
	var b strings.Builder
	b.WriteString(`{"entangler":`)
	writeMatrix(&b, s.G[:], 4)
	if len(s.Couplers) > 0 {
		b.WriteString(`,"couplers":[`)
		for i, c := range s.Couplers {
			if i > 0 {
				b.WriteByte(',')
			}
			// Labels are made of letters, digits and _ . : -, which need no
			// JSON escaping.
			b.WriteString(`{"qubits":["` + c.A + `","` + c.B + `"],"entangler":`)
			writeMatrix(&b, c.G[:], 4)
			b.WriteByte('}')
		}
		b.WriteByte(']')
	}
	b.WriteString(`,"single_qubit":`)
	if s.Single == nil {
		b.WriteString(`"haar"`)
	} else {
		b.WriteByte('[')
		for k := range s.Single {
			if k > 0 {
				b.WriteByte(',')
			}
			writeMatrix(&b, s.Single[k][:], 2)
		}
		b.WriteByte(']')
	}
	b.WriteByte('}')
	return b.String()
}

// Digest returns the first 16 hex digits of the SHA-256 of Encode, a short
// name for the set's content (as Graph.Digest is for a graph).
func (s *GateSet) Digest() string {
	sum := sha256.Sum256([]byte(s.Encode()))
	return hex.EncodeToString(sum[:])[:16]
}

// DecodeGateSet rebuilds a gate set from its Encode form; spec becomes the
// set's Spec (the name it was recorded under, such as the original file
// path). Errors are *ParseError values wrapping ErrGateSet, labelled spec.
func DecodeGateSet(spec, enc string) (*GateSet, error) {
	return ReadGateSet(spec, strings.NewReader(enc))
}

// writeMatrix writes the d×d row-major m as rows of [re, im] pairs.
func writeMatrix(b *strings.Builder, m []complex128, d int) {
	num := func(x float64) { b.WriteString(strconv.FormatFloat(x, 'g', -1, 64)) }
	b.WriteByte('[')
	for i := 0; i < d; i++ {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteByte('[')
		for j := 0; j < d; j++ {
			if j > 0 {
				b.WriteByte(',')
			}
			b.WriteByte('[')
			num(real(m[i*d+j]))
			b.WriteByte(',')
			num(imag(m[i*d+j]))
			b.WriteByte(']')
		}
		b.WriteByte(']')
	}
	b.WriteByte(']')
}
