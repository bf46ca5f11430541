package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs the command line in-process and returns stdout, stderr and the
// exit status main would return.
func runCLI(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	code := exitCode(run(context.Background(), args, &out, &errb), &errb)
	return out.String(), errb.String(), code
}

func writeFile(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestBadInput: every bad input exits with status 2 and one line on stderr
// naming the problem, never a panic (the CLI's contract: exit status 2 and one line).
func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	selfLoop := writeFile(t, dir, "self.edges", "0 1\n1 1\n")
	disconnected := writeFile(t, dir, "two.edges", "0 1\n2 3\n")
	words := writeFile(t, dir, "words.edges", "0 one!\n")
	badJSON := writeFile(t, dir, "bad.json", `{"qubits": 4, "layers": [[[0,1]`)
	overlap := writeFile(t, dir, "overlap.json", `{"qubits": 3, "layers": [[[0,1],[1,2]]]}`)
	notInGraph := writeFile(t, dir, "far.json", `{"qubits": 4, "layers": [[[0,3]], [[0,1],[2,3]], [[1,2]]]}`)
	cases := []struct {
		name string
		args []string
		want string // a fragment the one-line message must contain
	}{
		{"unknown command", []string{"frobnicate"}, "unknown command"},
		{"unknown flag", []string{"scan", "--nope"}, "unknown flag"},
		{"unknown family", []string{"scan", "--graph", "hexagon:4"}, "unknown graph family"},
		{"missing file", []string{"scan", "--graph", filepath.Join(dir, "absent.edges")}, "no such file"},
		{"N < 2", []string{"scan", "--graph", "line:1"}, "line needs N ≥ 2"},
		{"ring too small", []string{"scan", "--graph", "ring:2"}, "ring needs N ≥ 3"},
		{"bad grid", []string{"scan", "--graph", "grid:3"}, "RxC"},
		{"self-loop", []string{"scan", "--graph", selfLoop}, "self.edges:2: self-loop"},
		{"disconnected", []string{"scan", "--graph", disconnected}, "disconnected"},
		{"bad qubit token", []string{"scan", "--graph", words}, "words.edges:1: not a qubit id or name"},
		{"malformed layout", []string{"scan", "--layout", badJSON}, "bad.json"},
		{"missing layout", []string{"scan", "--layout", filepath.Join(dir, "absent.json")}, "layout"},
		{"overlapping layout", []string{"scan", "--layout", overlap}, "share a qubit"},
		{"layout off graph", []string{"scan", "--graph", "line:4", "--layout", notInGraph}, "does not couple"},
		{"depth zero", []string{"scan", "--graph", "line:4", "--depths", "0:3"}, "not positive"},
		{"depth negative", []string{"scan", "--graph", "line:4", "--depths", "-2"}, "not positive"},
		{"depth words", []string{"scan", "--graph", "line:4", "--depths", "a:b"}, "not a whole number"},
		{"instances zero", []string{"scan", "--graph", "line:4", "--instances", "0"}, "--instances"},
		{"eps zero", []string{"scan", "--graph", "line:4", "--eps", "0"}, "--eps"},
		{"eps one", []string{"scan", "--graph", "line:4", "--eps", "1"}, "--eps"},
		{"confidence", []string{"scan", "--graph", "line:4", "--confidence", "1.5"}, "--confidence"},
		{"schedule", []string{"scan", "--graph", "line:4", "--schedule", "zigzag"}, "--schedule"},
		{"gates", []string{"scan", "--graph", "line:4", "--gates", "magic"}, "--gates"},
		{"too many qubits", []string{"scan", "--graph", "line:40", "--depths", "1", "--instances", "1"}, "GiB"},
		{"unwritable out", []string{"scan", "--graph", "line:4", "--out", filepath.Join(dir, "no", "such", "dir", "t.arrow")}, "--out"},
		{"bad out format", []string{"scan", "--graph", "line:4", "--out", filepath.Join(dir, "t.csv")}, ".arrow or .parquet"},
		{"positional", []string{"scan", "extra"}, "positional"},
		{"precision", []string{"scan", "--graph", "line:4", "--precision", "half"}, "--precision"},
		{"huge depth", []string{"scan", "--graph", "line:4", "--depths", "1:1000000000"}, "largest depth"},
		{"huge instances", []string{"scan", "--graph", "line:4", "--instances", "100000000000"}, "--instances"},
		{"empty part", []string{"scan", "--graph", "line:4", "--instances", "3", "--part", "5/9"}, "selects no instance"},
		{"bad part", []string{"scan", "--graph", "line:4", "--part", "3/3"}, "K counts from 0"},
		{"exact too many qubits", []string{"exact", "--graph", "line:1030"}, "underflows"},
		{"exact random-edge too big", []string{"exact", "--graph", "line:21", "--schedule", "random-edge"}, "at most 20 qubits"},
		{"sample huge depth", []string{"sample", "--graph", "line:4", "--depth", "100000000"}, "--depth"},
		{"plan beyond reach", []string{"plan", "--graph", "line:4", "--fidelity", "1e-10"}, "beyond any experiment"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			stdout, stderr, code := runCLI(t, c.args...)
			if code != 2 {
				t.Fatalf("exit %d, want 2; stderr %q", code, stderr)
			}
			if stdout != "" {
				t.Errorf("stdout not empty: %q", stdout)
			}
			lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n")
			if len(lines) != 1 || !strings.HasPrefix(lines[0], "mixdepth: ") {
				t.Errorf("want one 'mixdepth: ' line on stderr, got %q", stderr)
			}
			if !strings.Contains(stderr, c.want) {
				t.Errorf("stderr %q does not mention %q", stderr, c.want)
			}
		})
	}
	if left, _ := filepath.Glob(filepath.Join(dir, "t.*")); len(left) > 0 {
		t.Errorf("failed runs left files behind: %v", left)
	}
}

func scanJSONOf(t *testing.T, args ...string) scanJSON {
	t.Helper()
	stdout, stderr, code := runCLI(t, append([]string{"scan", "--json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc scanJSON
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("bad JSON: %v\n%s", err, stdout)
	}
	return doc
}

// TestScanDeterminism: results depend only on the seed and instance ids,
// not on the worker count (each instance draws only from the stream of (seed, i)), and a layout file that
// spells out a family's layers gives the family's results.
func TestScanDeterminism(t *testing.T) {
	base := []string{"--graph", "grid:2x3", "--depths", "1,3,6", "--instances", "24", "--seed", "5"}
	one := scanJSONOf(t, append(base, "--workers", "1")...)
	two := scanJSONOf(t, append(base, "--workers", "2")...)
	if !equalRows(one.Rows, two.Rows) {
		t.Errorf("--workers 1 and 2 differ:\n%+v\n%+v", one.Rows, two.Rows)
	}
	// grid:2x3 classes (the grid rule): horizontal c even, horizontal c odd,
	// vertical r even; qubit (r, c) = 3r + c.
	layout := writeFile(t, t.TempDir(), "grid.json",
		`{"qubits": 6, "layers": [[[0,1],[3,4]], [[1,2],[4,5]], [[0,3],[1,4],[2,5]]]}`)
	fromFile := scanJSONOf(t, "--layout", layout, "--depths", "1,3,6", "--instances", "24", "--seed", "5")
	if !equalRows(one.Rows, fromFile.Rows) {
		t.Errorf("layout file and family differ:\n%+v\n%+v", one.Rows, fromFile.Rows)
	}
	other := scanJSONOf(t, "--graph", "grid:2x3", "--depths", "1,3,6", "--instances", "24", "--seed", "6")
	if equalRows(one.Rows, other.Rows) {
		t.Error("seeds 5 and 6 gave identical rows")
	}
}

func equalRows(a, b []scanJSONRow) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		x, y := a[i], b[i]
		if x.Depth != y.Depth || x.GateCount != y.GateCount || x.CollisionMean != y.CollisionMean ||
			deref(x.CollisionStder) != deref(y.CollisionStder) || x.PTKSMean != y.PTKSMean {
			return false
		}
	}
	return true
}

// TestScanJSONFields checks the documented field names of scan --json.
func TestScanJSONFields(t *testing.T) {
	stdout, _, code := runCLI(t, "scan", "--json", "--graph", "line:4", "--depths", "1:3", "--instances", "8")
	if code != 0 {
		t.Fatal("scan failed")
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"qubits", "couplers", "haar_collision", "seed", "instances", "eps", "recommended_depth", "pt_ks_haar", "rule", "pt_margin", "rows"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("missing top-level field %q", k)
		}
	}
	rows := doc["rows"].([]any)
	if len(rows) != 3 {
		t.Fatalf("%d rows, want 3", len(rows))
	}
	for _, k := range []string{"depth", "gate_count", "collision_mean", "collision_stderr", "collision_ratio", "ratio_lower", "ratio_upper", "pt_ks_mean", "verdict", "spread", "r_within_band", "pt_near_haar"} {
		if _, ok := rows[0].(map[string]any)[k]; !ok {
			t.Errorf("missing row field %q", k)
		}
	}
	if doc["seed"].(float64) != defaultSeed {
		t.Errorf("seed %v, want the default %d", doc["seed"], defaultSeed)
	}
}

// TestScanSingleInstanceJSON: one instance has no error bar; the JSON says
// null rather than failing on NaN.
func TestScanSingleInstanceJSON(t *testing.T) {
	doc := scanJSONOf(t, "--graph", "line:4", "--depths", "1,2", "--instances", "1")
	for _, r := range doc.Rows {
		if r.CollisionStder != nil || r.RatioLower != nil || r.RatioUpper != nil {
			t.Errorf("row %+v: want null stderr and interval", r)
		}
	}
}

func TestParseDepths(t *testing.T) {
	cases := []struct {
		spec string
		want []int
	}{
		{"1:5", []int{1, 2, 3, 4, 5}},
		{"2,4,8", []int{2, 4, 8}},
		{"1:9:4", []int{1, 5, 9}},
		{"8,1:3,2", []int{1, 2, 3, 8}},
		{"7", []int{7}},
	}
	for _, c := range cases {
		got, err := parseDepths(c.spec)
		if err != nil || !slicesEqual(got, c.want) {
			t.Errorf("parseDepths(%q) = %v, %v; want %v", c.spec, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "0", "3:1", "1:5:0", "1:2:3:4", "x", "1,,2"} {
		if _, err := parseDepths(bad); err == nil {
			t.Errorf("parseDepths(%q) accepted", bad)
		}
	}
}

func slicesEqual(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestHelp: every subcommand's --help exits 0 and shows an example.
func TestHelp(t *testing.T) {
	for _, c := range commands {
		stdout, _, code := runCLI(t, c.name, "--help")
		if code != 0 || !strings.Contains(stdout, "Example:") {
			t.Errorf("%s --help: exit %d, output %q", c.name, code, stdout)
		}
	}
	if stdout, _, code := runCLI(t); code != 0 || !strings.Contains(stdout, "scan") {
		t.Errorf("overview: exit %d, %q", code, stdout)
	}
}

// TestHelpSynopsis: the Usage line of a command that takes arguments shows
// them, and the synopsis appears once, not again in the text below it.
func TestHelpSynopsis(t *testing.T) {
	for name, synopsis := range map[string]string{
		"scan":      "scan",
		"exact":     "exact",
		"sample":    "sample",
		"plan":      "plan",
		"graph":     "graph [SPEC|FILE]",
		"show":      "show FILE",
		"score":     "score FILE",
		"merge":     "merge --out FILE PART...",
		"summarize": "summarize FILE...",
		"compare":   "compare FILE... --plot OUT",
		"pt-plot":   "pt-plot FILE --out PLOT.png|PLOT.svg",
	} {
		stdout, _, code := runCLI(t, "help", name)
		first, rest, _ := strings.Cut(stdout, "\n")
		if want := "Usage: mixdepth " + synopsis + " [flags]"; code != 0 || first != want {
			t.Errorf("help %s: exit %d, first line %q, want %q", name, code, first, want)
		}
		desc, _, _ := strings.Cut(rest, "\nExample:\n")
		for _, line := range strings.Split(desc, "\n") {
			if strings.HasPrefix(line, "mixdepth "+name) {
				t.Errorf("help %s repeats its synopsis below the Usage line: %q", name, line)
			}
		}
	}
}
