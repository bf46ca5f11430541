package runs

import (
	"math"
	"os"
	"path/filepath"
	"testing"
)

// TestSpecParts: a chip in parts (two disjoint line:4) records its part
// count in the metadata, FromMeta accepts it again from that key alone,
// and the limit is the product of the parts' Haar values (2/17)² (a fact of
// the Haar measure: independent parts; Z_H = 2/(D+1), design.md §3).
// Without the key, or with a wrong count, the same edges are refused.
func TestSpecParts(t *testing.T) {
	path := filepath.Join(t.TempDir(), "two.edges")
	if err := os.WriteFile(path, []byte("0 1\n1 2\n2 3\n4 5\n5 6\n6 7\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := NewSpec(Options{Graph: path}); err == nil {
		t.Fatal("a chip in parts accepted without AllowDisconnected")
	}
	sp, err := NewSpec(Options{Graph: path, AllowDisconnected: true})
	if err != nil {
		t.Fatal(err)
	}
	want := math.Pow(2.0/17, 2)
	if sp.Parts != 2 || math.Abs(sp.Limit()-want) > 1e-15 {
		t.Fatalf("parts %d, limit %v; want 2, %v", sp.Parts, sp.Limit(), want)
	}
	meta := sp.Meta("test")
	if v, _ := meta.Get(KeyParts); v != "2" {
		t.Fatalf("metadata %s = %q, want 2", KeyParts, v)
	}
	back, err := FromMeta(meta)
	if err != nil {
		t.Fatal(err)
	}
	if back.Parts != 2 || back.Limit() != sp.Limit() {
		t.Errorf("FromMeta: parts %d, limit %v", back.Parts, back.Limit())
	}
	wrong := meta
	wrong.Keys, wrong.Values = append([]string(nil), meta.Keys...), append([]string(nil), meta.Values...)
	wrong.Set(KeyParts, "3")
	if _, err := FromMeta(wrong); err == nil {
		t.Error("FromMeta accepted parts 3 for edges in 2 parts")
	}
	var none = meta
	none.Keys, none.Values = nil, nil
	for i, k := range meta.Keys {
		if k != KeyParts {
			none.Set(k, meta.Values[i])
		}
	}
	if _, err := FromMeta(none); err == nil {
		t.Error("FromMeta accepted a chip in parts without the parts key")
	}
	conn, err := NewSpec(Options{Graph: "line:8", AllowDisconnected: true})
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := conn.Meta("").Get(KeyParts); ok || conn.Parts != 0 {
		t.Error("a connected chip records parts")
	}
}
