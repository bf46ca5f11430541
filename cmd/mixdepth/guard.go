package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"mixdepth/internal/atomicfile"
	"mixdepth/internal/crash"
)

// exitPanic is the exit status of a crash inside the tool: a recovered panic
// is a bug, never the user's mistake, so it must not share status 2 with bad
// input. 70 is EX_SOFTWARE, "internal software error", of BSD sysexits.h.
const exitPanic = 70

// recovered turns a panic of the calling goroutine into a *crash.Error in
// *err (exit status exitPanic); deferred at the top of run. Panics of the
// library's worker goroutines arrive as *crash.Error values already.
func recovered(err *error) {
	if p := recover(); p != nil { // recover works only in the deferred function itself
		*err = crash.From(p)
	}
}

// reportWriter passes writes on to w and keeps the first error, so that a
// report whose output failed (a full disk, a closed pipe) exits 1 whatever
// the command did with the error of each write.
type reportWriter struct {
	w   io.Writer
	err error
}

func (r *reportWriter) Write(p []byte) (int, error) {
	if r.err != nil {
		return 0, r.err
	}
	n, err := r.w.Write(p)
	if err != nil {
		r.err = err
	}
	return n, err
}

// maxEcho bounds the part of a user-given value that a message repeats.
const maxEcho = 64

// namedFile is a file given to a command; files are compared by device and
// inode (os.SameFile), so that a symbolic or hard link to an input is caught.
type namedFile struct {
	flag, path string
	info       os.FileInfo
}

// echo returns s, or its first maxEcho bytes and an ellipsis with the
// length, for quoting in a message.
func echo(s string) string {
	if len(s) <= maxEcho {
		return s
	}
	cut := maxEcho
	for cut > 0 && !utf8Start(s[cut]) {
		cut--
	}
	return fmt.Sprintf("%s… (%d bytes)", s[:cut], len(s))
}

func utf8Start(b byte) bool { return b&0xC0 != 0x80 }

// strictNumber wraps a pflag numeric Value so that it reads what a user
// means: integers in decimal only (pflag would read 010 as octal 8 and
// accept 0x10), floating-point values in decimal and finite.
type strictNumber struct {
	pflag.Value
}

// strictFlags wraps every numeric flag of fs in a strictNumber. parseFlags
// calls it, so flags that any command adds get the same rules.
func strictFlags(fs *pflag.FlagSet) {
	fs.VisitAll(func(f *pflag.Flag) {
		switch f.Value.Type() {
		case "int", "int8", "int16", "int32", "int64", "uint", "uint8", "uint16", "uint32", "uint64", "float32", "float64":
			if _, done := f.Value.(strictNumber); !done {
				f.Value = strictNumber{f.Value}
			}
		}
	})
}

func (s strictNumber) Set(v string) error {
	t := s.Type()
	if strings.HasPrefix(t, "float") {
		if strings.ContainsAny(v, "xXpP_") {
			return errors.New("write the number in decimal")
		}
		x, err := strconv.ParseFloat(v, 64)
		if err != nil {
			return errors.New("not a number")
		}
		if math.IsInf(x, 0) || math.IsNaN(x) {
			return errors.New("must be finite")
		}
		return s.Value.Set(v)
	}
	digits := strings.TrimPrefix(strings.TrimPrefix(v, "+"), "-")
	if digits == "" || strings.Trim(digits, "0123456789") != "" {
		return errors.New("write a whole number in decimal digits")
	}
	// Leading zeros would make pflag read octal: strip them.
	trimmed := strings.TrimLeft(digits, "0")
	if trimmed == "" {
		trimmed = "0"
	}
	if strings.HasPrefix(v, "-") {
		trimmed = "-" + trimmed
	}
	var err error
	if strings.HasPrefix(t, "uint") {
		_, err = strconv.ParseUint(trimmed, 10, bitSize(t))
	} else {
		_, err = strconv.ParseInt(trimmed, 10, bitSize(t))
	}
	if errors.Is(err, strconv.ErrRange) {
		return errors.New("out of range")
	}
	if err != nil {
		return errors.New("write a whole number in decimal digits")
	}
	return s.Value.Set(trimmed)
}

// bitSize returns the bits of a pflag integer type name (0 for int and
// uint: the platform size, for strconv).
func bitSize(t string) int {
	n, _ := strconv.Atoi(strings.TrimLeft(t, "uint"))
	return n
}

// ioCheck collects the input files and output paths of a command, to refuse
// before any work an output that would replace an input and an output that
// cannot be written.
type ioCheck struct {
	inputs  []namedFile
	outputs []output
}

// output is an output flag (a name without dashes) and its path; allowed
// lists the input flags it may name on purpose (scan writes back to the
// table it resumes).
type output struct {
	namedFile
	allowed []string
}

// input records an input file of the run (flag names the option, with its
// dashes, or the argument). Empty paths, family specs and files that do not
// exist are skipped: only an existing file can be overwritten.
func (c *ioCheck) input(flag, path string) {
	if path == "" {
		return
	}
	if info, err := os.Stat(path); err == nil && info.Mode().IsRegular() {
		c.inputs = append(c.inputs, namedFile{flag: flag, path: path, info: info})
	}
}

// circuitInputs records the files that the circuit flags read.
func (c *ioCheck) circuitInputs(cf *circuitFlags) {
	c.input("--graph", cf.graph)
	c.input("--layout", cf.layout)
	c.input("--gates", cf.gates)
}

// output records the output flag name (without dashes) with its path.
func (c *ioCheck) output(name, path string, allowed ...string) {
	info, _ := os.Stat(path)
	c.outputs = append(c.outputs, output{namedFile{flag: name, path: path, info: info}, allowed})
}

// check refuses, as bad input: an output flag given an empty name, an
// output that is the same file as an input or as another output, and an
// output that cannot be created.
func (c *ioCheck) check(fs *pflag.FlagSet) error {
	for i, o := range c.outputs {
		flag := "--" + o.flag
		if o.path == "" {
			if f := fs.Lookup(o.flag); f != nil && f.Changed {
				return badInput("%s '': give a file name", flag)
			}
			continue
		}
		if o.info != nil {
			for _, in := range c.inputs {
				if os.SameFile(o.info, in.info) && !slices.Contains(o.allowed, in.flag) {
					return badInput("%s %q is the same file as the input %s %q: write the output to another file", flag, echo(o.path), in.flag, echo(in.path))
				}
			}
			for _, p := range c.outputs[:i] {
				if p.info != nil && os.SameFile(o.info, p.info) {
					return badInput("--%s and %s name the same file %q: give each output its own file", p.flag, flag, echo(o.path))
				}
			}
		}
		if err := atomicfile.CheckWritable(o.path); err != nil {
			return badInput("%s %q: cannot write there (%v)", flag, echo(o.path), err)
		}
	}
	return nil
}
