package tables

import (
	"fmt"
	"slices"

	"github.com/apache/arrow-go/v18/arrow"
)

// Meta is the run metadata of a table: ordered string key/value pairs, stored
// as Arrow schema metadata in the given order. Keys[i] goes with Values[i].
// The zero Meta is empty and ready to use.
type Meta struct {
	Keys, Values []string
}

// Set sets the value of key, replacing the first pair with that key or
// appending a new pair at the end.
func (m *Meta) Set(key, value string) {
	if i := slices.Index(m.Keys, key); i >= 0 {
		m.Values[i] = value
		return
	}
	m.Keys = append(m.Keys, key)
	m.Values = append(m.Values, value)
}

// Get returns the value of the first pair with the given key and whether
// there is one.
func (m Meta) Get(key string) (string, bool) {
	if i := slices.Index(m.Keys, key); i >= 0 {
		return m.Values[i], true
	}
	return "", false
}

// Len returns the number of pairs.
func (m Meta) Len() int { return len(m.Keys) }

// arrow returns m as Arrow metadata. It panics if the key and value lists
// differ in length.
func (m Meta) arrow() arrow.Metadata {
	if len(m.Keys) != len(m.Values) {
		panic(fmt.Sprintf("tables: Meta has %d keys and %d values", len(m.Keys), len(m.Values)))
	}
	return arrow.NewMetadata(m.Keys, m.Values)
}

// metaFrom copies Arrow metadata into a Meta, without the key sealKey.
func metaFrom(md arrow.Metadata) Meta {
	m := Meta{Keys: slices.Clone(md.Keys()), Values: slices.Clone(md.Values())}
	if i := slices.Index(m.Keys, sealKey); i >= 0 {
		m.Keys = slices.Delete(m.Keys, i, i+1)
		m.Values = slices.Delete(m.Values, i, i+1)
	}
	return m
}

// sealed reports whether the Arrow schema s says that its table records
// its checksums (sealKey).
func sealed(s *arrow.Schema) bool { return s.Metadata().FindKey(sealKey) >= 0 }
