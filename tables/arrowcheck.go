package tables

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
)

// arrow-go decodes the flatbuffers of an Arrow IPC file without bounds
// checks and sizes slices by the vector lengths it finds there, so one
// flipped byte in a length can make it allocate tens of gigabytes, a fatal
// error that no recover catches. checkArrowFile walks the flatbuffers that
// the file reader will follow (the footer, its schema, and the header of
// every record batch) and refuses any offset or vector that leaves its
// buffer, and any column of a type that tables do not hold, before arrow-go
// sees the file. The layouts are those of the Arrow columnar format's
// File.fbs, Schema.fbs and Message.fbs (Apache Arrow specification, "IPC
// File Format" and "Serialization and Interprocess Communication").

// arrowMagic opens and closes an Arrow IPC file.
var arrowMagic = []byte("ARROW1")

// errFlatbuffer reports a flatbuffer that points outside itself.
var errFlatbuffer = errors.New("inconsistent Arrow metadata")

// fbuf is a flatbuffer under verification.
type fbuf []byte

func (b fbuf) u32(pos int) (int, error) {
	if pos < 0 || pos+4 > len(b) {
		return 0, errFlatbuffer
	}
	return int(binary.LittleEndian.Uint32(b[pos:])), nil
}

// table checks the table at pos and returns a function giving the position
// of field i (0 if absent). Like the flatbuffers runtime, it does not check
// a field offset against the table size; every use of a position is
// bounds-checked instead.
func (b fbuf) table(pos int) (func(i int) int, error) {
	if pos < 0 || pos+4 > len(b) {
		return nil, errFlatbuffer
	}
	vt := pos - int(int32(binary.LittleEndian.Uint32(b[pos:])))
	if vt < 0 || vt+4 > len(b) {
		return nil, errFlatbuffer
	}
	vsize := int(binary.LittleEndian.Uint16(b[vt:]))
	tsize := int(binary.LittleEndian.Uint16(b[vt+2:]))
	if vsize < 4 || vsize%2 != 0 || vt+vsize > len(b) || pos+tsize > len(b) {
		return nil, errFlatbuffer
	}
	return func(i int) int {
		if 4+2*i >= vsize {
			return 0
		}
		off := int(binary.LittleEndian.Uint16(b[vt+4+2*i:]))
		if off == 0 {
			return 0
		}
		return pos + off
	}, nil
}

// ref follows the offset stored at field position p (0: absent, returns 0).
func (b fbuf) ref(p int) (int, error) {
	if p == 0 {
		return 0, nil
	}
	u, err := b.u32(p)
	if err != nil {
		return 0, err
	}
	return p + u, nil
}

// vector checks the vector referenced at field position p with elements of
// size elem bytes and returns its length and the position of element 0.
func (b fbuf) vector(p, elem int) (n, start int, err error) {
	v, err := b.ref(p)
	if err != nil || v == 0 {
		return 0, 0, err
	}
	if n, err = b.u32(v); err != nil {
		return 0, 0, err
	}
	if n > (len(b)-v-4)/elem {
		return 0, 0, errFlatbuffer
	}
	return n, v + 4, nil
}

// subtables checks a vector of tables at field position p and calls f with
// each table's position.
func (b fbuf) subtables(p int, f func(pos int) error) error {
	n, start, err := b.vector(p, 4)
	if err != nil {
		return err
	}
	for k := range n {
		t, err := b.ref(start + 4*k)
		if err != nil {
			return err
		}
		if err := f(t); err != nil {
			return err
		}
	}
	return nil
}

// keyValues checks a custom_metadata vector of KeyValue tables.
func (b fbuf) keyValues(p int) error {
	return b.subtables(p, func(pos int) error {
		field, err := b.table(pos)
		if err != nil {
			return err
		}
		for i := range 2 { // key, value
			if _, _, err := b.vector(field(i), 1); err != nil {
				return err
			}
		}
		return nil
	})
}

// The Schema.fbs type ids of the columns tables hold.
const (
	fbTypeInt   = 2
	fbTypeFloat = 3
	fbTypeUtf8  = 5
)

// schema checks a Schema table: fields (1) of the held types without
// children or dictionaries, custom metadata (2), features (3).
func (b fbuf) schema(pos int) error {
	field, err := b.table(pos)
	if err != nil {
		return err
	}
	if _, _, err := b.vector(field(3), 8); err != nil {
		return err
	}
	if err := b.keyValues(field(2)); err != nil {
		return err
	}
	return b.subtables(field(1), func(pos int) error {
		f, err := b.table(pos)
		if err != nil {
			return err
		}
		if _, _, err := b.vector(f(0), 1); err != nil { // name
			return err
		}
		typ := 0
		if p := f(2); p != 0 {
			if p >= len(b) {
				return errFlatbuffer
			}
			typ = int(b[p])
		}
		if typ != fbTypeInt && typ != fbTypeFloat && typ != fbTypeUtf8 {
			return fmt.Errorf("a column of Arrow type id %d; tables hold int64, float64 and utf8 columns", typ)
		}
		t, err := b.ref(f(3))
		if err != nil {
			return err
		}
		if _, err := b.table(t); err != nil {
			return err
		}
		if f(4) != 0 {
			return errors.New("a dictionary-encoded column; tables hold plain columns")
		}
		if n, _, err := b.vector(f(5), 4); err != nil || n != 0 {
			return errors.Join(err, errors.New("a nested column; tables hold flat columns"))
		}
		return b.keyValues(f(6))
	})
}

// The Message.fbs header types of a schema and of a record batch.
const (
	fbSchema      = 1
	fbRecordBatch = 3
)

// message checks the root Message of b, whose header must have type kind,
// and returns its field accessor and the position of its header.
func (b fbuf) message(kind byte) (func(int) int, int, error) {
	root, err := b.u32(0)
	if err != nil {
		return nil, 0, err
	}
	msg, err := b.table(root)
	if err != nil {
		return nil, 0, err
	}
	if p := msg(1); p == 0 || p >= len(b) || b[p] != kind {
		return nil, 0, errors.New("an Arrow message of an unexpected kind")
	}
	if err := b.keyValues(msg(4)); err != nil {
		return nil, 0, err
	}
	h, err := b.ref(msg(2))
	return msg, h, err
}

// encapsulated splits an encapsulated IPC message (0xFFFFFFFF, the
// flatbuffer length, the flatbuffer; Arrow IPC "Encapsulated message
// format", with the pre-1.0 form without the 0xFFFFFFFF) into its
// flatbuffer and the bytes after it.
func encapsulated(data []byte) (fbuf, []byte, error) {
	if len(data) >= 4 && binary.LittleEndian.Uint32(data) == 0xFFFFFFFF {
		data = data[4:]
	}
	if len(data) < 4 {
		return nil, nil, errFlatbuffer
	}
	n := int64(int32(binary.LittleEndian.Uint32(data)))
	if n < 0 || n > int64(len(data)-4) {
		return nil, nil, errFlatbuffer
	}
	return fbuf(data[4 : 4+n]), data[4+n:], nil
}

// checkSchemaMessage verifies an IPC stream that starts with a schema
// message, as pqarrow stores it (base64) under ARROW:schema in a Parquet
// footer: a Schema header and a body no longer than the bytes that follow.
func checkSchemaMessage(data []byte) error {
	b, rest, err := encapsulated(data)
	if err != nil {
		return err
	}
	msg, h, err := b.message(fbSchema)
	if err != nil {
		return err
	}
	if p := msg(3); p != 0 {
		if p+8 > len(b) {
			return errFlatbuffer
		}
		if body := int64(binary.LittleEndian.Uint64(b[p:])); body < 0 || body > int64(len(rest)) {
			return errFlatbuffer
		}
	}
	return b.schema(h)
}

// recordBatchMessage checks a Message holding a RecordBatch: nodes (1) and
// buffers (2) of 16-byte structs, compression (3), variadic counts (4).
func (b fbuf) recordBatchMessage() error {
	_, rb, err := b.message(fbRecordBatch)
	if err != nil {
		return err
	}
	field, err := b.table(rb)
	if err != nil {
		return err
	}
	for i, elem := range []int{1: 16, 2: 16, 4: 8} {
		if elem == 0 {
			continue
		}
		if _, _, err := b.vector(field(i), elem); err != nil {
			return err
		}
	}
	if c, err := b.ref(field(3)); err != nil {
		return err
	} else if c != 0 {
		if _, err := b.table(c); err != nil {
			return err
		}
	}
	return nil
}

// checkArrowFile verifies the flatbuffers of the Arrow IPC file r of the
// given size (see the comment at the top of this file).
func checkArrowFile(r io.ReaderAt, size int64) error {
	tail := int64(len(arrowMagic) + 4)
	if size < 2*tail {
		return errors.New("too short for an Arrow IPC file")
	}
	end := make([]byte, tail)
	if _, err := r.ReadAt(end, size-tail); err != nil {
		return err
	}
	if !bytes.Equal(end[4:], arrowMagic) {
		return errors.New("no Arrow IPC file marker at the end")
	}
	flen := int64(binary.LittleEndian.Uint32(end))
	if flen <= 0 || flen > size-2*tail {
		return errFlatbuffer
	}
	footer := make(fbuf, flen)
	if _, err := r.ReadAt(footer, size-tail-flen); err != nil {
		return err
	}
	root, err := footer.u32(0)
	if err != nil {
		return err
	}
	field, err := footer.table(root)
	if err != nil {
		return err
	}
	sch, err := footer.ref(field(1))
	if err != nil {
		return err
	}
	if sch == 0 {
		return errors.New("no schema in the Arrow IPC footer")
	}
	if err := footer.schema(sch); err != nil {
		return err
	}
	if err := footer.keyValues(field(4)); err != nil {
		return err
	}
	if n, _, err := footer.vector(field(2), 24); err != nil || n != 0 {
		return errors.Join(err, errors.New("dictionaries in the file; tables hold none"))
	}
	n, start, err := footer.vector(field(3), 24) // Block: offset, metaDataLength (padded), bodyLength
	if err != nil {
		return err
	}
	for k := range n {
		blk := footer[start+24*k:]
		off := int64(binary.LittleEndian.Uint64(blk))
		mlen := int64(int32(binary.LittleEndian.Uint32(blk[8:])))
		body := int64(binary.LittleEndian.Uint64(blk[16:]))
		if off < 0 || mlen < 8 || body < 0 || off > size || mlen > size-off || body > size-off-mlen {
			return fmt.Errorf("record batch %d lies outside the file", k)
		}
		meta := make([]byte, mlen)
		if _, err := r.ReadAt(meta, off); err != nil {
			return err
		}
		msg, _, err := encapsulated(meta)
		if err == nil {
			err = msg.recordBatchMessage()
		}
		if err != nil {
			return fmt.Errorf("record batch %d: %w", k, err)
		}
	}
	return nil
}
