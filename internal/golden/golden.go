// Package golden keeps the JSON golden files of regression tests: a test
// computes its values, and either rewrites the file from them (when run with
// its -update flag) or reads the pinned values back to compare.
package golden

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
)

// Load reads the golden file at path into want and returns true. When update
// is true it instead writes got to path as indented JSON (creating its
// directory), logs that it did, and returns false: there is nothing to
// compare. A missing or malformed file fails the test with a hint to run
// with -update.
func Load(t testing.TB, path string, update bool, got, want any) bool {
	t.Helper()
	if update {
		data, err := json.MarshalIndent(got, "", " ")
		if err != nil {
			t.Fatal(err)
		}
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, append(data, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
		t.Logf("rewrote %s", path)
		return false
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (create it with go test -run %s -update)", err, t.Name())
	}
	if err := json.Unmarshal(data, want); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return true
}
