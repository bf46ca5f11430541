package moments

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"mixdepth/circuits"
	"mixdepth/fixtures"
)

var updateMPS = flag.Bool("update-mps", false, "rewrite moments/testdata/mps-*.json from the vector engine")

// TestMPSGauge: in the gauge of mps.go the Haar U(4) transfer is an
// orthogonal projector (symmetric and idempotent), because the Pauli-support
// chain is reversible for π(A) ∝ 3^|A| and its non-identity block sends
// every state to the same distribution (1/5, 1/5, 3/5) (design.md §5; the
// chain is from Dalzell, Hunter-Jones, Brandão, PRX Quantum 3, 010333,
// 2022). Tolerance 1e-15: a few roundings of numbers of order 1.
func TestMPSGauge(t *testing.T) {
	m := mpsGauged(&HaarTransfer)
	for r := range 4 {
		for c := range 4 {
			if math.Abs(m[r][c]-m[c][r]) > 1e-15 {
				t.Errorf("gauged Haar transfer not symmetric at (%d, %d): %g vs %g", r, c, m[r][c], m[c][r])
			}
			var sq float64
			for k := range 4 {
				sq += m[r][k] * m[k][c]
			}
			if math.Abs(sq-m[r][c]) > 1e-15 {
				t.Errorf("gauged Haar transfer not idempotent at (%d, %d): %g vs %g", r, c, sq, m[r][c])
			}
		}
	}
	// The readout functional is parallel to a fresh qubit, (1/3, 1/3) in u.
	f := [2]float64{mpsGauge[0][0]/3 + mpsGauge[0][1]/3, mpsGauge[1][0]/3 + mpsGauge[1][1]/3}
	if math.Abs(f[1]/f[0]-mpsReadout[1]/mpsReadout[0]) > 1e-15 {
		t.Errorf("fresh state %v is not parallel to the readout %v", f, mpsReadout)
	}
}

// mpsRandomGraph returns a connected graph on n qubits: a random tree plus
// extra random edges, from a fixed seed.
func mpsRandomGraph(t *testing.T, n, extra int, seed uint64) *circuits.Graph {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 7))
	var edges []circuits.Edge
	has := map[[2]int]bool{}
	add := func(a, b int) {
		k := [2]int{min(a, b), max(a, b)}
		if a != b && !has[k] {
			has[k] = true
			edges = append(edges, circuits.Edge{A: a, B: b})
		}
	}
	for q := 1; q < n; q++ {
		add(q, rng.IntN(q))
	}
	for len(edges) < n-1+extra {
		add(rng.IntN(n), rng.IntN(n))
	}
	g, err := circuits.NewGraph("random12", n, edges)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// TestMPSExactBond: with a bond dimension that never truncates (2^6 for 12
// qubits), the MPS reproduces the vector engine, an independent
// implementation (its own tests check it against brute force), to 1e-10
// relative in E[Z] at every depth 1..30, for the three kinds of transfer
// (the check). The tolerance leaves room for the rounding of some
// thousands of SVDs of well-conditioned 4×4…128×128 blocks (about 1e-14
// each).
func TestMPSExactBond(t *testing.T) {
	graphs := []*circuits.Graph{engineGraph(t, "line:12"), engineGraph(t, "ring:10"), engineGraph(t, "grid:3x4"), mpsRandomGraph(t, 12, 6, 3)}
	depths := make([]int, 30)
	for i := range depths {
		depths[i] = i + 1
	}
	for _, gates := range []string{"haar", "cz+haar1", "iswap+haar1"} {
		ens, err := circuits.NewEnsemble(gates)
		if err != nil {
			t.Fatal(err)
		}
		tr, final, err := TransferFor(ens)
		if err != nil {
			t.Fatal(err)
		}
		var opts []CollisionOption
		if final {
			opts = append(opts, CollisionFinalLayer())
		}
		for _, g := range graphs {
			s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
			want, err := CollisionCurve(context.Background(), g, s, &tr, depths, 1, opts...)
			if err != nil {
				t.Fatal(err)
			}
			got, est, _, err := MPSCurve(context.Background(), g, s, &tr, depths, QubitOrder(g), 64, opts...)
			if err != nil {
				t.Fatal(err)
			}
			zh := 2 / (math.Ldexp(1, g.Qubits) + 1)
			for i, d := range depths {
				if rel := math.Abs(got[i]*zh-want[i]) / want[i]; rel > 1e-10 {
					t.Errorf("%s, %s, depth %d: MPS E[Z] %.15g, vector %.15g (relative %.1e)", g.Name, gates, d, got[i]*zh, want[i], rel)
				}
				if est[i] < math.Abs(got[i]*zh-want[i])/zh {
					t.Errorf("%s, %s, depth %d: error estimate %g below the true error", g.Name, gates, d, est[i])
				}
			}
		}
	}
}

// mpsGolden is an exact curve of the vector engine, kept in testdata so
// that TestMPSDefaultBond runs in seconds (the vector engine takes minutes
// at 25–26 qubits). It is regenerated with -update-mps; the vector engine
// is checked by its own tests, so this is a reference, not a pin of the
// MPS.
type mpsGolden struct {
	Graph  string    `json:"graph"`
	Depths []int     `json:"depths"`
	Ratio  []float64 `json:"ratio"`
}

func mpsLoadGolden(t *testing.T, spec string, depth int) mpsGolden {
	t.Helper()
	path := filepath.Join("testdata", "mps-"+mpsFileName(spec)+".json")
	if *updateMPS {
		g := engineGraph(t, spec)
		s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
		depths := make([]int, depth)
		for i := range depths {
			depths[i] = i + 1
		}
		z, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, depths, 2)
		if err != nil {
			t.Fatal(err)
		}
		gold := mpsGolden{Graph: spec, Depths: depths}
		zh := 2 / (math.Ldexp(1, g.Qubits) + 1)
		for _, v := range z {
			gold.Ratio = append(gold.Ratio, v/zh)
		}
		b, _ := json.MarshalIndent(gold, "", " ")
		if err := os.WriteFile(path, append(b, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (regenerate with go test ./moments/ -run MPSDefaultBond -update-mps)", err)
	}
	var gold mpsGolden
	if err := json.Unmarshal(b, &gold); err != nil {
		t.Fatal(err)
	}
	return gold
}

func mpsFileName(spec string) string {
	out := []byte(spec)
	for i, c := range out {
		if c == ':' {
			out[i] = '-'
		}
	}
	return string(out)
}

// TestMPSDefaultBond is the check at the default bond dimension
// against the vector engine: |R − R_exact| ≤ max(1e-3·(R − 1), 1e-7) at
// every depth up to the first with R − 1 < 1e-4, and the reported error
// estimate is at least the true error there.
func TestMPSDefaultBond(t *testing.T) {
	if raceEnabled {
		t.Skip("minutes under the race detector; the plain go test ./... runs it")
	}
	for _, c := range []struct {
		spec  string
		depth int
	}{{"grid:5x5", 24}, {"line:26", 52}} {
		t.Run(c.spec, func(t *testing.T) { mpsCheckDefaultBond(t, c.spec, c.depth) })
	}
}

func mpsCheckDefaultBond(t *testing.T, spec string, depth int) {
	gold := mpsLoadGolden(t, spec, depth)
	g := engineGraph(t, spec)
	s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	order := QubitOrder(g)
	bond := DefaultBondDim(Bandwidth(g, order))
	got, est, _, err := MPSCurve(context.Background(), g, s, &HaarTransfer, gold.Depths, order, bond)
	if err != nil {
		t.Fatal(err)
	}
	for i, d := range gold.Depths {
		want := gold.Ratio[i]
		diff := math.Abs(got[i] - want)
		if diff > max(1e-3*(want-1), 1e-7) {
			t.Errorf("%s, bond %d, depth %d: R = %.10g, exact %.10g (R−1 = %.3g, error %.2g)", spec, bond, d, got[i], want, want-1, diff)
		}
		if est[i] < diff {
			t.Errorf("%s, bond %d, depth %d: error estimate %.2g below the true error %.2g", spec, bond, d, est[i], diff)
		}
		if want-1 < 1e-4 {
			return
		}
	}
	t.Errorf("%s: R − 1 stays above 1e-4 up to depth %d; extend the golden curve", spec, gold.Depths[len(gold.Depths)-1])
}

// TestMPSBrickworkWall: on a long brickwork line with Haar gates a single
// domain wall loses weight 2q/(q²+1) = 4/5 per layer for q = 2
// (Hunter-Jones, arXiv:1905.12053, 2019; Dalzell, Hunter-Jones, Brandão,
// PRX Quantum 3, 010333, 2022), so once few walls are left (n·0.8^d ≪ 1)
// (R−1)(d+1)/(R−1)(d) tends to 0.8: within 1e-2 for depths 40..50. And the
// anti-concentration depth grows as ln(n)/ln(5/4) (same sources; Belkin,
// Allen, Clark, arXiv:2510.23726, 2025): from n = 100 to n = 1000 the depth
// at eps 0.01 rises by ln(10)/ln(5/4) = 10.3 layers, ± 1.5 (the issue's
// tolerance: the depth is a whole number and the boundary terms differ).
func TestMPSBrickworkWall(t *testing.T) {
	depths := make([]int, 60)
	for i := range depths {
		depths[i] = i + 1
	}
	spread := func(n int) ([]float64, int) {
		g := engineGraph(t, "line:"+itoa(n))
		s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
		r, _, _, err := MPSCurve(context.Background(), g, s, &HaarTransfer, depths, QubitOrder(g), DefaultBondDim(1))
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range r {
			if v <= 1.01 {
				return r, depths[i]
			}
		}
		t.Fatalf("line:%d does not reach R ≤ 1.01 by depth %d", n, depths[len(depths)-1])
		return nil, 0
	}
	big := 1000
	if raceEnabled {
		big = 300 // the race detector makes line:1000 take minutes; 300·0.8^40 = 0.04 ≪ 1 still
	}
	r, dBig := spread(big)
	for d := 40; d < 50; d++ {
		ratio := (r[d] - 1) / (r[d-1] - 1) // depths d+1 over d
		if math.Abs(ratio-0.8) > 1e-2 {
			t.Errorf("line:%d: (R−1) at depth %d over depth %d = %.4f, want 0.8 ± 0.01", big, d+1, d, ratio)
		}
	}
	if big == 1000 {
		_, dSmall := spread(100)
		if rise := dBig - dSmall; math.Abs(float64(rise)-10.3) > 1.5 {
			t.Errorf("anti-concentration depth at eps 0.01 rises by %d from line:100 (%d) to line:1000 (%d), want 10.3 ± 1.5", rise, dSmall, dBig)
		}
	}
}

// TestMPSDeep: deep circuits on a 100-qubit graph reach the Haar value,
// R → 1, to 1e-6 (the check; the two-copy average of a deep
// circuit of Haar gates on a connected graph converges to the Haar one,
// Brandão, Harrow, Horodecki, Commun. Math. Phys. 346, 397, 2016).
func TestMPSDeep(t *testing.T) {
	if raceEnabled {
		t.Skip("minutes under the race detector; the plain go test ./... runs it")
	}
	g := engineGraph(t, "ring:100")
	s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	order := QubitOrder(g)
	r, est, _, err := MPSCurve(context.Background(), g, s, &HaarTransfer, []int{150}, order, DefaultBondDim(Bandwidth(g, order)))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r[0]-1) > 1e-6 || est[0] > 1e-6 {
		t.Errorf("ring:100 at depth 150: R = %.10f ± %.2g, want 1 within 1e-6", r[0], est[0])
	}
}

// TestQubitOrder: the automatic order has the bandwidth of the natural
// layouts (from memory: a line and a ring in RCM order have bandwidth 1 and
// 2, a grid in row order min(R, C)), and ReadOrder rejects what is not a
// permutation.
func TestQubitOrder(t *testing.T) {
	for _, c := range []struct {
		spec string
		want int
	}{{"line:9", 1}, {"ring:10", 2}, {"grid:4x7", 4}, {"grid:6x3", 3}} {
		g := engineGraph(t, c.spec)
		if w := Bandwidth(g, QubitOrder(g)); w != c.want {
			t.Errorf("%s: bandwidth %d, want %d", c.spec, w, c.want)
		}
	}
	g := engineGraph(t, "line:4")
	for _, text := range []string{"0 1 2", "0 1 2 2", "0 1 2 4", "0 1 x 3"} {
		if _, err := ReadOrder("t", strings.NewReader(text), g); !errors.Is(err, ErrOrder) {
			t.Errorf("ReadOrder(%q): %v, want ErrOrder", text, err)
		}
	}
	if o, err := ReadOrder("t", strings.NewReader("# comment\n3, 2\n1 0\n"), g); err != nil || o[0] != 3 || o[3] != 0 {
		t.Errorf("ReadOrder: %v, %v", o, err)
	}
}

// TestMPSDemoChip is the default-bond check on the demo chip (the
// graph and layout mixdepth exact runs with no --graph, fixtures.DemoChip),
// against the vector engine on the same 16 qubits: |R − R_exact| ≤
// max(1e-3·(R − 1), 1e-7) at every depth up to the first with R − 1 < 1e-4,
// and the error estimate at least the true error there.
func TestMPSDemoChip(t *testing.T) {
	g, l := fixtures.DemoChip()
	s := l.Schedule()
	depths := make([]int, 80)
	for i := range depths {
		depths[i] = i + 1
	}
	exact, err := CollisionCurve(context.Background(), g, s, &HaarTransfer, depths, 2)
	if err != nil {
		t.Fatal(err)
	}
	order := QubitOrder(g)
	bond := DefaultBondDim(Bandwidth(g, order))
	got, est, used, err := MPSCurve(context.Background(), g, s, &HaarTransfer, depths, order, bond)
	if err != nil {
		t.Fatal(err)
	}
	zh := 2 / (math.Ldexp(1, g.Qubits) + 1)
	for i, d := range depths {
		want := exact[i] / zh
		diff := math.Abs(got[i] - want)
		if diff > max(1e-3*(want-1), 1e-7) {
			t.Errorf("demo chip, bond %d, depth %d: R = %.10g, exact %.10g (R−1 = %.3g, error %.2g)", bond, d, got[i], want, want-1, diff)
		}
		if est[i] < diff {
			t.Errorf("demo chip, bond %d, depth %d: error estimate %.2g below the true error %.2g", bond, d, est[i], diff)
		}
		if want-1 < 1e-4 {
			t.Logf("demo chip: bond %d (bandwidth %d, largest bond reached %d), checked depths 1..%d", bond, Bandwidth(g, order), used[i], d)
			return
		}
	}
	t.Errorf("demo chip: R − 1 stays above 1e-4 up to depth %d", depths[len(depths)-1])
}

// BenchmarkMPSWideLattice measures how the MPS engine's error estimate on a
// wide lattice (grid:10x10, order bandwidth 10, depths 1..20) falls with the
// bond, the figures behind the README's statement that the 1e-3·(R − 1)
// target for such lattices is not met: the largest estimate relative to
// R − 1 at depths 4..9 and at depths 10..20. One iteration at bond 128 takes
// about ten minutes of CPU; run it with
//
//	go test -run '^$' -bench MPSWideLattice -benchtime 1x ./moments/
func BenchmarkMPSWideLattice(b *testing.B) {
	g, err := circuits.ParseGraph("grid:10x10")
	if err != nil {
		b.Fatal(err)
	}
	s := &circuits.Layered{Classes: circuits.LayeredClasses(g)}
	depths := make([]int, 20)
	for i := range depths {
		depths[i] = i + 1
	}
	for _, bond := range []int{32, 64, 128} {
		b.Run(fmt.Sprintf("bond=%d", bond), func(b *testing.B) {
			for b.Loop() {
				ratio, est, _, err := MPSCurve(context.Background(), g, s, &HaarTransfer, depths, QubitOrder(g), bond)
				if err != nil {
					b.Fatal(err)
				}
				var shallow, deep float64
				for i, d := range depths {
					rel := est[i] / (ratio[i] - 1)
					switch {
					case d >= 4 && d <= 9:
						shallow = math.Max(shallow, rel)
					case d >= 10:
						deep = math.Max(deep, rel)
					}
				}
				b.ReportMetric(shallow, "maxrel_d4-9")
				b.ReportMetric(deep, "maxrel_d10-20")
			}
		})
	}
}
