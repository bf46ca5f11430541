// Package sampling runs and scores the sampling benchmark: it simulates
// seeded random circuits exactly, draws bitstrings from their output
// distributions under a stated noise model, writes and reads the circuits as
// JSON so that the same circuits can go to hardware, and scores sample
// tables with the cross-entropy benchmarks.
//
// Sampling. Each shot is drawn in O(1) from a Walker alias table (Alias) of
// the output distribution, built once per distribution in O(D), D = 2^n. A
// trajectory with errors, which draws only its few shots from its own
// distribution, gets the same outcomes from the same draws without the
// table (aliasReplay): from sums of the distribution that prove each
// outcome, or by repeating the table's pairing up to the outcomes it needs.
// Noise (Noise) has three independent parts: Pauli errors after two-qubit
// gates, simulated by quantum trajectories (each instance runs
// T = min(shots, Config.Trajectories) trajectories, default 100, with the
// shots split as evenly as possible by TrajectoryShots; a trajectory
// without errors reuses the ideal distribution; the shots of a trajectory
// share its errors, so they are independent draws of the noisy mixture only
// when T = shots); global depolarizing with
// fidelity f; and independent readout bit flips. Noise.Chip (a
// circuits.ChipNoise, e.g. from a calibration file) gives the same parts
// element by element, plus single-qubit Pauli errors after the
// single-qubit gates of dressed gate sets and final layers. The recorded
// p_ideal is always the noiseless probability of the recorded outcome.
//
// Streams. Instance i of a run with seed s at depth d draws its gates from
// circuits.Stream(s, i), its final single-qubit layer (gate sets that have
// one) from circuits.FinalStream(s, i, d), its Pauli errors from
// ErrorStream(s, i, d), its single-qubit errors (only when a single-qubit
// rate is non-zero) from SingleErrorStream(s, i, d) and its shots from
// ShotStream(s, i, d): ChaCha8 generators with distinct keys. Results depend on (s, i, d) alone, not on
// workers or on how a run is split into parts.
//
// Scoring (Boixo et al. 2018, Nature Physics 14, 595; Arute et al. 2019,
// Nature 574, 505), per instance and pooled:
//
//	F_lin = D·mean_k p(x_k) − 1,          stderr D·sd p/√N
//	F_log = ln D + γ + mean_k ln p(x_k),  stderr sd ln p/√N
//
// An ideal sampler gives E[F_lin] = D·Z_U − 1 with Z_U = Σ_x p_U(x)², which
// tends to (D−1)/(D+1) once the circuits anti-concentrate; Score reports
// F_lin/(D·Z_U − 1) as the fidelity estimate and flags tables whose circuits
// have not anti-concentrated, where the raw F_lin overstates the fidelity.
//
// Prediction. ErrorModel is the digital error model (Arute et al. 2019,
// Nature 574, 505): a circuit's fidelity is the product of its gate,
// depolarizing and readout fidelities, with the gates counted by
// CountGates; Noise.ErrorModel gives the model of a sampling noise model.
// PlanExperiment plans a measurement: F is the exact expected linear XEB
// under a circuits.ChipNoise (moments.Exact with moments.ExactNoise) when an
// exact engine fits, else the digital model; PlanShots gives the shots, and
// PlanSplit the cheapest circuits × shots of the two-stage design (Cochran,
// Sampling Techniques, 1977, §10.6) for the circuit-to-circuit variance of a
// scan or the Haar floor (HaarXEBVariance).
//
// Files. The circuit file (WriteCircuits, ReadCircuits) is JSON of this
// project's own design, described at CircuitFile. A sample table holds one
// row per shot (SampleFields) in an Arrow or Parquet file of package tables
// (WriteSampleTable); ReadSampleTable reads it back, or measured data as a
// CSV file with at least the columns instance,bitstring (ReadCSV).
//
// Errors. Data errors are *RowError and *CircuitFileError values that name
// the row or field and wrap a sentinel (ErrEmpty, ErrColumn, ErrColumnType,
// ErrNull, ErrNotNumber, ErrBitstring, ErrInstance, ErrProbability,
// ErrMismatch; ErrCircuitFile, ErrCircuitMismatch); a configuration that
// cannot run wraps ErrConfig or ErrNoiseRange, and a state too large for
// memory sim.ErrTooLarge. Check them with errors.Is. Programmer mistakes
// panic with a "sampling: " message.
package sampling
