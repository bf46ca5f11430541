package sampling

import (
	"context"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
)

// TestReversed checks by hand that reversing the characters turns qubit 0
// last into qubit 0 first (design.md §2: x = Σ b_q 2^q, qubit 0 first).
func TestReversed(t *testing.T) {
	in := []Record{{Row: 1, Instance: 2, Bitstring: "1100", PIdeal: 0.5, HasP: true}, {Row: 2, Bitstring: "0111"}}
	got := Reversed(in)
	// Each record remembers its bitstring as written, for messages.
	want := []Record{{Row: 1, Instance: 2, Bitstring: "0011", PIdeal: 0.5, HasP: true, written: "1100"}, {Row: 2, Bitstring: "1110", written: "0111"}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Reversed = %+v", got)
	}
	// Reversed twice is as read.
	if back := Reversed(got); !reflect.DeepEqual(back, in) {
		t.Errorf("Reversed twice = %+v, want %+v", back, in)
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

// TestBitOrderRule checks the rule's two conditions on hand-made scores:
// near 0 is |F| ≤ 3 SE; the reversed order scores high when it is 3 of its
// own SE above 0 and 3 combined SE above the given order.
func TestBitOrderRule(t *testing.T) {
	for _, c := range []struct {
		name          string
		given, rev    Report
		nearZero, hit bool
	}{
		{"wrong order", Report{Linear: 0.01, LinearErr: 0.02}, Report{Linear: 0.9, LinearErr: 0.03}, true, true},
		{"given order scores", Report{Linear: 0.3, LinearErr: 0.02}, Report{Linear: 0.9, LinearErr: 0.03}, false, true},
		{"reversed within noise of 0", Report{Linear: 0.01, LinearErr: 0.02}, Report{Linear: 0.05, LinearErr: 0.02}, true, false},
		// 5 SE above 0, but only 1.6 combined SE above the given 0.055.
		{"reversed not well above", Report{Linear: 0.055, LinearErr: 0.02}, Report{Linear: 0.1, LinearErr: 0.02}, true, false},
		{"one shot, no error bar", Report{Linear: 0, LinearErr: math.NaN()}, Report{Linear: 0.9, LinearErr: math.NaN()}, false, false},
	} {
		if got := XEBNearZero(&c.given); got != c.nearZero {
			t.Errorf("%s: XEBNearZero = %v", c.name, got)
		}
		if got := ScoresHigh(&c.rev, &c.given); got != c.hit {
			t.Errorf("%s: ScoresHigh = %v", c.name, got)
		}
	}
}

// TestCheckBitOrderRealSample runs a real ideal sample on grid:3x4 and
// scores its shots as written and with every bitstring reversed by the
// test (data that lists qubit 0 last, read as qubit 0 first). Read in the
// right order the XEB of an ideal sampler is near D·Z − 1 ≈ 1 (Boixo et
// al. 2018), not near 0, so no hint; reversed, each shot scores as an
// unrelated output (near 0) and the check reverses it back, finding the
// right order's score exactly.
func TestCheckBitOrderRealSample(t *testing.T) {
	c := testConfig(t, "grid:3x4", "haar", 12, 10, 400, Noise{Fidelity: 1})
	results := runAll(t, c)
	circuit := map[int]*Circuit{}
	var recs []Record
	for _, r := range results {
		circuit[r.Circuit.Instance] = r.Circuit
		for k, x := range r.Outcomes {
			recs = append(recs, Record{Row: len(recs) + 1, Instance: r.Circuit.Instance, Bitstring: FormatBitstring(x, c.Qubits), PIdeal: r.PIdeal[k], HasP: true})
		}
	}
	lookup := func(id int) *Circuit { return circuit[id] }
	score := func(recs []Record) *Report {
		g, err := Collect(context.Background(), "test", recs, c.Qubits, lookup, 1)
		if err != nil {
			t.Fatal(err)
		}
		return Score(c.Qubits, g)
	}
	right := score(recs)
	chk, err := CheckBitOrder(context.Background(), "test", recs, c.Qubits, lookup, 1, right)
	if err != nil {
		t.Fatal(err)
	}
	if chk.NearZero || chk.Suggest || chk.Reversed != nil {
		t.Errorf("right order (F_lin %.3f ± %.3f): %+v, want no hint", right.Linear, right.LinearErr, chk)
	}
	reversed := Reversed(recs)
	for i := range reversed {
		reversed[i].HasP = false // a measured table has no p_ideal
	}
	wrong := score(reversed)
	chk, err = CheckBitOrder(context.Background(), "test", reversed, c.Qubits, lookup, 1, wrong)
	if err != nil {
		t.Fatal(err)
	}
	if !chk.NearZero || !chk.Suggest {
		t.Fatalf("reversed data (F_lin %.3f ± %.3f): %+v, want the hint", wrong.Linear, wrong.LinearErr, chk)
	}
	t.Logf("right order F_lin %.4f ± %.4f; reversed %.4f ± %.4f", right.Linear, right.LinearErr, wrong.Linear, wrong.LinearErr)
	// Reversing twice gives the shots back: the same score to rounding.
	if math.Abs(chk.Reversed.Linear-right.Linear) > 1e-12 {
		t.Errorf("the reversed trial scores %.15g, the right order %.15g", chk.Reversed.Linear, right.Linear)
	}
}

// TestCollectQuotesAsWritten: with qubit 0 last, the errors of Collect
// quote the bitstring as the file has it and count its characters along it,
// while the outcome is the reversed one (design.md §2: character q is qubit
// q in the tool's own order).
func TestCollectQuotesAsWritten(t *testing.T) {
	none := func(int) *Circuit { return nil }
	for _, c := range []struct {
		name, bits string
		order      BitOrder
		want       []string
	}{
		{"bad character, qubit 0 last", "01x1", QubitZeroLast, []string{`"01x1"`, "at character 3 (qubit 1)"}},
		{"bad character, qubit 0 first", "01x1", QubitZeroFirst, []string{`"01x1"`, "at character 3 (qubit 2)"}},
		{"too short, qubit 0 last", "011", QubitZeroLast, []string{`"011"`, "want 4", "qubit 0 last"}},
		{"too short, qubit 0 first", "011", QubitZeroFirst, []string{`"011"`, "want 4", "qubit 0 first"}},
	} {
		recs := InOrder([]Record{{Row: 1, Line: 2, Bitstring: c.bits}}, c.order)
		_, err := Collect(context.Background(), "m.csv", recs, 4, none, 1)
		if !errors.Is(err, ErrBitstring) {
			t.Errorf("%s: error %v, want ErrBitstring", c.name, err)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not say %q", c.name, err, w)
			}
		}
	}

	// A p_ideal that does not match quotes the bitstring as written too.
	cfg := testConfig(t, "line:4", "haar", 4, 1, 1, Noise{Fidelity: 1})
	res := runAll(t, cfg)[0]
	x := res.Outcomes[0]
	asWritten := reverse(FormatBitstring(x, 4))
	recs := InOrder([]Record{{Row: 1, Line: 2, Instance: res.Circuit.Instance, Bitstring: asWritten, PIdeal: res.PIdeal[0] / 2, HasP: true}}, QubitZeroLast)
	_, err := Collect(context.Background(), "m.csv", recs, 4, func(int) *Circuit { return res.Circuit }, 1)
	if !errors.Is(err, ErrMismatch) || !strings.Contains(err.Error(), "bitstring "+asWritten) {
		t.Errorf("mismatch error %v does not quote bitstring %s as written", err, asWritten)
	}
	// Without p_ideal the record is read as outcome x: the simulated
	// probability is the one the sampler recorded for x (the same circuit
	// simulated again: rounding only).
	recs[0].HasP = false
	g, err := Collect(context.Background(), "m.csv", recs, 4, func(int) *Circuit { return res.Circuit }, 1)
	if err != nil || math.Abs(g[0].PIdeal[0]-res.PIdeal[0]) > 1e-12 {
		t.Errorf("reversed record of outcome %d: %+v, %v", x, g, err)
	}
}
