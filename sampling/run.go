package sampling

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"math/rand/v2"
	"mixdepth/internal/crash"
	"slices"
	"sync"

	"golang.org/x/sync/errgroup"

	"mixdepth/circuits"
	"mixdepth/sim"
	"mixdepth/stats"
)

// DefaultTrajectories is the number of quantum trajectories per instance when
// Config.Trajectories is 0: an instance with gate errors simulates
// T = min(shots, DefaultTrajectories) trajectories.
const DefaultTrajectories = 100

// MaxQubits is the largest qubit count Run samples: outcomes are uint64
// indices and an Alias holds at most 2^32 outcomes.
const MaxQubits = 32

// Config describes one sampling run.
type Config struct {
	Schedule circuits.Schedule
	Ensemble circuits.Ensemble
	// Qubits is the number of qubits n of the schedule's graph.
	Qubits int
	// Depth is the number of schedule steps.
	Depth int
	Seed  uint64
	// Instances lists the instance ids to run (0..N−1 for a whole run; a
	// part of a run runs a subset with the same streams).
	Instances []int
	// Shots is the number of bitstrings drawn per instance.
	Shots int
	Noise Noise
	// Trajectories bounds the quantum trajectories per instance when the
	// noise has gate errors (HasGateErrors): T = min(Shots, Trajectories), and 0 means
	// DefaultTrajectories. See TrajectoryShots for the split of the shots.
	Trajectories int
	// SavedStateBytes bounds the memory of the ideal states an instance
	// with gate errors keeps where its trajectories branch off (at their
	// first errors, or later while their Paulis commute with the gates bit
	// for bit), so that each trajectory starts from the last one at or
	// before its branch point instead of from |0…0⟩ (the output is the same
	// bit for bit either way; see savedStates): 0 means
	// DefaultSavedStateBytes, a negative value keeps none.
	SavedStateBytes int64
	// Workers bounds the goroutines; 0 or less means 1.
	Workers int
	// Progress, when non-nil, is called once per finished instance, from one
	// goroutine at a time.
	Progress func()
}

// Result is the outcome of one instance.
type Result struct {
	Circuit *Circuit
	// Outcomes[k] is the basis index x = Σ b_q 2^q recorded by shot k, after
	// all noise.
	Outcomes []uint64
	// PIdeal[k] is the noiseless probability p_U(Outcomes[k]).
	PIdeal []float64
	// Collision is Z_U = Σ_x p_U(x)² of the noiseless output, so that D·Z_U − 1
	// is the linear cross-entropy an ideal sampler scores in expectation.
	Collision float64
	// Trajectories is the number of trajectories simulated: 0 without gate
	// errors.
	Trajectories int
}

// Samples returns the scoring input of the result: its instance id,
// collision probability and the ideal probabilities of its shots (shared,
// not copied).
func (r *Result) Samples() InstanceSamples {
	return InstanceSamples{Instance: r.Circuit.Instance, Collision: r.Collision, PIdeal: r.PIdeal}
}

// qubitRange describes the qubit counts that what takes, 2 to MaxQubits,
// for the error about n qubits outside that range.
func qubitRange(n int, what string) string {
	return fmt.Sprintf("%d qubits: %s takes 2 to %d; use a smaller graph", n, what, MaxQubits)
}

// CheckQubits returns the error that Config.Validate (what "sampling") or
// Collect (what "scoring") gives for n qubits outside 2 to MaxQubits, and
// nil for a count they take, so that a caller can refuse a graph before
// building its schedule.
func CheckQubits(n int, what string) error {
	if n < 2 || n > MaxQubits {
		return fmt.Errorf("sampling: %s: %w", qubitRange(n, what), ErrConfig)
	}
	return nil
}

// ErrConfig is wrapped by the errors of Config.Validate and by Collect's
// error for a qubit count it cannot score.
var ErrConfig = errors.New("invalid sampling configuration")

// Validate returns an error wrapping ErrConfig (or ErrNoiseRange) for a
// configuration that cannot run. It panics if Schedule or Ensemble is nil.
func (c *Config) Validate() error {
	if c.Schedule == nil || c.Ensemble == nil {
		panic("sampling: Config needs Schedule and Ensemble")
	}
	bad := func(format string, args ...any) error {
		return fmt.Errorf("sampling: %s: %w", fmt.Sprintf(format, args...), ErrConfig)
	}
	switch {
	case c.Qubits < 2 || c.Qubits > MaxQubits:
		return bad("%s", qubitRange(c.Qubits, "sampling"))
	case c.Depth < 1:
		return bad("depth %d is not positive", c.Depth)
	case c.Shots < 1:
		return bad("%d shots: need at least 1", c.Shots)
	case c.Trajectories < 0:
		return bad("%d trajectories: need at least 1 (0 for the default %d)", c.Trajectories, DefaultTrajectories)
	case len(c.Instances) == 0:
		return bad("no instances to run")
	}
	seen := make(map[int]bool, len(c.Instances))
	for _, id := range c.Instances {
		if id < 0 {
			return bad("instance id %d is negative", id)
		}
		if seen[id] {
			return bad("instance id %d is listed twice", id)
		}
		seen[id] = true
	}
	if err := c.Noise.Validate(); err != nil {
		return err
	}
	if ch := c.Noise.Chip; ch != nil {
		if ch.Qubits() != c.Qubits {
			return bad("chip noise for %d qubits on a %d-qubit circuit", ch.Qubits(), c.Qubits)
		}
		if e, ok := ch.Uncovered(c.Schedule); ok {
			return bad("chip noise has no rate for the coupler %d-%d of the schedule", e.A, e.B)
		}
	}
	return nil
}

// HasGateErrors reports whether the noise of c puts Pauli errors in the
// circuit, so that instances need trajectories: a non-zero GateError, or a
// Chip with a non-zero coupler rate, or a non-zero single-qubit rate when
// the ensemble has single-qubit gates.
func (c *Config) HasGateErrors() bool {
	if c.Noise.GateError > 0 {
		return true
	}
	ch := c.Noise.Chip
	if ch == nil {
		return false
	}
	return slices.ContainsFunc(ch.Pair, nonZero) || (hasSingleGates(c.Ensemble) && slices.ContainsFunc(ch.Single, nonZero))
}

func nonZero(v float64) bool { return v != 0 }

// hasSingleGates reports whether the circuits of e have single-qubit
// gates: the dressing of a *circuits.GateSet or a final layer.
func hasSingleGates(e circuits.Ensemble) bool {
	_, dressed := e.(*circuits.GateSet)
	_, final := e.(circuits.Finisher)
	return dressed || final
}

// TrajectoriesPerInstance returns the number of quantum trajectories each
// instance simulates: 0 without gate errors (HasGateErrors), else
// T = min(Shots, Trajectories), with DefaultTrajectories for a zero
// Trajectories.
func (c *Config) TrajectoriesPerInstance() int {
	if !c.HasGateErrors() {
		return 0
	}
	t := c.Trajectories
	if t == 0 {
		t = DefaultTrajectories
	}
	return min(c.Shots, t)
}

// TrajectoryShots splits shots among t trajectories as evenly as possible:
// the first shots mod t trajectories take ⌈shots/t⌉ shots, the others
// ⌊shots/t⌋, in trajectory order, so shot k belongs to one trajectory
// determined by k alone. It panics unless 1 ≤ t ≤ shots.
func TrajectoryShots(shots, t int) []int {
	if t < 1 || t > shots {
		panic(fmt.Sprintf("sampling: %d shots over %d trajectories", shots, t))
	}
	out := make([]int, t)
	for i := range out {
		out[i] = shots / t
		if i < shots%t {
			out[i]++
		}
	}
	return out
}

// ShotStream returns the random stream of the shot draws (depolarizing,
// outcomes, readout flips) of instance i at depth d of a run with seed s. It
// is a ChaCha8 generator keyed by "mixshots" and (s, i, d), apart from the
// circuit's streams (circuits.Stream, circuits.FinalStream) and from
// ErrorStream.
func ShotStream(seed uint64, instance, depth int) *rand.Rand {
	return keyedStream("mixshots", seed, instance, depth)
}

// ErrorStream returns the random stream of the Pauli errors of instance i at
// depth d of a run with seed s: a ChaCha8 generator keyed by "mixpauli" and
// (s, i, d). Trajectory after trajectory, it draws for each gate in order
// whether an error occurs and which Pauli (nothing for a gate whose rate is
// 0).
func ErrorStream(seed uint64, instance, depth int) *rand.Rand {
	return keyedStream("mixpauli", seed, instance, depth)
}

// SingleErrorStream returns the random stream of the single-qubit Pauli
// errors of instance i at depth d of a run with seed s: a ChaCha8 generator
// keyed by "mix1qerr" and (s, i, d), apart from ErrorStream so that the
// two-qubit errors draw the same with or without single-qubit errors.
// Trajectory after trajectory, it draws for each gate in order, qubit A
// then B, whether an error follows the qubit's single-qubit gate and which
// of X, Y, Z, then the same for the final layer qubit by qubit; nothing for
// a qubit whose rate is 0. It is used only when some single-qubit rate is
// non-zero.
func SingleErrorStream(seed uint64, instance, depth int) *rand.Rand {
	return keyedStream("mix1qerr", seed, instance, depth)
}

func keyedStream(tag string, seed uint64, instance, depth int) *rand.Rand {
	var key [32]byte
	copy(key[:8], tag)
	binary.LittleEndian.PutUint64(key[8:], seed)
	binary.LittleEndian.PutUint64(key[16:], uint64(instance))
	binary.LittleEndian.PutUint64(key[24:], uint64(depth))
	return rand.New(rand.NewChaCha8(key))
}

// bytesPerInstance is the memory one instance in flight needs: the state,
// the ideal probabilities and their alias table, and with gate errors one
// more probability vector and alias table for the trajectories (the table
// only when aliasReplay cannot do without it), the saved
// ideal states (at most savedStates), plus the recorded shots.
func (c *Config) bytesPerInstance() float64 {
	dim := float64(uint64(1) << c.Qubits)
	need := sim.StateBytes(c.Qubits) + 8*dim + 16*dim
	if c.HasGateErrors() {
		need += 8*dim + 16*dim
	}
	need += float64(c.savedStates()) * sim.StateBytes(c.Qubits)
	return need + 16*float64(c.Shots)
}

// DefaultSavedStateBytes is the memory for saved ideal states of an
// instance with gate errors when Config.SavedStateBytes is 0: 256 MiB.
const DefaultSavedStateBytes = 256 << 20

// savedStates returns the largest number of ideal states an instance with
// gate errors keeps: as many as fit in SavedStateBytes, and no more than
// one per trajectory (0 for a negative budget or without gate errors).
//
// A trajectory agrees with the ideal circuit up to its first error, and
// its error draws do not depend on the state, so an instance first replays
// its error streams to learn where every trajectory branches off
// (branchPoints), keeps the ideal state there (checkpointsFor), and starts
// each trajectory from the last one at or before its branch point instead
// of from |0…0⟩: the same values as the same gate calls on the same
// amplitudes, so its state, and so the output, is the same bit for bit.
func (c *Config) savedStates() int {
	if !c.HasGateErrors() {
		return 0
	}
	budget := c.SavedStateBytes
	switch {
	case budget < 0:
		return 0
	case budget == 0:
		budget = DefaultSavedStateBytes
	}
	return min(c.TrajectoriesPerInstance(), int(float64(budget)/sim.StateBytes(c.Qubits)))
}

// checkpointsFor returns at most m gate counts, ascending, after which the
// ideal run keeps its state, chosen among the branch points firsts of the
// trajectories (branchPoint; −1 for a trajectory without errors) so as to
// minimise the gates the trajectories re-run: a trajectory branching at b
// starts from the largest checkpoint c ≤ b and re-runs b − c gates before
// it (from |0…0⟩, c = 0). With room for every distinct branch point that is
// all of them; otherwise the choice is the exact optimum of a dynamic
// programme over the k distinct branch points, O(m·k²) steps with k ≤ the
// trajectories.
func checkpointsFor(firsts []int, m int) []int {
	var sorted []int
	for _, f := range firsts {
		if f > 0 {
			sorted = append(sorted, f)
		}
	}
	slices.Sort(sorted)
	var pos, count []int // distinct first errors > 0, ascending, and their trajectories
	for _, f := range sorted {
		if len(pos) > 0 && pos[len(pos)-1] == f {
			count[len(count)-1]++
			continue
		}
		pos, count = append(pos, f), append(count, 1)
	}
	if m <= 0 || len(pos) == 0 {
		return nil
	}
	if m >= len(pos) {
		return pos
	}
	k := len(pos)
	// Prefix sums: n[j] trajectories and g[j] gates Σ count·pos over pos[..j).
	n, g := make([]int, k+1), make([]int, k+1)
	for x := range k {
		n[x+1], g[x+1] = n[x]+count[x], g[x]+count[x]*pos[x]
	}
	// span(i, j): the gates re-run by the trajectories with first errors
	// pos[i..j) when they start from pos[i] (from 0 for i = −1).
	span := func(i, j int) int {
		if i < 0 {
			return g[j]
		}
		return g[j] - g[i] - pos[i]*(n[j]-n[i])
	}
	const inf = int(^uint(0) >> 1)
	// best[u][i]: the least cost of the trajectories with first errors
	// pos[..i) using u checkpoints, the last at pos[i−1] (u ≥ 1), and from[u][i]
	// the position of the previous one (0 for none).
	best := make([][]int, m+1)
	from := make([][]int, m+1)
	for u := range best {
		best[u] = make([]int, k+1)
		from[u] = make([]int, k+1)
		for i := range best[u] {
			best[u][i] = inf
		}
	}
	best[0][0] = 0
	for u := 1; u <= m; u++ {
		for i := u; i <= k; i++ { // last checkpoint pos[i−1]
			for j := u - 1; j < i; j++ { // previous last checkpoint pos[j−1] (none for j = 0)
				if best[u-1][j] == inf {
					continue
				}
				if v := best[u-1][j] + span(j-1, i-1); v < best[u][i] {
					best[u][i], from[u][i] = v, j
				}
			}
		}
	}
	// The trajectories after the last checkpoint pos[i−1] re-run from it.
	bu, bi, bv := 0, 0, span(-1, k)
	for u := 1; u <= m; u++ {
		for i := u; i <= k; i++ {
			if best[u][i] == inf {
				continue
			}
			if v := best[u][i] + span(i-1, k); v < bv {
				bu, bi, bv = u, i, v
			}
		}
	}
	out := make([]int, 0, bu)
	for u, i := bu, bi; u > 0; u-- {
		out = append(out, pos[i-1])
		i = from[u][i]
	}
	slices.Reverse(out)
	return out
}

// Run simulates and samples the instances of c. It calls emit with each
// instance's Result in ascending instance order, from one goroutine at a
// time; an error from emit stops the run and is returned. When ctx is
// cancelled, Run stops, still emits the instances that had finished (whole
// instances only, ascending) and returns ctx.Err(). done lists the emitted
// instance ids in ascending order.
//
// Small states run one instance per goroutine; states of at least
// sim.ParallelQubits qubits run one instance at a time with each gate split
// across the workers. Every random choice of instance i comes from streams
// keyed by (Seed, i) alone, so results do not depend on Workers or on the
// other instances listed.
func Run(ctx context.Context, c *Config, emit func(*Result) error) (done []int, err error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	ids := slices.Clone(c.Instances)
	slices.Sort(ids)
	workers := max(c.Workers, 1)
	concurrent, gateWorkers := 1, workers
	if c.Qubits < sim.ParallelQubits {
		concurrent, gateWorkers = min(workers, len(ids)), 1
	}
	fix := "use fewer qubits"
	if concurrent > 1 {
		fix = "use fewer --workers"
	}
	if err := sim.CheckMemoryFix(float64(concurrent)*c.bytesPerInstance(),
		fmt.Sprintf("sampling %d %d-qubit instance(s) at once (state, probabilities, alias tables, shots)", concurrent, c.Qubits), fix); err != nil {
		return nil, err
	}

	results := make([]*Result, len(ids))
	next := 0 // results[:next] have been emitted
	var mu sync.Mutex
	var emitErr error
	flush := func() { // with mu held
		for next < len(results) && results[next] != nil && emitErr == nil {
			if emitErr = emit(results[next]); emitErr == nil {
				done = append(done, ids[next])
			}
			results[next] = nil
			next++
		}
	}

	g, gctx := errgroup.WithContext(ctx)
	jobs := make(chan int)
	g.Go(func() (err error) {
		defer crash.Recover(&err)
		defer close(jobs)
		for j := range ids {
			select {
			case jobs <- j:
			case <-gctx.Done():
				return nil
			}
		}
		return nil
	})
	for range concurrent {
		g.Go(func() (err error) {
			defer crash.Recover(&err)
			w, err := newWorker(c, gateWorkers)
			if err != nil {
				return err
			}
			for j := range jobs {
				r, ok := w.instance(gctx, ids[j])
				if !ok {
					return nil
				}
				mu.Lock()
				results[j] = r
				if c.Progress != nil {
					c.Progress()
				}
				flush()
				err := emitErr
				mu.Unlock()
				if err != nil {
					return err
				}
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return done, err
	}
	// After a cancellation some later instances may have finished while an
	// earlier one had not: emit them too, still in ascending order.
	for j := next; j < len(results); j++ {
		if results[j] == nil {
			continue
		}
		if err := emit(results[j]); err != nil {
			return done, err
		}
		done = append(done, ids[j])
	}
	return done, ctx.Err()
}

// worker holds the buffers of one goroutine.
type worker struct {
	c            *Config
	workers      int
	st           *sim.State
	ideal, noisy []float64
	idealTable   Alias
	noisyTable   Alias
	// replay draws a trajectory's few shots without building noisyTable.
	replay aliasReplay
	// saved[j] is the ideal state after the first at[j] gates of the
	// current instance (checkpointsFor); buffers grow up to
	// Config.savedStates.
	at    []int
	saved [][]complex128
	// uses[j] counts the trajectories still to start from saved[j]: the
	// last one swaps buffers with it instead of copying it.
	uses []int
	// pairs[k] holds the qubits (A, B) of gate k of the current instance.
	pairs [][2]int
	// dressing holds the single-qubit error rates and matrices, nil
	// without single-qubit errors.
	dressing *dressing
}

func newWorker(c *Config, workers int) (*worker, error) {
	st, err := sim.NewState(c.Qubits, 0)
	if err != nil {
		return nil, err
	}
	w := &worker{c: c, workers: workers, st: st, ideal: make([]float64, len(st.Amp))}
	if c.HasGateErrors() {
		w.noisy = make([]float64, len(st.Amp))
		w.dressing = newDressing(c)
	}
	return w, nil
}

// branchPoints replays the error streams of instance id (ErrorStream and,
// with single-qubit errors, SingleErrorStream) as the trajectories will
// draw them and returns the branch point (branchPoint) of each of t
// trajectories, −1 for a trajectory without errors. The draws do not
// depend on the state, so the replay costs no simulation.
func (w *worker) branchPoints(circ *Circuit, rates []float64, singles *singleErrors, id, t int) []int {
	c := w.c
	errs := ErrorStream(c.Seed, id, c.Depth)
	var singleRng *rand.Rand
	if singles != nil {
		singleRng = SingleErrorStream(c.Seed, id, c.Depth)
	}
	paulis := make([]uint8, len(rates))
	points := make([]int, t)
	for j := range points {
		first := drawTrajectory(errs, singleRng, rates, singles, paulis)
		points[j] = -1
		if first >= 0 {
			points[j] = w.branchPoint(first, paulis, singles)
		}
	}
	return points
}

// drawTrajectory draws one trajectory's errors: the Pauli of every gate
// into paulis (rate rates[i], from errs) and, with singles, its
// single-qubit errors (from singleRng, into singles), and returns the first
// gate with an error of either kind, −1 for none. branchPoints and the
// trajectories both draw through it, so the replay sees the same errors.
func drawTrajectory(errs, singleRng *rand.Rand, rates []float64, singles *singleErrors, paulis []uint8) int {
	first := -1
	for i := range paulis {
		paulis[i] = uint8(drawPauli(errs, rates[i]))
		if first < 0 && paulis[i] != 0 {
			first = i
		}
	}
	if singles != nil {
		if f := singles.draw(singleRng); f >= 0 && (first < 0 || f < first) {
			first = f
		}
	}
	return first
}

// branchPoint returns the number of gates b after which the trajectory
// whose first error is gate first (GateCount for the final layer) leaves
// the ideal circuit for good: up to gate b its state is the ideal state
// after b gates with its Pauli errors so far applied to it, so
// it can start there. A Pauli's 4×4 product (sim.State.Apply2) multiplies
// each amplitude by ±1 or ±i, exactly, and the others by 0, adding only
// zeros: it gives a signed permutation of the amplitudes whichever state it
// acts on, up to the signs of zeros, which no later product or sum, nor any
// probability, can tell. That holds up to the first later gate that touches a
// qubit an error acted on, or that has a single-qubit error (not a Pauli
// once moved past G), or the final layer: any other gate acts on qubits the
// Paulis leave alone, on groups of amplitudes that the Paulis permute and
// multiply by a sign, and a product or sum of negated values is the negated
// result, bit for bit. A phase ±i (an odd number of Y factors so far) would
// need the kernels to treat real and imaginary parts alike, which nothing
// promises, so the trajectory branches at the next gate then.
func (w *worker) branchPoint(first int, paulis []uint8, s *singleErrors) int {
	dressed := func(k int) bool { return s != nil && s.gate != nil && s.gate[k] != 0 }
	if first >= len(w.pairs) || dressed(first) {
		return first
	}
	var support uint64 // qubits an error acted on
	ys := 0            // Y factors so far
	add := func(k int) {
		p := paulis[k]
		if p/4 != 0 {
			support |= 1 << w.pairs[k][0]
		}
		if p%4 != 0 {
			support |= 1 << w.pairs[k][1]
		}
		ys += b2i(p/4 == 2) + b2i(p%4 == 2)
	}
	add(first)
	for k := first + 1; k < len(w.pairs); k++ {
		if ys%2 == 1 || dressed(k) || support&(1<<w.pairs[k][0]|1<<w.pairs[k][1]) != 0 {
			return k
		}
		if paulis[k] != 0 {
			add(k)
		}
	}
	return len(w.pairs)
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// runIdeal resets w.st and runs the noiseless circuit, gate by gate as
// Circuit.runNoisy does, copying the state after the first w.at[j] gates
// into w.saved[j].
func (w *worker) runIdeal(ctx context.Context, circ *Circuit) bool {
	for len(w.saved) < len(w.at) {
		// As the state's own vector: the last trajectory from a saved
		// state takes its buffer (runTrajectory).
		w.saved = append(w.saved, sim.NewAmplitudes(w.st.Qubits))
	}
	w.st.Reset()
	k, j := 0, 0
	for _, step := range circ.Steps {
		if ctx.Err() != nil {
			return false
		}
		for i := range step {
			g := &step[i]
			w.st.Apply2(g.A, g.B, &g.M, w.workers)
			k++
			if j < len(w.at) && w.at[j] == k {
				copyAmplitudes(w.saved[j], w.st.Amp, w.workers)
				j++
			}
		}
	}
	for q := range circ.Final {
		w.st.Apply1(q, &circ.Final[q], w.workers)
	}
	return true
}

// copyAmplitudes copies src into dst (of the same length), split into
// contiguous halves, quarters… across workers goroutines for states of at
// least sim.ParallelQubits qubits, as the gates are: a saved state's copy
// goes to memory no recent pass has touched, and one core alone does not
// reach the bandwidth of the copy.
func copyAmplitudes(dst, src []complex128, workers int) {
	if workers <= 1 || len(src) < 1<<sim.ParallelQubits {
		copy(dst, src)
		return
	}
	var wg sync.WaitGroup
	chunk := (len(src) + workers - 1) / workers
	for lo := 0; lo < len(src); lo += chunk {
		hi := min(lo+chunk, len(src))
		wg.Go(func() { copy(dst[lo:hi], src[lo:hi]) })
	}
	wg.Wait()
}

// setCheckpoints sets w.at to at most m checkpoints for the trajectories
// with branch points points (checkpointsFor) and w.uses to the number of
// trajectories that will start from each.
func (w *worker) setCheckpoints(points []int, m int) {
	w.at = checkpointsFor(points, m)
	w.uses = append(w.uses[:0], make([]int, len(w.at))...)
	for _, b := range points {
		if j := w.checkpoint(b); b >= 0 && j >= 0 {
			w.uses[j]++
		}
	}
}

// checkpoint returns the index j of the last saved state at or before
// the branch point b (w.at[j] ≤ b), −1 for none.
func (w *worker) checkpoint(b int) int {
	j, found := slices.BinarySearch(w.at, b)
	if !found {
		j--
	}
	return j
}

// runTrajectory sets w.st to the state of the trajectory whose first error
// is gate first, with the errors paulis and singles: from the last saved
// ideal state at or before its branch point (or |0…0⟩) with the Paulis
// before that state applied to it, the remaining gates with
// their errors in the order of Circuit.runNoisy, then the final layer.
func (w *worker) runTrajectory(ctx context.Context, circ *Circuit, first int, paulis []uint8, singles *singleErrors) bool {
	j := w.checkpoint(w.branchPoint(first, paulis, singles))
	from := 0
	if j < 0 {
		w.st.Reset()
	} else {
		from = w.at[j]
		if w.uses[j]--; w.uses[j] == 0 {
			// The last trajectory from this state takes its buffer, and
			// leaves its own in its place, never read again.
			w.st.Amp, w.saved[j] = w.saved[j], w.st.Amp
		} else {
			copyAmplitudes(w.st.Amp, w.saved[j], w.workers)
		}
		// Between first and the branch point every error is a Pauli.
		for k := first; k < from; k++ {
			if paulis[k] != 0 {
				w.st.Apply2(w.pairs[k][0], w.pairs[k][1], &pauliMatrices[paulis[k]], w.workers)
			}
		}
	}
	st, k := w.st, 0
	for _, step := range circ.Steps {
		if k+len(step) <= from {
			k += len(step)
			continue
		}
		if ctx.Err() != nil {
			return false
		}
		for i := range step {
			if k < from {
				k++
				continue
			}
			g := &step[i]
			st.Apply2(g.A, g.B, &g.M, w.workers)
			if singles != nil && singles.gate != nil && singles.gate[k] != 0 {
				st.Apply2(g.A, g.B, &singles.mats[k][singles.gate[k]], w.workers)
			}
			if paulis[k] != 0 {
				st.Apply2(g.A, g.B, &pauliMatrices[paulis[k]], w.workers)
			}
			k++
		}
	}
	for q := range circ.Final {
		st.Apply1(q, &circ.Final[q], w.workers)
		if singles != nil && singles.final != nil && singles.final[q] != 0 {
			st.Apply1(q, &onePauli[singles.final[q]], w.workers)
		}
	}
	return true
}

// instance runs instance id; ok is false when ctx was cancelled first.
func (w *worker) instance(ctx context.Context, id int) (r *Result, ok bool) {
	c := w.c
	circ := Build(c.Schedule, c.Ensemble, c.Qubits, c.Seed, id, c.Depth)
	r = &Result{Circuit: circ, Trajectories: c.TrajectoriesPerInstance()}
	var rates []float64
	var singles *singleErrors
	if r.Trajectories > 0 {
		rates = w.gateRates(circ)
		if w.dressing != nil {
			singles = w.dressing.errors(circ)
		}
	}
	// Without saved states (SavedStateBytes < 0) every trajectory runs
	// from |0…0⟩ through Circuit.runNoisy: the method the saved states
	// are checked against.
	branch := c.savedStates() > 0
	w.at = nil
	if branch {
		w.pairs = w.pairs[:0]
		for _, step := range circ.Steps {
			for _, g := range step {
				w.pairs = append(w.pairs, [2]int{g.A, g.B})
			}
		}
		w.setCheckpoints(w.branchPoints(circ, rates, singles, id, r.Trajectories), c.savedStates())
		if !w.runIdeal(ctx, circ) {
			return nil, false
		}
	} else {
		w.st.Reset()
		if !circ.runFrom(ctx, w.st, 0, nil, w.workers, nil) {
			return nil, false
		}
	}
	w.ideal = w.st.Probabilities(w.ideal, w.workers)
	r.Collision = stats.Collision(w.ideal)
	shots := ShotStream(c.Seed, id, c.Depth)
	out := make([]uint64, 0, c.Shots)
	w.idealTable.Reset(w.ideal)
	if r.Trajectories == 0 {
		out = DrawShots(out, shots, &w.idealTable, c.Qubits, c.Shots, c.Noise)
	} else {
		errs := ErrorStream(c.Seed, id, c.Depth)
		paulis := make([]uint8, circ.GateCount())
		var singleRng *rand.Rand
		if singles != nil {
			singleRng = SingleErrorStream(c.Seed, id, c.Depth)
		}
		for _, k := range TrajectoryShots(c.Shots, r.Trajectories) {
			if ctx.Err() != nil {
				return nil, false
			}
			first := drawTrajectory(errs, singleRng, rates, singles, paulis)
			table := &w.idealTable
			if first >= 0 { // a trajectory without errors is the ideal circuit
				if branch {
					if !w.runTrajectory(ctx, circ, first, paulis, singles) {
						return nil, false
					}
				} else {
					w.st.Reset()
					if !circ.runNoisy(ctx, w.st, 0, paulis, singles, w.workers, nil) {
						return nil, false
					}
				}
				// The probabilities with their sum, in one pass (weightsOf),
				// and the shots DrawShots draws from the table of w.noisy,
				// mostly without building it (aliasReplay).
				var tot weightTotals
				w.noisy, tot = weightsOf(w.st.Amp, w.noisy)
				out = w.replay.drawShotsTotals(out, shots, w.noisy, tot, &w.noisyTable, c.Qubits, k, c.Noise)
				continue
			}
			out = DrawShots(out, shots, table, c.Qubits, k, c.Noise)
		}
	}
	r.Outcomes = out
	r.PIdeal = make([]float64, len(out))
	for k, x := range out {
		r.PIdeal[k] = w.ideal[x]
	}
	return r, true
}
