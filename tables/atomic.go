package tables

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes a file of any kind (JSON, a plot) the way tables
// are written: into a temporary file in the same directory, synced, then
// renamed onto path, so a reader never sees half a file and a failure leaves
// any older file in place. write receives the temporary file.
func WriteFileAtomic(path string, write func(io.Writer) error) error {
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("tables: writing %s: %w", path, err)
	}
	tmp := f.Name()
	err = write(f)
	if err == nil {
		err = f.Sync()
	}
	if e := f.Close(); err == nil {
		err = e
	}
	if err == nil {
		// CreateTemp makes the file 0600; give it the mode of a new file.
		err = os.Chmod(tmp, 0o644)
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("tables: writing %s: %w", path, err)
	}
	return nil
}
