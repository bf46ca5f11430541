// Package atomicfile writes files so that a reader never sees half of one:
// the data go to a temporary file in the destination directory, which is
// synced and then renamed onto the destination. A failed write removes the
// temporary file and leaves any older file at the destination as it was.
//
// It serves the packages tables and plots. Its errors carry no package
// prefix and do not repeat the destination, so that each caller wraps them
// with its own prefix and wording ("tables: cannot create %q: %w").
package atomicfile

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"sync"
)

// pending holds the names of the temporary files not yet committed or
// aborted, so that RemovePending can clean up when the process must exit at
// once (a second interrupt).
var pending sync.Map

// RemovePending removes every temporary file of this process that is not yet
// committed or aborted. It is meant for a process about to exit without
// unwinding (cmd/mixdepth calls it on a second signal); a File whose
// temporary file it removed fails to Commit.
func RemovePending() {
	pending.Range(func(name, _ any) bool {
		os.Remove(name.(string))
		pending.Delete(name)
		return true
	})
}

// CheckWritable returns an error unless a file can be created at path: the
// directory passes CheckDir and a temporary file can be created in it (it is
// removed at once). A caller checks its destinations with it before a long
// computation, so that a read-only directory is refused before any work.
func CheckWritable(path string) error {
	f, err := Create(path)
	if err != nil {
		return err
	}
	f.Abort()
	return nil
}

// File is a temporary file that Commit renames onto its destination. It
// embeds the open *os.File; write to it, then call Commit or Abort once.
type File struct {
	*os.File
	path string
	done bool
}

// CheckDir returns an error unless the directory of path exists and path
// itself is not a directory, so that a caller can refuse a destination
// before a long computation. A missing directory gives the cause alone
// (such as fs.ErrNotExist), since the message names the directory.
func CheckDir(path string) error {
	dir := filepath.Dir(path)
	info, err := os.Stat(dir)
	switch {
	case err != nil:
		return fmt.Errorf("directory %q: %w", dir, pathCause(err))
	case !info.IsDir():
		return fmt.Errorf("%q is not a directory", dir)
	}
	if info, err := os.Stat(path); err == nil && info.IsDir() {
		return errors.New("it is a directory")
	}
	return nil
}

// Create checks the destination with CheckDir and creates an empty
// temporary file ".<name>.<random>.tmp" beside it. Like os.Create it asks
// for mode 0666 before the umask, so that the renamed file gets the
// permissions of an ordinary new file.
func Create(path string) (*File, error) {
	if err := CheckDir(path); err != nil {
		return nil, err
	}
	dir, base := filepath.Dir(path), filepath.Base(path)
	for range 100 {
		name := filepath.Join(dir, "."+base+"."+strconv.FormatUint(rand.Uint64(), 36)+".tmp")
		f, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o666)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		if err != nil {
			// The temporary name would only confuse; keep the cause.
			return nil, fmt.Errorf("cannot write in directory %q: %w", dir, pathCause(err))
		}
		pending.Store(name, true)
		return &File{File: f, path: path}, nil
	}
	return nil, fmt.Errorf("no free temporary name in %q", dir)
}

// Commit syncs and closes the temporary file and renames it onto the
// destination, replacing any file there; then it syncs the directory where
// the system allows it. On any error the temporary file is removed and the
// destination is left as it was. Commit after Commit or Abort returns an
// error wrapping fs.ErrClosed.
func (f *File) Commit() error {
	if f.done {
		return fs.ErrClosed
	}
	f.done = true
	defer pending.Delete(f.Name())
	err := f.Sync()
	if e := f.Close(); err == nil {
		err = e
	}
	if err == nil {
		err = os.Rename(f.Name(), f.path)
	}
	if err != nil {
		os.Remove(f.Name())
		return err
	}
	syncDir(filepath.Dir(f.path))
	return nil
}

// Abort closes and removes the temporary file, leaving the destination as
// it was. It does nothing after Commit or Abort, so callers may defer it
// right after Create.
func (f *File) Abort() {
	if f.done {
		return
	}
	f.done = true
	f.Close()
	os.Remove(f.Name())
	pending.Delete(f.Name())
}

// Write creates path atomically with the data that write puts into the
// temporary file: Create, write, then Commit, or Abort when write fails.
func Write(path string, write func(io.Writer) error) error {
	f, err := Create(path)
	if err != nil {
		return err
	}
	defer f.Abort()
	if err := write(f); err != nil {
		return err
	}
	return f.Commit()
}

// syncDir makes a rename in dir durable where the system allows it. It is
// best effort: the file is complete once the rename is done, and some
// systems cannot sync a directory.
func syncDir(dir string) {
	d, err := os.Open(dir)
	if err != nil {
		return
	}
	d.Sync()
	d.Close()
}

// pathCause returns the cause inside a *fs.PathError, or err itself.
func pathCause(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
