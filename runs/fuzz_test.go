package runs

import (
	"testing"

	"mixdepth/tables"
)

// FuzzMetaLists: the metadata list parsers (ParseIDs, ParseDepths,
// ParseEdges, ParsePart) and FromMeta take any text without panicking, and
// every id list that parses is ascending and formats back to itself.
func FuzzMetaLists(f *testing.F) {
	for _, s := range []string{"0-9,12,15-20", "1:20", "2,4,8", "1:40:2,50", "0 1,1 2", "1/3", "", "-", "9223372036854775807", "1:10:9223372036854775807", "0-9223372036854775807"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if ids, err := ParseIDs(s); err == nil {
			for i := 1; i < len(ids); i++ {
				if ids[i] <= ids[i-1] {
					t.Fatalf("ParseIDs(%q) = %v, not ascending", s, ids)
				}
			}
			if back, err := ParseIDs(FormatIDs(ids)); err != nil || len(back) != len(ids) {
				t.Errorf("ParseIDs(FormatIDs(%v)) = %v, %v", ids, back, err)
			}
		}
		if d, err := ParseDepths(s); err == nil {
			for _, x := range d {
				if x < 1 || x > MaxDepth {
					t.Errorf("ParseDepths(%q) gave depth %d", s, x)
				}
			}
		}
		ParseEdges(s)
		ParsePart(s)
		var m tables.Meta
		for _, k := range []string{"graph", "edges", "layers", "schedule", "gates", "seed", "instances"} {
			m.Set(k, s)
		}
		FromMeta(m)
	})
}
