package circuits_test

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/circuits"
)

// gsUnitarity returns max |(M†M − I)_ij| of the d×d row-major m.
func gsUnitarity(m []complex128, d int) float64 {
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
			dev = max(dev, cmplx.Abs(s))
		}
	}
	return dev
}

// TestEntanglerDefinitions checks each entangler against its action on the
// basis |b_a b_b⟩ (index 2·b_a + b_b), written out here from the textbook
// definitions (Nielsen & Chuang, "Quantum Computation and Quantum
// Information", 2000, for CZ and CNOT; Schuch & Siewert, PRA 67, 032301,
// 2003, for iSWAP and its square root; from memory): the matrix column of
// each basis state, and unitarity to 1e-15 (entries are 0, ±1, ±i, 1/√2).
func TestEntanglerDefinitions(t *testing.T) {
	r := 1 / math.Sqrt2
	for _, name := range circuits.EntanglerNames {
		g, ok := circuits.Entangler(name)
		if !ok {
			t.Fatalf("Entangler(%q) unknown", name)
		}
		if dev := gsUnitarity(g[:], 4); dev > 1e-15 {
			t.Errorf("%s: ‖G†G − I‖ = %g", name, dev)
		}
		for ba := 0; ba < 2; ba++ {
			for bb := 0; bb < 2; bb++ {
				in := 2*ba + bb
				var want [4]complex128
				switch name {
				case "cz": // |ab⟩ → (−1)^(ab) |ab⟩
					want[in] = complex(float64(1-2*ba*bb), 0)
				case "cnot": // |ab⟩ → |a, a⊕b⟩
					want[2*ba+(ba^bb)] = 1
				case "iswap": // |01⟩ → i|10⟩, |10⟩ → i|01⟩
					if ba == bb {
						want[in] = 1
					} else {
						want[2*bb+ba] = 1i
					}
				case "sqrt-iswap": // cos(π/4)|01⟩ + i sin(π/4)|10⟩ from |01⟩
					if ba == bb {
						want[in] = 1
					} else {
						want[in] = complex(r, 0)
						want[2*bb+ba] = complex(0, r)
					}
				}
				for out := 0; out < 4; out++ {
					if cmplx.Abs(g[out*4+in]-want[out]) > 1e-15 {
						t.Errorf("%s: ⟨%d|G|%d⟩ = %v, want %v", name, out, in, g[out*4+in], want[out])
					}
				}
			}
		}
	}
	if _, ok := circuits.Entangler("swap-ish"); ok {
		t.Error("Entangler accepted an unknown name")
	}
}

// TestEntanglerHaar1Gates checks every built-in "NAME+haar1" set: its gates
// are unitary to 1e-12 (Gram–Schmidt U(2) factors are unitary to ~1e-15 and
// one 4×4 product adds ~1e-16), and G†·gate is a product u_a ⊗ u_b: its
// realignment R[(i,k)][(j,l)] = M[2i+j][2k+l] has rank one, so all 2×2
// minors vanish (common practice: operator-Schmidt rank).
func TestEntanglerHaar1Gates(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 4))
	for _, name := range circuits.EntanglerNames {
		e, err := circuits.NewEnsemble(name + "+haar1")
		if err != nil {
			t.Fatal(err)
		}
		if e.Name() != name+"+haar1" {
			t.Errorf("Name() = %q", e.Name())
		}
		g, _ := circuits.Entangler(name)
		gd := cliffAdjoint(&g)
		for trial := 0; trial < 200; trial++ {
			var m [16]complex128
			e.Gate(rng, &m)
			if dev := gsUnitarity(m[:], 4); dev > 1e-12 {
				t.Fatalf("%s: gate not unitary, ‖M†M − I‖ = %g", name, dev)
			}
			p := cliffMul(&gd, &m)
			var r [4][4]complex128
			for i := 0; i < 2; i++ {
				for j := 0; j < 2; j++ {
					for k := 0; k < 2; k++ {
						for l := 0; l < 2; l++ {
							r[2*i+k][2*j+l] = p[(2*i+j)*4+2*k+l]
						}
					}
				}
			}
			for x := 0; x < 4; x++ {
				for y := 0; y < 4; y++ {
					for z := x + 1; z < 4; z++ {
						for w := y + 1; w < 4; w++ {
							if minor := r[x][y]*r[z][w] - r[x][w]*r[z][y]; cmplx.Abs(minor) > 1e-12 {
								t.Fatalf("%s: G†·gate is not a product of single-qubit gates (minor %g)", name, cmplx.Abs(minor))
							}
						}
					}
				}
			}
		}
		kind, eg, ok := circuits.SecondMoments(e)
		if kind != circuits.EntanglerMoments || !ok || eg != g {
			t.Errorf("%s: SecondMoments = %v, %v, want entangler with G", name, kind, ok)
		}
		if _, ok := e.(circuits.Finisher); !ok {
			t.Errorf("%s+haar1 has no final layer", name)
		}
	}
}

// gsMatrixJSON writes a d×d matrix as JSON rows of [re, im] pairs with
// strconv's shortest round-trip form, so decoding gives the same float64s.
func gsMatrixJSON(m []complex128, d int) string {
	var b strings.Builder
	b.WriteString("[")
	for i := 0; i < d; i++ {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString("[")
		for j := 0; j < d; j++ {
			if j > 0 {
				b.WriteString(", ")
			}
			v := m[i*d+j]
			fmt.Fprintf(&b, "[%v, %v]", real(v), imag(v))
		}
		b.WriteString("]")
	}
	b.WriteString("]")
	return b.String()
}

func gsWrite(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestGateSetFileMatchesBuiltin checks that a gate-set file holding the CZ
// matrix with "haar" single-qubit gates is the same ensemble as cz+haar1:
// the same second-moment description and bit-identical Builder gates and
// final layers for the same seed.
func TestGateSetFileMatchesBuiltin(t *testing.T) {
	path := gsWrite(t, "cz.json", `{"entangler": [[[1, 0], [0, 0], [0, 0], [0, 0]],
		[[0, 0], [1, 0], [0, 0], [0, 0]],
		[[0, 0], [0, 0], [1, 0], [0, 0]],
		[[0, 0], [0, 0], [0, 0], [-1, 0]]],
	 "single_qubit": "haar"}`)
	file, err := circuits.NewEnsemble(path)
	if err != nil {
		t.Fatal(err)
	}
	if file.Name() != path {
		t.Errorf("Name() = %q, want the path", file.Name())
	}
	builtin, _ := circuits.NewEnsemble("cz+haar1")
	k1, g1, _ := circuits.SecondMoments(file)
	k2, g2, _ := circuits.SecondMoments(builtin)
	if k1 != k2 || g1 != g2 {
		t.Errorf("file: %v %v, builtin: %v %v", k1, g1, k2, g2)
	}
	g, err := circuits.ParseGraph("line:5")
	if err != nil {
		t.Fatal(err)
	}
	sched := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	for inst := 0; inst < 3; inst++ {
		a := circuits.NewBuilder(sched, file, 77, inst)
		b := circuits.NewBuilder(sched, builtin, 77, inst)
		for step := 1; step <= 6; step++ {
			ga, gb := a.Next(nil), b.Next(nil)
			if len(ga) != len(gb) {
				t.Fatal("different gate counts")
			}
			for i := range ga {
				if ga[i] != gb[i] {
					t.Fatalf("instance %d step %d gate %d differs", inst, step, i)
				}
			}
			fa, _ := circuits.FinalLayer(file, g.Qubits, 77, inst, step, nil)
			fb, _ := circuits.FinalLayer(builtin, g.Qubits, 77, inst, step, nil)
			for q := range fa {
				if fa[q] != fb[q] {
					t.Fatalf("final layer differs at qubit %d", q)
				}
			}
		}
	}
}

// TestGateSetFileFinite checks a file with a finite single-qubit set
// {I, X}: every gate is CZ·(u_a ⊗ u_b) for one of the 4 pairs, each drawn
// with frequency 1/4 (counts in 8000 draws within 4 binomial standard
// errors, sd = √(8000·¼·¾) ≈ 38.7), final gates come from the set, and the
// ensemble is not reported as single-qubit invariant.
func TestGateSetFileFinite(t *testing.T) {
	id := []complex128{1, 0, 0, 1}
	x := []complex128{0, 1, 1, 0}
	cz, _ := circuits.Entangler("cz")
	path := gsWrite(t, "finite.json", fmt.Sprintf(`{"entangler": %s, "single_qubit": [%s, %s]}`,
		gsMatrixJSON(cz[:], 4), gsMatrixJSON(id, 2), gsMatrixJSON(x, 2)))
	e, err := circuits.NewEnsemble(path)
	if err != nil {
		t.Fatal(err)
	}
	set := [2][4]complex128{{1, 0, 0, 1}, {0, 1, 1, 0}}
	want := map[[16]complex128]int{}
	for a := 0; a < 2; a++ {
		for b := 0; b < 2; b++ {
			k := cliffKron(&set[a], &set[b])
			want[cliffMul(&cz, &k)] = 2*a + b
		}
	}
	rng := rand.New(rand.NewPCG(5, 6))
	var counts [4]int
	const n = 8000
	for i := 0; i < n; i++ {
		var m [16]complex128
		e.Gate(rng, &m)
		j, ok := want[m]
		if !ok {
			t.Fatalf("gate %v is not CZ·(u_a ⊗ u_b) with u in {I, X}", m)
		}
		counts[j]++
	}
	sd := math.Sqrt(n * 0.25 * 0.75)
	for j, c := range counts {
		if math.Abs(float64(c)-n/4) > 4*sd {
			t.Errorf("pair %d drawn %d times, want %d ± %.0f", j, c, n/4, 4*sd)
		}
	}
	layer, ok := circuits.FinalLayer(e, 6, 1, 2, 3, nil)
	if !ok || len(layer) != 6 {
		t.Fatalf("FinalLayer: %d gates, ok %v", len(layer), ok)
	}
	for _, u := range layer {
		if u != set[0] && u != set[1] {
			t.Errorf("final gate %v not in the set", u)
		}
	}
	if kind, _, ok := circuits.SecondMoments(e); ok || kind != circuits.NoMoments {
		t.Errorf("SecondMoments = %v, %v; a finite single-qubit set is not invariant", kind, ok)
	}
}

// TestGateSetFileErrors checks that bad gate-set files give *ParseError
// values wrapping ErrGateSet whose message names the wrong entry.
func TestGateSetFileErrors(t *testing.T) {
	cz, _ := circuits.Entangler("cz")
	czJSON := gsMatrixJSON(cz[:], 4)
	hadamard := "[[[0.7071067811865476, 0], [0.7071067811865476, 0]], [[0.7071067811865476, 0], [-0.7071067811865476, 0]]]"
	bad := cz
	bad[0] = 1.3 // (G†G)_00 = 1.69: deviation 0.69
	tests := []struct {
		name, content string
		want          []string
	}{
		{"short row", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]], [[0,0],[1,0],[0,0]], [[0,0],[0,0],[1,0],[0,0]], [[0,0],[0,0],[0,0],[1,0]]], "single_qubit": "haar"}`,
			[]string{"entangler row 2 has 3 entries, want 4"}},
		{"three rows", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]], [[0,0],[1,0],[0,0],[0,0]], [[0,0],[0,0],[1,0],[0,0]]], "single_qubit": "haar"}`,
			[]string{"entangler has 3 rows, want 4"}},
		{"not a pair", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]], [[0,0],[1,0],[0,0],[0,0]], [[0,0],[0,0],[1,0],[0,0]], [[0,0],[0,0],[0,0],[1,0,0]]], "single_qubit": "haar"}`,
			[]string{"entangler row 4 entry 4", "[re, im] pair"}},
		{"not a number", `{"entangler": [[[1,0],[0,0],[0,0],[0,0]], [[0,0],[1,0],[0,0],[0,0]], [[0,"x"],[0,0],[1,0],[0,0]], [[0,0],[0,0],[0,0],[1,0]]], "single_qubit": "haar"}`,
			[]string{"entangler row 3 entry 1"}},
		{"not unitary", fmt.Sprintf(`{"entangler": %s, "single_qubit": "haar"}`, gsMatrixJSON(bad[:], 4)),
			[]string{"entangler is not unitary", "‖G†G − I‖ = 0.69"}},
		{"single not unitary", fmt.Sprintf(`{"entangler": %s, "single_qubit": [%s, [[[1,0],[0,0]],[[0,0],[2,0]]]]}`, czJSON, hadamard),
			[]string{"single_qubit matrix 2 is not unitary", "= 3"}},
		{"single not 2x2", fmt.Sprintf(`{"entangler": %s, "single_qubit": [%s, [[[1,0],[0,0]],[[0,0],[1,0]],[[0,0],[1,0]]]]}`, czJSON, hadamard),
			[]string{"single_qubit matrix 2 has 3 rows, want 2"}},
		{"single row short", fmt.Sprintf(`{"entangler": %s, "single_qubit": [[[[1,0]],[[0,0],[1,0]]]]}`, czJSON),
			[]string{"single_qubit matrix 1 row 1 has 1 entries, want 2"}},
		{"empty set", fmt.Sprintf(`{"entangler": %s, "single_qubit": []}`, czJSON),
			[]string{"single-qubit set is empty"}},
		{"unknown set", fmt.Sprintf(`{"entangler": %s, "single_qubit": "clifford1"}`, czJSON),
			[]string{`unknown "single_qubit" set "clifford1"`}},
		{"unknown field", fmt.Sprintf(`{"entangler": %s, "single_qubit": "haar", "noise": 0.1}`, czJSON),
			[]string{`unknown field "noise"`}},
		{"missing entangler", `{"single_qubit": "haar"}`, []string{`missing "entangler"`}},
		{"missing single", fmt.Sprintf(`{"entangler": %s}`, czJSON), []string{`missing "single_qubit"`}},
		{"bad json", `{"entangler": [[[1,0],`, []string{"invalid JSON"}},
		{"not an object", `[1, 2]`, []string{"JSON array", "want an object"}},
		{"trailing data", fmt.Sprintf(`{"entangler": %s, "single_qubit": "haar"} {}`, czJSON), []string{"after the JSON object"}},
		{"empty", ``, []string{"empty"}},
	}
	for _, tc := range tests {
		path := gsWrite(t, "bad.json", tc.content)
		_, err := circuits.NewEnsemble(path)
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		var pe *circuits.ParseError
		if !errors.Is(err, circuits.ErrGateSet) || !errors.As(err, &pe) || pe.File != path {
			t.Errorf("%s: error %v is not a *ParseError for %s wrapping ErrGateSet", tc.name, err, path)
		}
		msg := err.Error()
		if !strings.HasPrefix(msg, "circuits: ") {
			t.Errorf("%s: %q lacks the package prefix", tc.name, msg)
		}
		for _, w := range tc.want {
			if !strings.Contains(msg, w) {
				t.Errorf("%s: %q does not say %q", tc.name, msg, w)
			}
		}
	}
}

// TestGateSetSpecs checks that NewEnsemble accepts every listed spec under
// its own name and rejects an unknown one with ErrUnknownGateSet.
func TestGateSetSpecs(t *testing.T) {
	for _, spec := range circuits.Ensembles {
		e, err := circuits.NewEnsemble(spec)
		if err != nil {
			t.Errorf("%s: %v", spec, err)
			continue
		}
		if e.Name() != spec {
			t.Errorf("NewEnsemble(%q).Name() = %q", spec, e.Name())
		}
		_, _, ok := circuits.SecondMoments(e)
		if !ok {
			t.Errorf("%s: built-in sets are all single-qubit invariant", spec)
		}
	}
	for _, spec := range []string{"magic", "cz+haar2", "toffoli+haar1", t.TempDir()} {
		_, err := circuits.NewEnsemble(spec)
		if !errors.Is(err, circuits.ErrUnknownGateSet) {
			t.Errorf("%q: error %v, want ErrUnknownGateSet", spec, err)
		}
	}
	if _, err := circuits.NewGateSet("x", [16]complex128{}, nil); !errors.Is(err, circuits.ErrGateSet) {
		t.Errorf("NewGateSet with a zero entangler: %v", err)
	}
}

// TestFinalStreams checks the final-layer streams: FinalLayer is ok only for
// Finishers; it is reproducible for the same (seed, instance, depth) and
// differs when any of them changes; reading final layers never changes the
// gate layers; final Haar gates are unitary (1e-12).
func TestFinalStreams(t *testing.T) {
	if l, ok := circuits.FinalLayer(circuits.Haar{}, 4, 1, 0, 1, nil); ok || len(l) != 0 {
		t.Error("Haar U(4) circuits have no final layer")
	}
	if _, ok := circuits.FinalLayer(circuits.Clifford{}, 4, 1, 0, 1, nil); ok {
		t.Error("Clifford circuits have no final layer")
	}
	e, _ := circuits.NewEnsemble("iswap+haar1")
	base, _ := circuits.FinalLayer(e, 4, 9, 2, 5, nil)
	again, _ := circuits.FinalLayer(e, 4, 9, 2, 5, make([][4]complex128, 7))
	if len(again) != 4 {
		t.Fatalf("FinalLayer returned %d gates for 4 qubits", len(again))
	}
	for q := range base {
		if base[q] != again[q] {
			t.Fatal("FinalLayer is not reproducible")
		}
		if dev := gsUnitarity(base[q][:], 2); dev > 1e-12 {
			t.Fatalf("final gate not unitary: %g", dev)
		}
	}
	for _, k := range [][3]int{{8, 2, 5}, {9, 3, 5}, {9, 2, 6}} {
		other, _ := circuits.FinalLayer(e, 4, uint64(k[0]), k[1], k[2], nil)
		if other[0] == base[0] {
			t.Errorf("(seed, instance, depth) = %v gives the same final gate as (9, 2, 5)", k)
		}
	}
	g, _ := circuits.ParseGraph("ring:6")
	sched := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	a := circuits.NewBuilder(sched, e, 3, 1)
	b := circuits.NewBuilder(sched, e, 3, 1)
	for step := 1; step <= 5; step++ {
		ga, gb := a.Next(nil), b.Next(nil)
		circuits.FinalLayer(e, g.Qubits, 3, 1, step, nil) // read out every depth of a only
		for i := range ga {
			if ga[i] != gb[i] {
				t.Fatalf("step %d: reading the final layer changed the gates", step)
			}
		}
	}
}

// TestFinalHaarTraceMoments checks that the final gates of a "+haar1" set
// are Haar on U(2) through the trace moments E|Tr u|^(2k) = k! for k ≤ d = 2
// (Diaconis & Shahshahani, "On the eigenvalues of random matrices", J. Appl.
// Probab. 31A, 49, 1994) and E|Tr u|^6 = 5 for U(2) (the number of
// permutations of 3 with no increasing subsequence longer than 2, Rains
// 1998; from memory). 20 000 draws; tolerance 4 standard errors estimated
// from the same samples.
func TestFinalHaarTraceMoments(t *testing.T) {
	e, _ := circuits.NewEnsemble("cz+haar1")
	f := e.(circuits.Finisher)
	rng := rand.New(rand.NewPCG(17, 19))
	const n = 20000
	want := []float64{1, 2, 5}
	var sum, sum2 [3]float64
	for i := 0; i < n; i++ {
		var u [4]complex128
		f.Final(rng, &u)
		a2 := math.Pow(cmplx.Abs(u[0]+u[3]), 2)
		for k, p := 0, a2; k < 3; k, p = k+1, p*a2 {
			sum[k] += p
			sum2[k] += p * p
		}
	}
	for k := range want {
		mean := sum[k] / n
		se := math.Sqrt((sum2[k]/n - mean*mean) / (n - 1))
		if math.Abs(mean-want[k]) > 4*se {
			t.Errorf("E|Tr u|^%d = %.4f ± %.4f, want %g", 2*(k+1), mean, se, want[k])
		}
	}
}

// TestGateSetEncodeRoundTrip: DecodeGateSet(Encode) rebuilds the matrices
// exactly to the bit (strconv's shortest form reads back to the same
// float64, common practice), for Haar-random entanglers and finite sets
// whose entries have all 53 mantissa bits in use, and for signed zeros; the
// encoding and the digest depend on the content only, not on the spec.
func TestGateSetEncodeRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	for trial := 0; trial < 20; trial++ {
		var g [16]complex128
		circuits.HaarUnitary(rng, 4, g[:])
		var single [][4]complex128
		if trial%2 == 1 {
			single = make([][4]complex128, 1+trial%5)
			for k := range single {
				circuits.HaarUnitary(rng, 2, single[k][:])
			}
		}
		if trial == 0 {
			negZero := math.Copysign(0, -1)
			g = [16]complex128{0: 1, 1: complex(negZero, 0), 5: complex(1, negZero), 10: 1, 15: -1}
		}
		set, err := circuits.NewGateSet("a.json", g, single)
		if err != nil {
			t.Fatal(err)
		}
		enc := set.Encode()
		back, err := circuits.DecodeGateSet("elsewhere/b.json", enc)
		if err != nil {
			t.Fatalf("trial %d: %v (encoding %s)", trial, err, enc)
		}
		if back.Spec != "elsewhere/b.json" {
			t.Errorf("trial %d: spec %q", trial, back.Spec)
		}
		same := func(a, b []complex128) bool {
			for i := range a {
				if math.Float64bits(real(a[i])) != math.Float64bits(real(b[i])) ||
					math.Float64bits(imag(a[i])) != math.Float64bits(imag(b[i])) {
					return false
				}
			}
			return true
		}
		if !same(back.G[:], set.G[:]) || len(back.Single) != len(single) || (single == nil) != (back.Single == nil) {
			t.Fatalf("trial %d: entangler or set size differs after the round trip", trial)
		}
		for k := range single {
			if !same(back.Single[k][:], single[k][:]) {
				t.Fatalf("trial %d: single-qubit matrix %d differs after the round trip", trial, k)
			}
		}
		if back.Encode() != enc || back.Digest() != set.Digest() {
			t.Errorf("trial %d: encoding or digest changed with the spec", trial)
		}
	}
}

// TestGateSetDigestSeesContent: a one-ulp change of one entry changes the
// encoding and the digest; a built-in set is recognised as built in, a file
// set with the same matrices under a path is not.
func TestGateSetDigestSeesContent(t *testing.T) {
	cz, _ := circuits.Entangler("cz")
	a, err := circuits.NewGateSet("cz+haar1", cz, nil)
	if err != nil {
		t.Fatal(err)
	}
	g := cz
	g[15] = complex(math.Nextafter(-1, 0), 0)
	b, err := circuits.NewGateSet("cz+haar1", g, nil)
	if err != nil {
		t.Fatal(err)
	}
	if a.Encode() == b.Encode() || a.Digest() == b.Digest() {
		t.Errorf("a one-ulp change is invisible: %s", a.Digest())
	}
	if !a.IsBuiltin() || b.IsBuiltin() {
		t.Errorf("IsBuiltin: %v for cz+haar1, %v for an altered matrix", a.IsBuiltin(), b.IsBuiltin())
	}
	f, _ := circuits.NewGateSet("cz.json", cz, nil)
	if f.IsBuiltin() {
		t.Error("a file set counts as built in")
	}
}
