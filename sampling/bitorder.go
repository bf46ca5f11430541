package sampling

import "fmt"

// BitOrder says which end of a measured bitstring holds qubit 0.
type BitOrder string

// The bit orders of measured bitstrings.
const (
	// QubitZeroFirst is the tool's own order (design.md §2): character q is
	// qubit q.
	QubitZeroFirst BitOrder = "first"
	// QubitZeroLast is the reverse, character n−1−q is qubit q: the order of
	// software that prints the binary number x = Σ b_q 2^q most significant
	// bit first.
	QubitZeroLast BitOrder = "last"
)

// ParseBitOrder reads "first" or "last".
func ParseBitOrder(s string) (BitOrder, error) {
	switch o := BitOrder(s); o {
	case QubitZeroFirst, QubitZeroLast:
		return o, nil
	}
	return "", fmt.Errorf("sampling: bit order %q: use first (qubit 0 is the first character) or last", s)
}

// Reversed returns a copy of records with every bitstring reversed, which
// turns one bit order into the other. The records still remember the
// bitstring as written (see InOrder).
func Reversed(records []Record) []Record {
	out := make([]Record, len(records))
	for i, r := range records {
		written := r.asWritten()
		r.Bitstring = reverse(r.Bitstring)
		// A bitstring InOrder reversed is now as written again; any other
		// is now read as qubit 0 last.
		r.written = ""
		if r.Bitstring != written {
			r.written = written
		}
		out[i] = r
	}
	return out
}

func reverse(s string) string {
	b := []byte(s)
	for j, k := 0, len(b)-1; j < k; j, k = j+1, k-1 {
		b[j], b[k] = b[k], b[j]
	}
	return string(b)
}

// InOrder returns records with their bitstrings in the tool's order
// (QubitZeroFirst), given that they were written in order o. The records
// remember the bitstring as written, so that the errors of Collect quote it
// and count its characters as the file has them.
func InOrder(records []Record, o BitOrder) []Record {
	if o != QubitZeroLast {
		return records
	}
	out := make([]Record, len(records))
	for i, r := range records {
		r.written = r.asWritten()
		r.Bitstring = reverse(r.written)
		out[i] = r
	}
	return out
}
