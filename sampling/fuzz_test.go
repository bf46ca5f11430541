package sampling

import (
	"bytes"
	"errors"
	"strings"
	"testing"
)

// FuzzReadCircuits: any bytes give circuits or an error wrapping
// ErrCircuitFile or ErrCircuitMismatch, never a panic; what reads back
// writes and reads again to the same gates (read → write → read, the
// encoding/csv FuzzRoundtrip practice).
func FuzzReadCircuits(f *testing.F) {
	for _, tc := range []struct{ gates, schedule string }{{"haar", "layered"}, {"cz+haar1", "random-edge"}} {
		cf, _ := sampleFile(f, tc.gates, tc.schedule)
		var buf bytes.Buffer
		if err := WriteCircuits(&buf, cf); err != nil {
			f.Fatal(err)
		}
		f.Add(buf.Bytes())
		f.Add(bytes.Replace(buf.Bytes(), []byte("0,"), []byte("null,"), 1))
	}
	for _, s := range []string{"", "{}", "null", "[]", `{"format": 1}`} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		cf, err := ReadCircuits("f.json", bytes.NewReader(data))
		if err != nil {
			if !errors.Is(err, ErrCircuitFile) && !errors.Is(err, ErrCircuitMismatch) {
				t.Errorf("error %v wraps neither sentinel", err)
			}
			return
		}
		var buf bytes.Buffer
		if err := WriteCircuits(&buf, cf); err != nil {
			t.Fatalf("write back: %v", err)
		}
		if _, err := ReadCircuits("f.json", &buf); err != nil {
			t.Errorf("what was read does not read back: %v", err)
		}
	})
}

// FuzzReadCSV: any text gives records or a *RowError, never a panic.
func FuzzReadCSV(f *testing.F) {
	for _, s := range []string{
		"\ufeffshot, instance ,bitstring,p_ideal\n0,2,0110,0.125\n1,2,1111,\n2,0,0000,1e-3\n",
		"instance,bitstring\n0,01\n",
		"instance,bitstring\n-1,01\n",
		"instance,bitstring,p_ideal\n0,01,NaN\n",
		"instance\n0\n",
		"",
		"instance,bitstring\n0,\"01\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		_, err := ReadCSV("f.csv", strings.NewReader(text))
		var re *RowError
		if err != nil && !errors.As(err, &re) {
			t.Errorf("error %v is not a *RowError", err)
		}
	})
}
