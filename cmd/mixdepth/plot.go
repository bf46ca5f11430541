package main

import (
	"mixdepth/plots"
	"mixdepth/scan"
)

// curveSeries is what the depth plot shows of a scan's curve: per depth, the
// estimated ratio R and its confidence interval, the recommended depth, and
// the exact ratios E[Z]/Z_H when exact is not nil (one per row). It lives
// here, not in plots, so that plots does not depend on scan.
func curveSeries(c *scan.Curve, exact []float64) *plots.DepthSeries {
	s := &plots.DepthSeries{Qubits: c.Qubits, Exact: exact, Depth: c.Depth, Found: c.Found}
	for _, r := range c.Rows {
		s.Depths = append(s.Depths, r.Depth)
		s.Ratio = append(s.Ratio, r.Ratio)
		s.Lower = append(s.Lower, r.Lower)
		s.Upper = append(s.Upper, r.Upper)
	}
	return s
}
