// Package stats holds the statistics of mixdepth: the Haar reference values a
// random-circuit ensemble is compared with, per-instance statistics of an
// output distribution, ensemble summaries with confidence intervals, the
// anti-concentration depth finder and the cross-entropy benchmark estimators.
//
// Haar references (Porter & Thomas 1956; Dalzell, Hunter-Jones, Brandão 2022,
// PRX Quantum 3, 010333). For a Haar-random state of dimension D one output
// probability p follows Beta(1, D−1) exactly:
//
//	P(p ≤ t) = 1 − (1−t)^(D−1),  E[p^k] = k!/(D(D+1)…(D+k−1)),
//	Z_H = D·E[p²] = 2/(D+1),
//
// and D·p tends to Exp(1), the Porter–Thomas law. HaarProb and PorterThomas
// follow the gonum distuv conventions (CDF, Survival, Prob, LogProb, Quantile,
// Mean) with the parameter as an exported field.
//
// Per instance, Collision computes Z = Σ_x p(x)² with a pairwise sum, and
// KSHaar the Kolmogorov–Smirnov distance of the D probabilities from
// Beta(1, D−1). Neither modifies its input; KSHaar sorts into a caller-owned
// scratch slice when one is given. KSHaarPasses computes the same statistic
// (equal to rounding, no approximation) from repeated passes over
// probabilities that a simulator recomputes from its amplitudes: a
// histogram, refinement of the few bins that can hold the supremum, and a
// sort of their values, in O(D) time per pass and bounded memory; HaarKS
// does the same for one state after another, its first pass fed by the
// caller (the scan's collision pass; CountAmplitudes squares, sums and
// bins amplitudes in one loop, FinishAmplitudes runs the other passes over
// them), and costs less than the sort at any size.
//
// Ensemble summaries: Summarize gives the mean, the unbiased standard
// deviation and the standard error. With fewer than two values the spread is
// unknown, so StdDev and StdErr are NaN, and MeanInterval and RatioInterval
// return the unbounded interval (−Inf, +Inf) rather than a false precision.
// MeanIntervalBCa is the bootstrap interval of a scan's R (positive, right
// for skewed data; none below MinIntervalValues values), HaarPTBaseline the
// Porter–Thomas distance of Haar-random states of one dimension, and
// Criteria.Judge and RecommendedDepth the verdict of a depth and of a scan.
// AnticoncentrationDepth picks the smallest depth whose upper confidence bound
// of R = E[Z]/Z_H is at most 1+ε. ClusterBootstrap gives the error of a
// ratio over instances (the XEB fidelity estimate).
//
// Cross-entropy benchmarks (Boixo et al. 2018, Nature Physics 14, 595; Arute
// et al. 2019, Nature 574, 505): LinearXEB, LogXEB and the sample-count
// planners XEBSamples and XEBSamplesRelative.
//
// Invalid arguments that can only come from a programming mistake (a
// dimension below 1, a confidence level outside (0, 1), slices of different
// lengths) panic with a message prefixed "stats: ".
package stats
