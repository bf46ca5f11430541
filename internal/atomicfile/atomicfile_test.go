package atomicfile

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"testing"
)

// noTemp fails the test if a temporary file is left in dir.
func noTemp(t *testing.T, dir string) {
	t.Helper()
	if left, _ := filepath.Glob(filepath.Join(dir, ".*.tmp")); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

// TestWrite: a successful write replaces the old file whole; a failing
// write leaves it as it was; neither leaves a temporary file.
func TestWrite(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "f.txt")
	if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := Write(path, func(w io.Writer) error {
		io.WriteString(w, "half")
		return boom
	})
	if !errors.Is(err, boom) {
		t.Errorf("failed write returned %v, want the writer's error", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "old" {
		t.Errorf("after a failed write the file holds %q, want \"old\"", got)
	}
	noTemp(t, dir)
	if err := Write(path, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(path); string(got) != "new" {
		t.Errorf("file holds %q, want \"new\"", got)
	}
	noTemp(t, dir)
}

// TestCheckDir: a missing directory, a file as directory and a directory as
// destination are refused before anything is created.
func TestCheckDir(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "plain")
	if err := os.WriteFile(file, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := CheckDir(filepath.Join(dir, "absent", "x")); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing directory: %v, want fs.ErrNotExist", err)
	}
	for _, p := range []string{filepath.Join(file, "x"), dir} {
		if err := CheckDir(p); err == nil {
			t.Errorf("CheckDir(%q) accepted", p)
		}
		if _, err := Create(p); err == nil {
			t.Errorf("Create(%q) accepted", p)
		}
	}
	if err := CheckDir(filepath.Join(dir, "new")); err != nil {
		t.Errorf("a new file in an existing directory: %v", err)
	}
}

// TestCommitTwice: Commit after Commit is fs.ErrClosed; Abort after Commit
// keeps the file.
func TestCommitTwice(t *testing.T) {
	path := filepath.Join(t.TempDir(), "f")
	f, err := Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	f.Abort()
	if err := f.Commit(); !errors.Is(err, fs.ErrClosed) {
		t.Errorf("second Commit: %v, want fs.ErrClosed", err)
	}
	if _, err := os.Stat(path); err != nil {
		t.Errorf("the committed file is gone: %v", err)
	}
}

// TestRemovePending: RemovePending removes a temporary file not yet
// committed (what a second signal does), and the File then fails to Commit.
func TestRemovePending(t *testing.T) {
	dir := t.TempDir()
	f, err := Create(filepath.Join(dir, "out.arrow"))
	if err != nil {
		t.Fatal(err)
	}
	RemovePending()
	noTemp(t, dir)
	if err := f.Commit(); err == nil {
		t.Error("Commit after RemovePending succeeded")
	}
	noTemp(t, dir)
}
