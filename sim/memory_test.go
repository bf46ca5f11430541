package sim_test

import (
	"errors"
	"strings"
	"testing"

	"mixdepth/sim"
)

// TestStateBytes: an n-qubit complex128 state holds 2^n amplitudes of 16
// bytes (exact arithmetic), including beyond 62 qubits where 2^n overflows
// an integer.
func TestStateBytes(t *testing.T) {
	for _, tc := range []struct {
		n    int
		want float64
	}{{1, 32}, {10, 16384}, {30, 1 << 34}, {40, 1 << 44}, {62, 1 << 66}, {70, 1 << 74}} {
		if got := sim.StateBytes(tc.n); got != tc.want {
			t.Errorf("StateBytes(%d) = %g, want %g", tc.n, got, tc.want)
		}
	}
}

func TestGiB(t *testing.T) {
	for _, tc := range []struct {
		bytes float64
		want  string
	}{{1 << 30, "1.0 GiB"}, {1 << 44, "16384.0 GiB"}, {3 << 29, "1.5 GiB"}, {0, "0.0 GiB"}} {
		if got := sim.GiB(tc.bytes); got != tc.want {
			t.Errorf("GiB(%g) = %q, want %q", tc.bytes, got, tc.want)
		}
	}
}

func TestCheckMemory(t *testing.T) {
	avail := sim.AvailableMemory()
	if avail == 0 {
		t.Skip("available memory unknown on this machine")
	}
	if err := sim.CheckMemory(1, "one byte"); err != nil {
		t.Errorf("CheckMemory(1): %v", err)
	}
	err := sim.CheckMemory(2*float64(avail)+1<<30, "a test buffer")
	if !errors.Is(err, sim.ErrTooLarge) || !strings.Contains(err.Error(), "a test buffer") || !strings.HasPrefix(err.Error(), "sim: ") {
		t.Errorf("CheckMemory(twice the memory): %v", err)
	}
	if !strings.HasSuffix(err.Error(), "; use fewer qubits") {
		t.Errorf("CheckMemory message %q does not end with its fix", err)
	}
	err = sim.CheckMemoryFix(2*float64(avail)+1<<30, "two test buffers", "use fewer --workers")
	if !errors.Is(err, sim.ErrTooLarge) || !strings.HasSuffix(err.Error(), "; use fewer --workers") {
		t.Errorf("CheckMemoryFix message %q does not end with the caller's fix", err)
	}
}
