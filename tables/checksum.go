package tables

import (
	"encoding/binary"
	"errors"
	"fmt"
	"hash"
	"hash/crc64"
	"math"
)

// checksumKey is the key that holds the content checksum of a table written
// by Create. arrow-go v18.8.0 neither writes nor verifies the optional page
// CRCs of the Parquet format, and the Arrow IPC format has no checksum at
// all, so the Writer records a checksum of the values instead, and Read
// recomputes it: a flipped data byte that still decodes is caught rather
// than silently read. In Parquet the key lives in the file footer's
// key-value metadata; in Arrow IPC, in the custom metadata of the last
// record batch's message (Message.custom_metadata of the Arrow format's
// Message.fbs; arrow-go's FileWriter has no footer custom metadata), a
// batch that the Writer always writes (with no rows for an empty table). Neither is run metadata: Read does not return it in
// Meta. A table without the key (Arrow tables written before the checksum)
// is read unverified.
const checksumKey = "mixdepth.content_crc64"

// crcTable is the ECMA-182 CRC-64 polynomial table.
var crcTable = crc64.MakeTable(crc64.ECMA)

// rowHash accumulates the content checksum, value by value in row order: a
// null is the byte 0; a value is the byte 1 followed by its 8 little-endian
// bytes (int64, or the IEEE-754 bits of a float64), or by the uvarint length
// and the bytes of a string.
type rowHash struct {
	h   hash.Hash64
	buf [binary.MaxVarintLen64 + 1]byte
}

func newRowHash() *rowHash { return &rowHash{h: crc64.New(crcTable)} }

func (r *rowHash) null() { r.h.Write([]byte{0}) }

func (r *rowHash) word(v uint64) {
	r.buf[0] = 1
	binary.LittleEndian.PutUint64(r.buf[1:9], v)
	r.h.Write(r.buf[:9])
}

func (r *rowHash) str(s string) {
	r.buf[0] = 1
	n := binary.PutUvarint(r.buf[1:], uint64(len(s)))
	r.h.Write(r.buf[:1+n])
	r.h.Write([]byte(s))
}

// add hashes one value as Writer.Append receives it.
func (r *rowHash) add(v any) {
	switch v := v.(type) {
	case nil:
		r.null()
	case int64:
		r.word(uint64(v))
	case int:
		r.word(uint64(int64(v)))
	case float64:
		r.word(math.Float64bits(v))
	case string:
		r.str(v)
	}
}

func (r *rowHash) String() string { return fmt.Sprintf("%016x", r.h.Sum64()) }

// checksum returns the content checksum of t as the Writer records it.
func (t *Table) checksum() string {
	r := newRowHash()
	for i := range t.Len() {
		for j, col := range t.Columns {
			if t.Valid[j] != nil && !t.Valid[j][i] {
				r.null()
				continue
			}
			switch col := col.(type) {
			case []int64:
				r.word(uint64(col[i]))
			case []float64:
				r.word(math.Float64bits(col[i]))
			case []string:
				r.str(col[i])
			}
		}
	}
	return r.String()
}

// schemaKey is the key beside checksumKey that holds the checksum of a
// table's schema as Create wrote it: its fields (name, type, nullability,
// unit, doc) and its run metadata, in order. The content checksum covers
// only the values, and most bytes of a small table are its metadata, which
// the footer's copy of the schema carries: without this checksum a flipped
// byte of a metadata string is read as another value. Tables written before
// it have no such key and are read unverified.
const schemaKey = "mixdepth.schema_crc64"

// sealKey is a key of the Arrow schema metadata of every table written by
// Create since the checksums exist (value "content_crc64,schema_crc64"),
// both copies of the schema in an Arrow IPC file and the stored schema of a
// Parquet file. With it, a table whose checksum keys are missing (a
// flipped byte that drops a batch's custom metadata or a footer entry) is
// damaged rather than taken for a table from before the checksums, which
// is read unverified. Read and ReadMeta leave it out of Meta.
const sealKey = "mixdepth.checksums"

// sealValue is the value of sealKey.
const sealValue = "content_crc64,schema_crc64"

// errUnsealed reports a table whose schema says it records checksums that
// are not there.
var errUnsealed = errors.New("the table's checksums are missing, though its schema says it records them")

// schemaChecksum returns the schema checksum of fields and meta.
func schemaChecksum(fields []Field, meta Meta) string {
	r := newRowHash()
	for _, f := range fields {
		r.str(f.Name)
		r.word(uint64(f.Type))
		if f.Nullable {
			r.word(1)
		} else {
			r.word(0)
		}
		r.str(f.Unit)
		r.str(f.Doc)
	}
	r.word(uint64(len(meta.Keys)))
	for i, k := range meta.Keys {
		r.str(k)
		r.str(meta.Values[i])
	}
	return r.String()
}
