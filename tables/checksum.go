package tables

import (
	"encoding/binary"
	"fmt"
	"hash"
	"hash/crc64"
	"math"
)

// checksumKey is the Parquet footer key that holds the content checksum of a
// table written by Create. arrow-go v18.8.0 neither writes nor verifies the
// optional page CRCs of the Parquet format, so the Writer records a checksum
// of the values instead, and Read recomputes it: a flipped data byte that
// still decodes is caught rather than silently read. The key lives in the
// file footer, not in the run metadata, and Read does not return it in Meta.
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
