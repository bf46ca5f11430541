package plots_test

import (
	"bytes"
	"fmt"
	"math"
	"strings"

	"mixdepth/plots"
	"mixdepth/stats"
)

// ExampleDepthPlot draws an exact curve alone (no Monte Carlo estimate) to a
// buffer as SVG. The curve is 1 + 4·0.4^d, a made-up exact ratio E[Z]/Z_H
// that falls below 1 + ε = 1.05 from depth 5 on (4·0.4⁴ ≈ 0.10,
// 4·0.4⁵ ≈ 0.041), the depth that stats.AnticoncentrationDepth finds.
func ExampleDepthPlot() {
	s := &plots.DepthSeries{Qubits: 6}
	for d := 1; d <= 8; d++ {
		s.Depths = append(s.Depths, d)
		s.Exact = append(s.Exact, 1+4*math.Pow(0.4, float64(d)))
	}
	s.Depth, s.Found = stats.AnticoncentrationDepth(s.Depths, s.Exact, 0.05)
	var buf bytes.Buffer
	if err := plots.DepthPlot(&buf, plots.SVG, s, 0.05, plots.WithTitle("an exact curve")); err != nil {
		fmt.Println(err)
		return
	}
	svg := buf.String()
	fmt.Println(strings.Contains(svg, "<svg"), strings.Contains(svg, "recommended depth 5"), strings.Contains(svg, "Monte Carlo"))
	// Output: true true false
}
