package sampling

import (
	"reflect"
	"testing"
)

// TestReversed checks by hand that reversing the characters turns qubit 0
// last into qubit 0 first (design.md §2: x = Σ b_q 2^q, qubit 0 first).
func TestReversed(t *testing.T) {
	in := []Record{{Row: 1, Instance: 2, Bitstring: "1100", PIdeal: 0.5, HasP: true}, {Row: 2, Bitstring: "0111"}}
	got := Reversed(in)
	want := []Record{{Row: 1, Instance: 2, Bitstring: "0011", PIdeal: 0.5, HasP: true}, {Row: 2, Bitstring: "1110"}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Reversed = %+v", got)
	}
	if in[0].Bitstring != "1100" {
		t.Error("Reversed changed its argument")
	}
	// "0011" read qubit 0 last is qubits 0, 1 set: x = 3.
	x, err := ParseBitstring(InOrder([]Record{{Bitstring: "0011"}}, QubitZeroLast)[0].Bitstring, 4)
	if err != nil || x != 3 {
		t.Errorf("0011 with qubit 0 last: x = %d, %v; want 3", x, err)
	}
	for _, s := range []string{"first", "last"} {
		if o, err := ParseBitOrder(s); err != nil || string(o) != s {
			t.Errorf("ParseBitOrder(%q) = %q, %v", s, o, err)
		}
	}
	if _, err := ParseBitOrder("msb"); err == nil {
		t.Error("ParseBitOrder accepts msb")
	}
}

func TestScoresBetter(t *testing.T) {
	given := &Report{Shots: 100, Linear: 0.1, LinearErr: 0.02, Normalized: 0.1}
	other := &Report{Shots: 100, Linear: 0.9, LinearErr: 0.03, Normalized: 0.9}
	if !LowScore(given) || LowScore(other) || !ScoresBetter(other, given) || ScoresBetter(given, other) {
		t.Error("a score of 0.9 ± 0.03 against 0.1 ± 0.02 is not detected as better")
	}
	// Within noise: 0.15 ± 0.05 against 0.1 ± 0.05 is not a detection.
	if ScoresBetter(&Report{Linear: 0.15, LinearErr: 0.05}, &Report{Linear: 0.1, LinearErr: 0.05}) {
		t.Error("a difference of 0.7 standard errors counts as better")
	}
}
