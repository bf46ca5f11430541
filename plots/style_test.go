package plots

import (
	"math"
	"strings"
	"testing"
)

func TestIntegerTicks(t *testing.T) {
	// The step rule: 1, 2, 5, 10, 20, … until at most 12 labels.
	cases := []struct {
		min, max float64
		labels   string
	}{
		{1, 14, "2 4 6 8 10 12 14"},
		{1, 8, "1 2 3 4 5 6 7 8"},
		{0.5, 3.5, "1 2 3"},
		{10, 300, "50 100 150 200 250 300"},
	}
	for _, c := range cases {
		var got []string
		for _, tk := range (integerTicks{}).Ticks(c.min, c.max) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != c.labels {
			t.Errorf("ticks on [%g, %g]: %v, want %s", c.min, c.max, got, c.labels)
		}
	}
}

func TestLog10Ticks(t *testing.T) {
	// Labels at the powers of ten inside the range; 2 and 5 as well when it
	// spans at most two decades.
	label := func(min, max float64) string {
		var got []string
		for _, tk := range (log10Ticks{}).Ticks(math.Log10(min), math.Log10(max)) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		return strings.Join(got, " ")
	}
	if got := label(5e-4, 30); got != "0.001 0.01 0.1 1 10" {
		t.Errorf("[5e-4, 30]: %s", got)
	}
	if got := label(0.03, 1.5); got != "0.05 0.1 0.2 0.5 1" {
		t.Errorf("[0.03, 1.5]: %s", got)
	}
}
