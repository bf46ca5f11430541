package main

import (
	"bytes"
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// catalogueCase is one bad input of the hardening catalogue (issue 14): the
// arguments ({dir} stands for the case's directory), the files to create,
// the exit status and a fragment of the one-line message, and the files that
// must be byte for byte unchanged afterwards.
type catalogueCase struct {
	name   string
	files  map[string]string
	args   []string
	code   int
	frag   string
	intact []string
}

const chipEdges = "0 1\n1 2\n2 3\n"

// catalogue holds at least three rows for each class of issue 14.
var catalogue = []catalogueCase{
	// 1. Damaged tables.
	{name: "show a text file named .arrow", files: map[string]string{"t.arrow": "not a table\n"},
		args: []string{"show", "{dir}/t.arrow"}, code: 2, frag: "not a complete table", intact: []string{"t.arrow"}},
	{name: "summarize a text file named .parquet", files: map[string]string{"t.parquet": "PAR1 junk PAR1"},
		args: []string{"summarize", "{dir}/t.parquet"}, code: 2, frag: "not a complete table", intact: []string{"t.parquet"}},
	{name: "merge an empty table file", files: map[string]string{"a.arrow": ""},
		args: []string{"merge", "--out", "{dir}/m.arrow", "{dir}/a.arrow"}, code: 2, frag: "not a complete table", intact: []string{"a.arrow"}},
	{name: "resume an Arrow file cut short", files: map[string]string{"r.arrow": "ARROW1\x00\x00\xff\xff\xff\xff"},
		args: []string{"scan", "--graph", "line:3", "--depths", "2", "--instances", "4", "--resume", "{dir}/r.arrow"}, code: 2, frag: "not a complete table", intact: []string{"r.arrow"}},
	// 2. An output never overwrites an input.
	{name: "scan --out onto the graph file", files: map[string]string{"chip.txt": chipEdges},
		args: []string{"scan", "--graph", "{dir}/chip.txt", "--out", "{dir}/chip.txt"}, code: 2, frag: "same file as the input --graph", intact: []string{"chip.txt"}},
	{name: "scan --plot onto a link to the graph", files: map[string]string{"chip.txt": chipEdges, "@link.png": "chip.txt"},
		args: []string{"scan", "--graph", "{dir}/chip.txt", "--plot", "{dir}/link.png"}, code: 2, frag: "same file as the input --graph", intact: []string{"chip.txt"}},
	{name: "sample --circuits onto the gate file", files: map[string]string{"gates.json": "{}"},
		args: []string{"sample", "--graph", "line:3", "--gates", "{dir}/gates.json", "--circuits", "{dir}/gates.json"}, code: 2, frag: "same file as the input --gates", intact: []string{"gates.json"}},
	{name: "exact --out onto the layout file", files: map[string]string{"layout.json": "{}"},
		args: []string{"exact", "--layout", "{dir}/layout.json", "--out", "{dir}/layout.json"}, code: 2, frag: "same file as the input --layout", intact: []string{"layout.json"}},
	{name: "merge --out onto a part", files: map[string]string{"a.arrow": "x"},
		args: []string{"merge", "--out", "{dir}/a.arrow", "{dir}/a.arrow"}, code: 2, frag: "same file as the input part", intact: []string{"a.arrow"}},
	{name: "pt-plot --out onto its table", files: map[string]string{"t.png": "x"},
		args: []string{"pt-plot", "{dir}/t.png", "--out", "{dir}/t.png"}, code: 2, frag: "same file as the input table", intact: []string{"t.png"}},
	{name: "sample --out and --circuits the same file", files: map[string]string{"chip.txt": chipEdges},
		args: []string{"sample", "--graph", "{dir}/chip.txt", "--out", "{dir}/x.arrow", "--circuits", "{dir}/x.arrow"}, code: 2, intact: []string{"chip.txt"}},
	{name: "scan --out ''", args: []string{"scan", "--graph", "line:3", "--out", ""}, code: 2, frag: "--out '': give a file name"},
	{name: "scan --plot under a file", files: map[string]string{"f": "x"},
		args: []string{"scan", "--graph", "line:3", "--plot", "{dir}/f/p.png"}, code: 2, frag: "--plot", intact: []string{"f"}},
	// 3. Work is bounded before it starts.
	{name: "scan complete:2048", args: []string{"scan", "--graph", "complete:2048"}, code: 2, frag: "needs 2^2051 bytes"},
	{name: "sample complete:2048", args: []string{"sample", "--graph", "complete:2048"}, code: 2, frag: "2048 qubits: sampling takes 2 to 32"},
	{name: "score complete:2048", files: map[string]string{"s.csv": "instance,bitstring\n0,01\n"},
		args: []string{"score", "{dir}/s.csv", "--graph", "complete:2048"}, code: 2, frag: "2048 qubits: scoring takes 2 to 32", intact: []string{"s.csv"}},
	{name: "scan random-edge complete:2048", args: []string{"scan", "--graph", "complete:2048", "--schedule", "random-edge"}, code: 2, frag: "needs 2^2051 bytes"},
	{name: "scan line:100", args: []string{"scan", "--graph", "line:100"}, code: 2, frag: "needs 2^103 bytes"},
	// 4. Numbers mean what they say.
	{name: "--instances 0x10", args: []string{"scan", "--graph", "line:3", "--instances", "0x10"}, code: 2, frag: "decimal"},
	{name: "--instances 1e3", args: []string{"scan", "--graph", "line:3", "--instances", "1e3"}, code: 2, frag: "decimal"},
	{name: "--depths with a huge step", args: []string{"scan", "--graph", "line:3", "--depths", "1:10:9223372036854775807", "--instances", "3", "--json"}, code: 0},
	{name: "--sigmas Inf", args: []string{"plan", "--sigmas", "Inf"}, code: 2, frag: "must be finite"},
	{name: "--eps NaN", args: []string{"scan", "--graph", "line:3", "--eps", "NaN"}, code: 2, frag: "must be finite"},
	{name: "--fidelity hexadecimal", args: []string{"sample", "--graph", "line:3", "--fidelity", "0x1p-1"}, code: 2, frag: "decimal"},
	{name: "pt-plot --depth 0", files: map[string]string{"t.arrow": "x"},
		args: []string{"pt-plot", "{dir}/t.arrow", "--depth", "0", "--out", "{dir}/p.png"}, code: 2, frag: "--depth 0", intact: []string{"t.arrow"}},
	{name: "a long spec is echoed in part", args: []string{"scan", "--graph", "line:3", "--depths", strings.Repeat("9", 5000)}, code: 2, frag: "(5000 bytes)"},
	// 5. Exit statuses never lie.
	{name: "an unknown flag", args: []string{"scan", "--no-such-flag"}, code: 2, frag: "unknown flag"},
	{name: "--workers out of range", args: []string{"scan", "--graph", "line:3", "--workers", "99999999999999999999"}, code: 2, frag: "out of range"},
	{name: "--seed negative", args: []string{"scan", "--graph", "line:3", "--seed", "-1"}, code: 2, frag: "--seed"},
}

// TestCatalogue runs every row of the catalogue through run.
func TestCatalogue(t *testing.T) {
	for _, c := range catalogue {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			before := map[string][]byte{}
			for name, text := range c.files {
				if link, ok := strings.CutPrefix(name, "@"); ok {
					if err := os.Symlink(filepath.Join(dir, text), filepath.Join(dir, link)); err != nil {
						t.Fatal(err)
					}
					continue
				}
				writeFile(t, dir, name, text)
			}
			for _, name := range c.intact {
				b, err := os.ReadFile(filepath.Join(dir, name))
				if err != nil {
					t.Fatal(err)
				}
				before[name] = b
			}
			args := make([]string, len(c.args))
			for i, a := range c.args {
				args[i] = strings.ReplaceAll(a, "{dir}", dir)
			}
			start := time.Now()
			_, stderr, code := runCLI(t, args...)
			if code != c.code {
				t.Errorf("exit %d, want %d; stderr %q", code, c.code, stderr)
			}
			if c.code != 0 && strings.Count(stderr, "\n") != 1 {
				t.Errorf("stderr has %d lines, want one: %q", strings.Count(stderr, "\n"), stderr)
			}
			if !strings.Contains(stderr, c.frag) {
				t.Errorf("stderr %q does not contain %q", stderr, c.frag)
			}
			if strings.HasSuffix(c.name, "complete:2048") && time.Since(start) > 5*time.Second {
				// The check must come before the edge colouring (minutes);
				// 5 s leaves room for a loaded CI machine above the second
				// it takes alone.
				t.Errorf("took %v, want the refusal before any set-up", time.Since(start))
			}
			for name, b := range before {
				after, err := os.ReadFile(filepath.Join(dir, name))
				if err != nil || !bytes.Equal(after, b) {
					t.Errorf("%s changed (err %v)", name, err)
				}
			}
		})
	}
}

// TestInstancesDecimal: --instances 010 is ten instances, not octal eight.
func TestInstancesDecimal(t *testing.T) {
	out, stderr, code := runCLI(t, "scan", "--graph", "line:3", "--depths", "2", "--instances", "010")
	if code != 0 || !strings.Contains(out, "· 10 instances ·") {
		t.Errorf("exit %d, stderr %q; report does not say 10 instances:\n%s", code, stderr, out)
	}
}

// failingWriter fails every write, like a full disk or a closed pipe.
type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, errors.New("no space left on device") }

// TestReportWriteFailure: a report that cannot be written exits 1, for the
// text reports as for --json.
func TestReportWriteFailure(t *testing.T) {
	for _, args := range [][]string{
		{"plan", "--fidelity", "0.5"},
		{"scan", "--graph", "line:3", "--depths", "2", "--instances", "3"},
		{"exact", "--graph", "line:3", "--depths", "2"},
		{"version"},
	} {
		var errb bytes.Buffer
		if code := exitCode(run(context.Background(), args, failingWriter{}, &errb), &errb); code != 1 {
			t.Errorf("%v with a failing stdout: exit %d, want 1 (%q)", args, code, errb.String())
		}
	}
}

// TestPanicExitStatus: a panic inside a command exits 70, not 2, and asks
// for a bug report.
func TestPanicExitStatus(t *testing.T) {
	register(command{name: "panic-for-test", run: func(context.Context, []string, io.Writer, io.Writer) error { panic("boom") }})
	t.Cleanup(func() { commands = commands[:len(commands)-1] })
	_, stderr, code := runCLI(t, "panic-for-test")
	if code != exitPanic || !strings.Contains(stderr, "please report it") {
		t.Errorf("exit %d, stderr %q; want %d and a bug-report request", code, stderr, exitPanic)
	}
}

// TestTableByteFlips writes a small scan table in both formats and shows it
// once with every byte flipped in turn (XOR 0xff): no flip may crash, every
// failure must be exit status 2 with one line, and a flip that reads must
// show the same rows (issue 14's damage sweep through the CLI).
func TestTableByteFlips(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"s.arrow", "s.parquet"} {
		path := filepath.Join(dir, name)
		if _, stderr, code := runCLI(t, "scan", "--graph", "line:3", "--depths", "2", "--instances", "2", "--out", path); code != 0 {
			t.Fatalf("scan: exit %d: %s", code, stderr)
		}
		orig, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		want, _, _ := runCLI(t, "show", path, "--format", "csv")
		failed := 0
		for i := range orig {
			data := bytes.Clone(orig)
			data[i] ^= 0xff
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
			stdout, stderr, code := runCLI(t, "show", path, "--format", "csv")
			switch {
			case code == 0:
				// A flip that reads (padding, bytes the readers do not
				// use) must show the table unchanged.
				if stdout != want {
					t.Errorf("%s byte %d: read silently as other values", name, i)
				}
			case code != 2 || strings.Count(stderr, "\n") != 1:
				t.Errorf("%s byte %d: exit %d, stderr %q; want 0, or 2 with one line", name, i, code, stderr)
			default:
				failed++
			}
		}
		t.Logf("%s: %d bytes, %d flips refused with exit 2, %d read unchanged", name, len(orig), failed, len(orig)-failed)
	}
}
