// Package tables writes and reads the result tables of mixdepth.
//
// A table is a list of typed columns (Field) with ordered run metadata
// (Meta) stored as Arrow schema metadata. The file name chooses the format:
//
//	name.arrow    Arrow IPC file format (uncompressed record batches)
//	name.parquet  Parquet, zstd-compressed, with the Arrow schema stored
//	              under the key "ARROW:schema" so that the field metadata
//	              and the run metadata survive the round trip
//
// Columns hold int64, float64 or UTF-8 strings; a Nullable column may hold
// nulls. A field's Unit and Doc are stored in the Arrow field metadata under
// the keys "unit" and "doc" when they are not empty.
//
// Writing is row by row through a Writer. Rows are buffered in Arrow builders
// and written as one record batch (one Parquet row group) every
// Writer.BatchRows rows, so a table of millions of rows never sits in memory
// at once. The data go to a temporary file in the destination directory that
// Close renames onto the destination after an fsync, so a reader never sees a
// partly written table and an existing file survives until the new one is
// complete. Abort discards the temporary file and may be deferred.
//
// Reading returns the whole table as Go slices (Table), for the commands that
// show, merge, summarize or score tables. ReadMeta reads only the schema and
// the run metadata.
//
// Arrow memory comes from Allocator, which tests may replace by a
// memory.CheckedAllocator to check that every buffer is released.
package tables
