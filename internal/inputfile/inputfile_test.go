package inputfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// TestLimits: a regular file over the limit is refused at Open, a stream
// (here /dev/zero, common practice for an endless input) once it passes the
// limit, and a file at the limit reads whole.
func TestLimits(t *testing.T) {
	path := filepath.Join(t.TempDir(), "f")
	if err := os.WriteFile(path, make([]byte, 100), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Open(path, 99); !errors.Is(err, ErrTooLarge) {
		t.Errorf("Open of 100 bytes under 99: %v, want ErrTooLarge", err)
	}
	if b, err := ReadFile(path, 100); err != nil || len(b) != 100 {
		t.Errorf("ReadFile at the limit: %d bytes, %v", len(b), err)
	}
	if _, err := os.Stat("/dev/zero"); err != nil {
		t.Skip("no /dev/zero")
	}
	r, err := Open("/dev/zero", 1<<20)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	if _, err := io.ReadAll(r); !errors.Is(err, ErrTooLarge) {
		t.Errorf("reading /dev/zero under 1 MiB: %v, want ErrTooLarge", err)
	}
}
