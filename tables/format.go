package tables

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/apache/arrow-go/v18/arrow/memory"
)

// Allocator supplies the memory for Arrow buffers while writing and reading
// tables. Nil means memory.DefaultAllocator. Tests may set it to a
// memory.CheckedAllocator to check that every buffer is released.
var Allocator memory.Allocator = memory.DefaultAllocator

func allocator() memory.Allocator {
	if Allocator == nil {
		return memory.DefaultAllocator
	}
	return Allocator
}

// format is a table file format.
type format int

const (
	arrowFormat   format = iota + 1 // Arrow IPC file format
	parquetFormat                   // Parquet with the stored Arrow schema
)

// FormatError reports a table file name whose extension names no table
// format.
type FormatError struct {
	Path string
}

func (e *FormatError) Error() string {
	return fmt.Sprintf("tables: unknown table format %q: use a name ending in .arrow or .parquet", e.Path)
}

// formatOf returns the format named by the extension of path, ignoring case.
func formatOf(path string) (format, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".arrow":
		return arrowFormat, nil
	case ".parquet":
		return parquetFormat, nil
	}
	return 0, &FormatError{Path: path}
}
