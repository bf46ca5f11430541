// Package plots draws the plots of mixdepth with gonum.org/v1/plot.
//
// DepthPlot shows how far a depth series is from the Haar value, R − 1 with
// R = E[Z]/Z_H, against depth on a logarithmic axis, with the confidence
// band, the threshold ε, the recommended (anti-concentration) depth and,
// when known, the exact curve. Its input, DepthSeries, holds plain slices,
// so a Monte Carlo scan and an exact computation pass only what they have.
// PorterThomasPlot compares the histogram of the rescaled output
// probabilities D·p of simulated circuits with the Porter–Thomas density
// e^(−x) and the exact finite-D Haar law of D·p, Beta(1, D−1) rescaled
// (Porter & Thomas 1956; Dalzell, Hunter-Jones, Brandão 2022, PRX Quantum 3,
// 010333).
//
// Both draw to an io.Writer in a Format, PNG or SVG. SaveDepthPlot and
// SavePorterThomasPlot write to a file instead, in the format the file name
// chooses: ".png" or ".svg", in any case; any other name gives a
// *FormatError. A saved plot is written to a temporary file in the
// destination directory and renamed onto the destination when complete, so
// a reader never sees half a picture and an existing file survives a failed
// write. CheckPath validates a destination before the caller starts a long
// computation.
package plots
