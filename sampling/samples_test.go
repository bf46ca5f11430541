package sampling

import (
	"context"
	"encoding/csv"
	"errors"
	"strings"
	"testing"

	"mixdepth/circuits"
)

func TestBitstrings(t *testing.T) {
	// x = Σ b_q 2^q with qubit 0 first: "1011" is 1 + 4 + 8.
	for _, c := range []struct {
		s string
		x uint64
	}{{"1011", 13}, {"0000", 0}, {"0001", 8}, {"1000", 1}} {
		x, err := ParseBitstring(c.s, 4)
		if err != nil || x != c.x {
			t.Errorf("ParseBitstring(%q) = %d, %v; want %d", c.s, x, err, c.x)
		}
		if s := FormatBitstring(c.x, 4); s != c.s {
			t.Errorf("FormatBitstring(%d) = %q, want %q", c.x, s, c.s)
		}
	}
	for _, bad := range []string{"101", "10110", "10a1", "1 01", ""} {
		if _, err := ParseBitstring(bad, 4); !errors.Is(err, ErrBitstring) {
			t.Errorf("ParseBitstring(%q): %v", bad, err)
		}
	}
}

func TestReadCSV(t *testing.T) {
	text := "\ufeffshot, instance ,bitstring,p_ideal\n0,2,0110,0.125\n1,2,1111,\n2,0,0000,1e-3\n"
	recs, err := ReadCSV("m.csv", strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	want := []Record{
		{Row: 1, Line: 2, Instance: 2, Bitstring: "0110", PIdeal: 0.125, HasP: true},
		{Row: 2, Line: 3, Instance: 2, Bitstring: "1111"},
		{Row: 3, Line: 4, Instance: 0, Bitstring: "0000", PIdeal: 1e-3, HasP: true},
	}
	if len(recs) != len(want) {
		t.Fatalf("%d records, want %d", len(recs), len(want))
	}
	for i := range want {
		if recs[i] != want[i] {
			t.Errorf("record %d = %+v, want %+v", i, recs[i], want[i])
		}
	}
	cases := []struct {
		name, text string
		sentinel   error
		line       int
		column     string
	}{
		{"empty", "", ErrEmpty, 0, ""},
		{"header only", "instance,bitstring\n", ErrEmpty, 0, ""},
		{"no bitstring", "instance,bits\n0,01\n", ErrColumn, 1, "bitstring"},
		{"no instance", "bitstring\n01\n", ErrColumn, 1, "instance"},
		{"instance word", "instance,bitstring\n0,01\nzero,10\n", ErrNotNumber, 3, "instance"},
		{"p word", "instance,bitstring,p_ideal\n0,01,half\n", ErrNotNumber, 2, "p_ideal"},
		{"field count", "instance,bitstring\n0,01\n1,10,5\n", csv.ErrFieldCount, 3, ""},
		{"bad quote", "instance,bitstring\n0,\"01\n", csv.ErrQuote, 2, ""},
	}
	for _, c := range cases {
		_, err := ReadCSV("m.csv", strings.NewReader(c.text))
		var re *RowError
		if !errors.As(err, &re) || !errors.Is(err, c.sentinel) || re.Line != c.line || re.Column != c.column {
			t.Errorf("%s: err = %v (%+v), want line %d column %q wrapping %v", c.name, err, re, c.line, c.column, c.sentinel)
		}
		if err != nil && !strings.HasPrefix(err.Error(), "sampling: m.csv: ") {
			t.Errorf("%s: message %q does not name the file", c.name, err)
		}
	}
}

// TestCollect checks grouping, filling of missing probabilities and the
// row-naming errors of bad records.
func TestCollect(t *testing.T) {
	g, _ := circuits.ParseGraph("line:3")
	s, _ := circuits.NewSchedule("layered", g)
	circs := map[int]*Circuit{}
	for _, id := range []int{0, 4} {
		circs[id] = Build(s, circuits.Haar{}, 3, 1, id, 4)
	}
	lookup := func(id int) *Circuit { return circs[id] }
	p4 := referenceProbabilities(t, circs[4])
	p0 := referenceProbabilities(t, circs[0])
	recs := []Record{
		{Row: 1, Instance: 4, Bitstring: "110"},
		{Row: 2, Instance: 0, Bitstring: "001", PIdeal: p0[4], HasP: true},
		{Row: 3, Instance: 4, Bitstring: "000"},
	}
	gs, err := Collect(context.Background(), "t.arrow", recs, 3, lookup, 1)
	if err != nil {
		t.Fatal(err)
	}
	if len(gs) != 2 || gs[0].Instance != 0 || gs[1].Instance != 4 {
		t.Fatalf("groups %+v", gs)
	}
	// "110" is x = 1 + 2 = 3, "001" is x = 4.
	if gs[1].PIdeal[0] != p4[3] || gs[1].PIdeal[1] != p4[0] || gs[0].PIdeal[0] != p0[4] {
		t.Errorf("probabilities %v %v", gs[0].PIdeal, gs[1].PIdeal)
	}
	var z float64
	for _, p := range p4 {
		z += p * p
	}
	if d := gs[1].Collision - z; d > 1e-15 || d < -1e-15 {
		t.Errorf("collision %g, want %g", gs[1].Collision, z)
	}

	bad := []struct {
		name     string
		rec      Record
		sentinel error
		column   string
	}{
		{"short bitstring", Record{Row: 9, Instance: 0, Bitstring: "01"}, ErrBitstring, "bitstring"},
		{"bad character", Record{Row: 9, Instance: 0, Bitstring: "0x1"}, ErrBitstring, "bitstring"},
		{"unknown instance", Record{Row: 9, Instance: 2, Bitstring: "011"}, ErrInstance, "instance"},
		{"p above 1", Record{Row: 9, Instance: 0, Bitstring: "011", PIdeal: 1.5, HasP: true}, ErrProbability, "p_ideal"},
		{"p negative", Record{Row: 9, Instance: 0, Bitstring: "011", PIdeal: -0.1, HasP: true}, ErrProbability, "p_ideal"},
		{"p mismatch", Record{Row: 9, Instance: 0, Bitstring: "011", PIdeal: p0[6] * 1.01, HasP: true}, ErrMismatch, "p_ideal"},
	}
	for _, c := range bad {
		_, err := Collect(context.Background(), "t.arrow", append(recs[:2:2], c.rec), 3, lookup, 1)
		var re *RowError
		if !errors.As(err, &re) || !errors.Is(err, c.sentinel) || re.Row != 9 || re.Column != c.column {
			t.Errorf("%s: err = %v, want row 9 column %s wrapping %v", c.name, err, c.column, c.sentinel)
		}
		if err != nil && !strings.Contains(err.Error(), "t.arrow: row 9: column "+c.column) {
			t.Errorf("%s: message %q", c.name, err)
		}
	}
	if _, err := Collect(context.Background(), "t.arrow", nil, 3, lookup, 1); !errors.Is(err, ErrEmpty) {
		t.Errorf("no records: %v", err)
	}
	// Outcomes are uint64 indices and one state vector is simulated: more
	// than MaxQubits qubits is refused before any circuit is looked up.
	if _, err := Collect(context.Background(), "t.arrow", recs, MaxQubits+1, lookup, 1); !errors.Is(err, ErrConfig) {
		t.Errorf("%d qubits: %v, want ErrConfig", MaxQubits+1, err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Collect(ctx, "t.arrow", recs, 3, lookup, 1); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}
