package scan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"mixdepth/internal/crash"
	"slices"
	"sync"

	"golang.org/x/sync/errgroup"

	"mixdepth/circuits"
	"mixdepth/sim"
	"mixdepth/stats"
)

// Config describes one scan.
type Config struct {
	Graph    *circuits.Graph
	Schedule circuits.Schedule
	Ensemble circuits.Ensemble
	// Depths are the depths to report, ascending and positive.
	Depths []int
	// Instances lists the instance ids to simulate (for a whole run,
	// 0..N−1; a part runs a subset with the same streams).
	Instances []int
	Seed      uint64
	// Workers bounds the goroutines; 0 or less means 1.
	Workers int
	// Progress, when non-nil, is called once per finished instance, from one
	// goroutine at a time.
	Progress func()
	// Precision is PrecisionDouble (complex128 amplitudes; "" means double)
	// or PrecisionSingle (complex64: half the memory, so 31 qubits fit in 16 GiB, with
	// relative errors of order 1e−6 in the collision probability; see
	// TestSinglePrecision).
	Precision Precision
}

// ExactKSQubits is the largest qubit count whose collision probability adds
// the chunk sums by halves, as stats.Collision adds the array of all
// probabilities (the scan kept that array up to this size; the sums, and
// so the tables, are unchanged bit for bit); above it they are added as
// pairwiseSum adds. At every size the read-out keeps no probability array
// (see readout.run and readout.finish), and stats.HaarKS gives the
// statistic of the sort of stats.KSHaar to rounding in usually two passes
// after the gates (one when the count is folded into the last gate pass).
const ExactKSQubits = 20

// maxWindow bounds the gates collected between two readouts before they are
// run, so that random-edge scans with far-apart depths stay in bounded
// memory.
const maxWindow = 4096

// Precision is the amplitude precision of a scan; its values are the
// spellings of the --precision flag and of the "precision" metadata key.
type Precision string

// The precisions.
const (
	PrecisionDouble Precision = "double"
	PrecisionSingle Precision = "single"
)

// Record holds one instance's statistics at one depth.
type Record struct {
	Depth     int
	GateCount int
	Instance  int
	// Collision is Z_U = Σ_x p_U(x)².
	Collision float64
	// Ratio is Z_U / Z_H.
	Ratio float64
	// KS is the Kolmogorov–Smirnov distance of the D output probabilities
	// to the Haar law Beta(1, D−1).
	KS float64
	// XEBIdeal is D·Z_U − 1, the linear cross-entropy an ideal sampler of
	// this instance scores in expectation.
	XEBIdeal float64
}

// ErrConfig is wrapped by the errors of Config.Validate (and so of Run) for
// a configuration that cannot run. Errors of memory wrap sim.ErrTooLarge
// instead.
var ErrConfig = errors.New("invalid scan configuration")

// Validate returns an error wrapping ErrConfig for a configuration that
// cannot run: no depths, depths that are not positive and strictly
// increasing, no instances, or an unknown precision. It panics if Graph,
// Schedule or Ensemble is nil.
func (c *Config) Validate() error {
	if c.Graph == nil || c.Schedule == nil || c.Ensemble == nil {
		panic("scan: Config needs Graph, Schedule and Ensemble")
	}
	bad := func(format string, args ...any) error {
		return fmt.Errorf("scan: %s: %w", fmt.Sprintf(format, args...), ErrConfig)
	}
	if len(c.Depths) == 0 {
		return bad("no depths requested")
	}
	for i, d := range c.Depths {
		if d <= 0 {
			return bad("depth %d is not positive", d)
		}
		if i > 0 && d <= c.Depths[i-1] {
			return bad("depths must be strictly increasing (%d after %d)", d, c.Depths[i-1])
		}
	}
	if len(c.Instances) == 0 {
		return bad("no instances to run")
	}
	switch c.Precision {
	case "", PrecisionDouble, PrecisionSingle:
	default:
		return bad("precision %q: use double or single", c.Precision)
	}
	return nil
}

// vector is a state vector of either precision.
type vector interface {
	Reset()
	Run(ctx context.Context, ops []sim.Op, workers int) error
	Probabilities(dst []float64, workers int) []float64
	ProbabilityBlocks(workers int, visit func(w, off int, p []float64))
	// RunVisit is sim.State.RunVisit (x amplitude pairs) or
	// sim.State64.RunVisit (x probabilities).
	RunVisit(ctx context.Context, ops []sim.Op, workers int, visit func(w, off int, x []float64)) error
}

// newVector allocates the n-qubit state of c's precision.
func (c *Config) newVector(n int) (vector, error) {
	if c.Precision == PrecisionSingle {
		return sim.NewState64(n, 0)
	}
	return sim.NewState(n, 0)
}

// instanceBytes returns the memory one instance needs: the state, plus the
// read-out's buffers (the chunk sums, the histogram and the collected
// values): up to ExactKSQubits bounded by 16 bytes per amplitude, as when
// the read-out kept the array of probabilities and its sort scratch.
func (c *Config) instanceBytes(n int) float64 {
	state := sim.StateBytes(n)
	if c.Precision == PrecisionSingle {
		state = sim.State64Bytes(n)
	}
	dim := math.Ldexp(1, n)
	if n <= ExactKSQubits {
		return state + 16*dim
	}
	return state + 8*dim/sim.ProbabilityChunk + 8*stats.DefaultKSBudget + 64<<20
}

// Run simulates the instances of c and returns their records, ordered by
// depth and then by instance id. When ctx is cancelled it stops, returns the
// records of the instances that finished (whole instances only) and
// ctx.Err(); done lists the finished instance ids in ascending order. An
// invalid c gives an error wrapping ErrConfig (see Config.Validate), and
// states the machine cannot hold an error wrapping sim.ErrTooLarge.
func Run(ctx context.Context, c *Config) (records []Record, done []int, err error) {
	if err := c.Validate(); err != nil {
		return nil, nil, err
	}
	n := c.Graph.Qubits
	workers := max(c.Workers, 1)
	// Small states: one instance per goroutine. Large ones: one instance at a
	// time with each gate split across the workers.
	concurrent := 1
	gateWorkers := workers
	if n < sim.ParallelQubits {
		concurrent, gateWorkers = min(workers, len(c.Instances)), 1
	}
	if n <= sim.MaxQubits {
		fix := "use fewer qubits"
		if concurrent > 1 {
			fix = "use fewer --workers"
		}
		if err := sim.CheckMemoryFix(float64(concurrent)*c.instanceBytes(n), fmt.Sprintf("simulating %d %d-qubit instance(s) at once (state and statistics buffers)", concurrent, n), fix); err != nil {
			return nil, nil, err
		}
	}

	byInstance := make(map[int][]Record, len(c.Instances))
	var mu sync.Mutex
	g, gctx := errgroup.WithContext(ctx)
	jobs := make(chan int)
	g.Go(func() (err error) {
		defer crash.Recover(&err)
		defer close(jobs)
		for _, id := range c.Instances {
			select {
			case jobs <- id:
			case <-gctx.Done():
				return nil
			}
		}
		return nil
	})
	for w := 0; w < concurrent; w++ {
		g.Go(func() (err error) {
			defer crash.Recover(&err)
			st, err := c.newVector(n)
			if err != nil {
				return err
			}
			ro := newReadout(n, gateWorkers)
			fresh := true // a new state is |0…0⟩ already: skip one pass of writes
			for id := range jobs {
				if !fresh {
					st.Reset()
				}
				fresh = false
				recs, ok := runInstance(gctx, c, id, n, st, ro)
				if !ok {
					return nil
				}
				mu.Lock()
				byInstance[id] = recs
				if c.Progress != nil {
					c.Progress()
				}
				mu.Unlock()
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, nil, err
	}
	for id := range byInstance {
		done = append(done, id)
	}
	slices.Sort(done)
	for k := range c.Depths {
		for _, id := range done {
			records = append(records, byInstance[id][k])
		}
	}
	return records, done, ctx.Err()
}

// runInstance simulates instance id once from st = |0…0⟩, reading off the
// statistics at each requested depth; ok is false when ctx was cancelled
// before it finished. The gates between two readouts run as one fused
// sequence (sim.Run).
func runInstance(ctx context.Context, c *Config, id, n int, st vector, ro *readout) (recs []Record, ok bool) {
	b := circuits.NewBuilder(c.Schedule, c.Ensemble, c.Seed, id)
	dim := math.Ldexp(1, n)
	zh := stats.HaarCollision(dim)
	var gates []circuits.Gate
	var final [][4]complex128
	var ops []sim.Op
	next := 0
	for step := 1; next < len(c.Depths); step++ {
		if ctx.Err() != nil {
			return nil, false
		}
		gates = b.Next(gates[:0])
		for i := range gates {
			ops = append(ops, sim.Op{A: gates[i].A, B: gates[i].B, M: gates[i].M})
		}
		if step != c.Depths[next] {
			if len(ops) >= maxWindow {
				if st.Run(ctx, ops, ro.workers) != nil {
					return nil, false
				}
				ops = ops[:0]
			}
			continue
		}
		// Ensembles that end with a single-qubit layer: apply it for the
		// readout, then undo it (single-qubit gates on distinct qubits
		// commute), so the next layers continue from the unfinished circuit
		// without a second copy of the state. Both layers fuse into the
		// neighbouring two-qubit gates.
		final, _ = circuits.FinalLayer(c.Ensemble, n, c.Seed, id, step, final)
		for q := range final {
			ops = append(ops, sim.Op{Single: true, A: q, U: final[q]})
		}
		// The read-out's first pass runs inside the last pass of the gates
		// where it can (sim.State.RunVisit).
		if ro.run(ctx, st, ops) != nil {
			return nil, false
		}
		ops = ops[:0]
		for q := range final {
			ops = append(ops, sim.Op{Single: true, A: q, U: adjoint2(&final[q])})
		}
		z, ks := ro.finish(st)
		recs = append(recs, Record{
			Depth:     step,
			GateCount: c.Schedule.GateCount(step),
			Instance:  id,
			Collision: z,
			Ratio:     z / zh,
			KS:        ks,
			XEBIdeal:  dim*z - 1,
		})
		next++
	}
	return recs, true
}

// readout holds one worker's buffers for the statistics of a state.
type readout struct {
	n, workers int
	ks         *stats.HaarKS // bins and counters, kept from state to state
	partial    []float64     // Σp² per chunk of sim.ProbabilityChunk values
}

func newReadout(n, workers int) *readout {
	return &readout{
		n: n, workers: workers, ks: stats.NewHaarKS(1<<n, workers, 0),
		partial: make([]float64, (1<<n+sim.ProbabilityChunk-1)/sim.ProbabilityChunk),
	}
}

// amplitudeVector is a vector whose amplitudes can be read in place as
// float64 pairs (sim.State).
type amplitudeVector interface {
	AmplitudeBlocks(workers int, visit func(w, off int, a []float64))
}

// foldReadout is false in the tests that compare the folded read-out with
// the read-out in passes of its own.
var foldReadout = true

// read returns the collision probability and the Porter–Thomas distance of
// st: run with no gates, then finish.
func (r *readout) read(st vector) (z, ks float64) {
	_ = r.run(context.Background(), st, nil)
	return r.finish(st)
}

// run applies ops to st and runs the first pass of the read-out of the
// resulting state, folded into the gates' last pass where sim's RunVisit
// can fold it (the fold changes neither the amplitudes nor the chunks, so
// the statistics are the same bits): a histogram count (stats.HaarKS)
// that also adds Σp² per chunk of sim.ProbabilityChunk values in the order
// of stats.Collision; on a double-precision state one loop over the
// amplitudes squares, sums and bins (stats.HaarKS.CountAmplitudes).
func (r *readout) run(ctx context.Context, st vector, ops []sim.Op) error {
	var visit func(w, off int, x []float64)
	if _, ok := st.(amplitudeVector); ok {
		visit = func(w, off int, a []float64) {
			r.partial[off/sim.ProbabilityChunk] = r.ks.CountAmplitudes(w, a)
		}
	} else {
		visit = func(w, off int, p []float64) {
			r.partial[off/sim.ProbabilityChunk] = stats.Collision(p)
			r.ks.Count(w, p)
		}
	}
	if !foldReadout {
		if err := st.Run(ctx, ops, r.workers); err != nil {
			return err
		}
		if av, ok := st.(amplitudeVector); ok {
			av.AmplitudeBlocks(r.workers, visit)
		} else {
			st.ProbabilityBlocks(r.workers, visit)
		}
		return nil
	}
	return st.RunVisit(ctx, ops, r.workers, visit)
}

// finish completes the read-out counted by run: the Porter–Thomas distance
// is stats.HaarKS's, usually after one more pass that collects the values
// of the few bins that can hold the supremum (equal to the sort of
// stats.KSHaar to rounding; on a double-precision state it squares and
// tests the amplitudes in one loop). The chunk sums are added pairwise: up
// to ExactKSQubits by halves, so that the result is stats.Collision of the
// array of all probabilities bit for bit, as the scan computed it when it
// kept that array; above, as pairwiseSum adds. Neither depends on the
// worker count.
func (r *readout) finish(st vector) (z, ks float64) {
	if av, ok := st.(amplitudeVector); ok {
		ks, _ = r.ks.FinishAmplitudes(func(visit func(w int, a []float64)) {
			av.AmplitudeBlocks(r.workers, func(w, _ int, a []float64) { visit(w, a) })
		})
	} else {
		ks, _ = r.ks.Finish(func(visit func(w int, p []float64)) {
			st.ProbabilityBlocks(r.workers, func(w, _ int, p []float64) { visit(w, p) })
		})
	}
	if r.n <= ExactKSQubits {
		return halvesSum(r.partial), ks
	}
	return pairwiseSum(r.partial), ks
}

// halvesSum adds x (of a power-of-two length) by halves, the order in which
// stats.Collision adds the chunks of a power-of-two array.
func halvesSum(x []float64) float64 {
	if len(x) == 1 {
		return x[0]
	}
	m := len(x) / 2
	return halvesSum(x[:m]) + halvesSum(x[m:])
}

// pairwiseSum adds x pairwise: rounding error O(log len(x)·ε).
func pairwiseSum(x []float64) float64 {
	if len(x) <= 8 {
		var s float64
		for _, v := range x {
			s += v
		}
		return s
	}
	m := len(x) / 2
	return pairwiseSum(x[:m]) + pairwiseSum(x[m:])
}

// adjoint2 returns the conjugate transpose of a row-major 2×2 matrix.
func adjoint2(m *[4]complex128) [4]complex128 {
	return [4]complex128{cmplx.Conj(m[0]), cmplx.Conj(m[2]), cmplx.Conj(m[1]), cmplx.Conj(m[3])}
}

// Row summarises the records of one depth.
type Row struct {
	Depth     int
	GateCount int
	Collision stats.Summary
	// Ratio is mean(Z)/Curve.Limit (Z_H for a connected chip); [Lower, Upper] is its two-sided BCa bootstrap
	// interval over instances (stats.MeanIntervalBCa). HasInterval is false,
	// and the bounds ±Inf, with fewer than stats.MinIntervalValues
	// instances: "too few instances for an interval".
	Ratio, Lower, Upper float64
	HasInterval         bool
	// KSMean is the mean Porter–Thomas (Kolmogorov–Smirnov) distance, to be
	// read against Curve.PTBaseline.
	KSMean float64
	// Verdict is the depth's state under the curve's criteria; Spread is
	// Verdict == stats.VerdictSpread ("spread" everywhere: code, JSON,
	// tables and the human report).
	Verdict stats.Verdict
	Spread  bool
	// RWithin and PTNear are the verdict's two criteria on their own
	// (stats.Criteria.RWithin, PTNear; PTNear is not judged, and false,
	// under stats.RuleCollision).
	RWithin, PTNear bool
}

// Curve is the per-depth result of a scan: one Row per depth.
type Curve struct {
	Qubits        int
	HaarCollision float64
	// Limit is the value R divides by: HaarCollision for a connected chip,
	// the product of the parts' Haar values for a chip in parts, which
	// never reaches HaarCollision (EstimateLimit).
	Limit float64
	// PTBaseline is the Porter–Thomas distance of Haar-random states of the
	// same dimension (stats.HaarPTBaseline), the reference of the second
	// criterion.
	PTBaseline stats.PTBaseline
	Criteria   stats.Criteria
	Rows       []Row
	// Depth is the recommended depth: the first depth from which every later
	// requested depth is spread (stats.RecommendedDepth); Found is false
	// when the last depth is not spread.
	Depth int
	Found bool
}

// Estimate groups records by depth and summarises each group, in
// ascending depth order, and judges each depth with the criteria c. It
// panics if c is invalid (stats.Criteria.Check) or qubits < 1.
func Estimate(qubits int, records []Record, c stats.Criteria) *Curve {
	return EstimateLimit(qubits, stats.HaarCollision(math.Ldexp(1, qubits)), records, c)
}

// EstimateLimit is Estimate with R = mean(Z)/limit (and its interval) read
// against limit instead of the Haar value 2/(D+1): the value E[Z] tends to
// on a chip in parts (moments.PartsLimit). It panics if limit is not in
// (0, 1], as well as in the cases of Estimate.
func EstimateLimit(qubits int, limit float64, records []Record, c stats.Criteria) *Curve {
	c.Check()
	if !(limit > 0 && limit <= 1) {
		panic(fmt.Sprintf("scan: EstimateLimit with limit %v outside (0, 1]", limit))
	}
	dim := math.Ldexp(1, qubits)
	s := &Curve{Qubits: qubits, HaarCollision: stats.HaarCollision(dim), Limit: limit, Criteria: c}
	if c.Rule != stats.RuleCollision {
		s.PTBaseline = stats.HaarPTBaseline(dim)
	}
	byDepth := map[int][]Record{}
	for _, r := range records {
		byDepth[r.Depth] = append(byDepth[r.Depth], r)
	}
	order := make([]int, 0, len(byDepth))
	for d := range byDepth {
		order = append(order, d)
	}
	slices.Sort(order)
	zs, ks := make([][]float64, len(order)), make([][]float64, len(order))
	for k, d := range order {
		group := byDepth[d]
		s.Rows = append(s.Rows, Row{Depth: d, GateCount: group[0].GateCount})
		for _, r := range group {
			zs[k] = append(zs[k], r.Collision)
			ks[k] = append(ks[k], r.KS)
		}
	}
	depths := make([]int, len(s.Rows))
	verdicts := make([]stats.Verdict, len(s.Rows))
	for k := range s.Rows {
		row := &s.Rows[k]
		row.Collision = stats.Summarize(zs[k])
		row.Ratio = row.Collision.Mean / s.Limit
		lo, hi, ok := stats.MeanIntervalBCa(zs[k], c.Confidence)
		row.Lower, row.Upper, row.HasInterval = lo/s.Limit, hi/s.Limit, ok
		row.KSMean = stats.Summarize(ks[k]).Mean
		row.Verdict = c.Judge(row.Lower, row.Upper, ok, row.KSMean, s.PTBaseline.Mean)
		row.Spread = row.Verdict == stats.VerdictSpread
		row.RWithin = c.RWithin(row.Lower, row.Upper, ok)
		row.PTNear = c.Rule != stats.RuleCollision && c.PTNear(row.KSMean, s.PTBaseline.Mean)
		depths[k], verdicts[k] = row.Depth, row.Verdict
	}
	s.Depth, s.Found = stats.RecommendedDepth(depths, verdicts)
	return s
}

// Reader reads the statistics of a scan's records off states of one size,
// with the buffers and bins of the scan's readout kept from state to state.
// A Reader is used by one goroutine at a time.
type Reader struct{ r *readout }

// NewReader returns a Reader for n-qubit states whose passes run on workers
// goroutines. It panics if n < 1 or n > sim.MaxQubits.
func NewReader(n, workers int) *Reader {
	if n < 1 || n > sim.MaxQubits {
		panic(fmt.Sprintf("scan: NewReader for %d qubits", n))
	}
	return &Reader{newReadout(n, max(workers, 1))}
}

// Read returns the collision probability Σ|a|⁴ of st and its Porter–Thomas
// distance (the Kolmogorov–Smirnov distance of its probabilities to
// Beta(1, D−1)), the Collision and KS of a Record. It panics if st does not
// have the Reader's qubit count.
func (r *Reader) Read(st *sim.State) (collision, ks float64) {
	if st.Qubits != r.r.n {
		panic(fmt.Sprintf("scan: Reader for %d qubits given a %d-qubit state", r.r.n, st.Qubits))
	}
	return r.r.read(st)
}

// ExactAgreementSigmas is the deviation, in standard errors, beyond which a
// Monte Carlo mean disagrees with the exact E[Z] of its depth: with a correct
// simulator a two-sided 4σ excursion has probability about 6e-5 per depth
// (normal tail), so a flag is a defect to report, not noise to hide.
const ExactAgreementSigmas = 4

// ExactDeviations returns, for each row of c, (mean Z − exact[k]) over the
// row's standard error: how many standard errors the Monte Carlo mean lies
// from the exact value exact[k] of the same depth. It is ±Inf or NaN for a
// row with no spread (one instance, or identical values). It panics unless
// len(exact) == len(c.Rows).
func (c *Curve) ExactDeviations(exact []float64) []float64 {
	if len(exact) != len(c.Rows) {
		panic("scan: ExactDeviations needs one exact value per row")
	}
	dev := make([]float64, len(c.Rows))
	for k, r := range c.Rows {
		dev[k] = (r.Collision.Mean - exact[k]) / r.Collision.StdErr
	}
	return dev
}
