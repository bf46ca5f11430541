package tables

import (
	"fmt"
	"io"

	"mixdepth/internal/atomicfile"
)

// WriteFileAtomic writes a file of any kind (JSON, a circuit file) the way
// tables are written: into a temporary file in the same directory, synced,
// then renamed onto path, so a reader never sees half a file and a failure
// leaves any older file in place. write receives the temporary file.
func WriteFileAtomic(path string, write func(io.Writer) error) error {
	if err := atomicfile.Write(path, write); err != nil {
		return fmt.Errorf("tables: writing %s: %w", path, err)
	}
	return nil
}
