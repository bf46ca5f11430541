// Package inputfile opens the text and JSON input files of mixdepth (edge
// lists, layouts, gate sets, circuit files, CSV shots) under a size limit, so
// that /dev/zero, a pipe without end or a huge file by mistake is refused
// instead of read to exhaustion. Its errors carry no package prefix; each
// caller wraps them with its own.
package inputfile

import (
	"errors"
	"fmt"
	"io"
	"os"
)

// The size limits. Small files describe a chip or a gate set; data files
// (circuit files of sample --circuits, CSV shots) may be large: a circuit
// file of the largest depth the CLI keeps in memory (10^6 gates at about
// 256 bytes each) stays under a quarter of DataLimit.
const (
	SmallLimit int64 = 64 << 20 // edge lists, layouts, gate sets: 64 MiB
	DataLimit  int64 = 1 << 30  // circuit files and CSV shots: 1 GiB
)

// ErrTooLarge is wrapped by the errors for an input beyond its limit.
var ErrTooLarge = errors.New("input file too large")

// Open opens path for reading under limit bytes: a regular file larger than
// limit is refused at once, and reading any other file (a device, a pipe)
// fails with an error wrapping ErrTooLarge once it passes limit bytes.
func Open(path string, limit int64) (io.ReadCloser, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	fi, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, err
	}
	if fi.IsDir() {
		f.Close()
		return nil, fmt.Errorf("%s is a directory", path)
	}
	if fi.Mode().IsRegular() && fi.Size() > limit {
		f.Close()
		return nil, tooLarge(path, limit)
	}
	return &limited{f: f, path: path, limit: limit, left: limit}, nil
}

// ReadFile reads the whole file at path under limit bytes (see Open).
func ReadFile(path string, limit int64) ([]byte, error) {
	r, err := Open(path, limit)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	return io.ReadAll(r)
}

func tooLarge(path string, limit int64) error {
	return fmt.Errorf("%s: %w: more than the %d MiB this kind of file may have", path, ErrTooLarge, limit>>20)
}

// limited reads f and fails once more than left bytes have come.
type limited struct {
	f           *os.File
	path        string
	limit, left int64
}

func (l *limited) Read(p []byte) (int, error) {
	if l.left < 0 {
		return 0, tooLarge(l.path, l.limit)
	}
	if int64(len(p)) > l.left+1 {
		p = p[:l.left+1]
	}
	n, err := l.f.Read(p)
	l.left -= int64(n)
	if l.left < 0 {
		return n, tooLarge(l.path, l.limit)
	}
	return n, err
}

func (l *limited) Close() error { return l.f.Close() }
