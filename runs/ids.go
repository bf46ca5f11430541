package runs

import (
	"fmt"
	"slices"
	"strconv"
	"strings"
)

// Bounds of a run: deeper circuits than a million steps, more than ten
// thousand read-out depths, or more than ten million instances (ids and
// per-instance records are held in memory) are typos.
const (
	MaxDepth      = 1_000_000
	MaxDepthCount = 10_000
	MaxInstances  = 10_000_000
)

// ListError reports a list (of depths, of instance ids, a part) that cannot
// be read. What names the kind of list, List is the text, Detail the reason.
type ListError struct {
	What, List, Detail string
}

// Error names the list, its text and the reason.
func (e *ListError) Error() string {
	return fmt.Sprintf("runs: %s %q: %s", e.What, e.List, e.Detail)
}

// ParseDepths reads a depth list such as "1:20", "2,4,8" or "1:40:2,50":
// items separated by commas, each a depth or a range FROM:TO or FROM:TO:STEP.
// It returns the depths ascending without repeats; every depth lies in
// [1, MaxDepth] and there are at most MaxDepthCount. Errors are *ListError
// values with What "depths".
func ParseDepths(spec string) ([]int, error) {
	bad := func(format string, args ...any) error {
		return &ListError{What: "depths", List: spec, Detail: fmt.Sprintf(format, args...)}
	}
	var out []int
	for _, item := range strings.Split(spec, ",") {
		item = strings.TrimSpace(item)
		parts := strings.Split(item, ":")
		if len(parts) > 3 || item == "" {
			return nil, bad("write depths as a list like 2,4,8 or ranges FROM:TO or FROM:TO:STEP")
		}
		nums := make([]int, len(parts))
		for i, p := range parts {
			v, err := strconv.Atoi(p)
			if err != nil {
				return nil, bad("%q is not a whole number", p)
			}
			nums[i] = v
		}
		from, to, step := nums[0], nums[0], 1
		if len(nums) >= 2 {
			to = nums[1]
		}
		if len(nums) == 3 {
			step = nums[2]
		}
		if step <= 0 || to < from {
			return nil, bad("a range FROM:TO:STEP needs FROM ≤ TO and STEP ≥ 1")
		}
		if to > MaxDepth {
			return nil, bad("depth %d is beyond the largest depth, %d; ask for smaller depths", to, MaxDepth)
		}
		if len(out)+(to-from)/step >= MaxDepthCount {
			return nil, bad("more than %d depths; use a step (FROM:TO:STEP)", MaxDepthCount)
		}
		if from <= 0 {
			return nil, bad("depth %d is not positive; depths start at 1", from)
		}
		for d := from; d <= to; d += step {
			out = append(out, d)
			if step > to-d { // d+step would pass to, or overflow
				break
			}
		}
	}
	slices.Sort(out)
	return slices.Compact(out), nil
}

// FormatIDs writes ascending ids compactly as ranges: "0-9,12,15-20".
func FormatIDs(ids []int) string {
	var b strings.Builder
	for i := 0; i < len(ids); {
		j := i
		for j+1 < len(ids) && ids[j+1] == ids[j]+1 {
			j++
		}
		if b.Len() > 0 {
			b.WriteByte(',')
		}
		b.WriteString(strconv.Itoa(ids[i]))
		if j > i {
			b.WriteByte('-')
			b.WriteString(strconv.Itoa(ids[j]))
		}
		i = j + 1
	}
	return b.String()
}

// ParseIDs reads the output of FormatIDs: ascending, non-overlapping ids and
// ranges, at most MaxInstances ids in all (the list comes from table
// metadata, so it is checked before it is expanded). Errors are *ListError
// values with What "instance list".
func ParseIDs(s string) ([]int, error) {
	bad := func(format string, args ...any) error {
		return &ListError{What: "instance list", List: s, Detail: fmt.Sprintf(format, args...)}
	}
	var ids []int
	if s == "" {
		return nil, nil
	}
	next := 0 // the smallest id the next item may start at
	for _, part := range strings.Split(s, ",") {
		lo, hi, isRange := strings.Cut(part, "-")
		a, err := strconv.Atoi(lo)
		if err != nil || a < 0 {
			return nil, bad("%q is not an instance id", lo)
		}
		b := a
		if isRange {
			if b, err = strconv.Atoi(hi); err != nil || b < a {
				return nil, bad("bad range %q", part)
			}
		}
		if a < next {
			return nil, bad("%q is out of order or overlaps the item before it", part)
		}
		if b >= MaxInstances { // ids lie below the instance cap; this also keeps i++ from overflowing
			return nil, bad("instance id %d is beyond the largest, %d", b, MaxInstances-1)
		}
		if len(ids)+(b-a) >= MaxInstances {
			return nil, bad("more than %d instances", MaxInstances)
		}
		for i := a; i <= b; i++ {
			ids = append(ids, i)
		}
		next = b + 1
	}
	return ids, nil
}

// Part is one part K/N of a run split for a job array: the instances i with
// i mod N = K. K counts from 0; the zero Part is invalid, Whole is 0/1.
type Part struct{ K, N int }

// Whole is the part that holds the whole run.
var Whole = Part{0, 1}

// ParsePart reads "K/N" with 0 ≤ K < N; "" means Whole. Errors are
// *ListError values with What "part".
func ParsePart(spec string) (Part, error) {
	if spec == "" {
		return Whole, nil
	}
	ks, ns, ok := strings.Cut(spec, "/")
	k, err1 := strconv.Atoi(ks)
	n, err2 := strconv.Atoi(ns)
	if !ok || err1 != nil || err2 != nil || n < 1 || k < 0 || k >= n {
		return Part{}, &ListError{What: "part", List: spec, Detail: "write K/N with 0 ≤ K < N (K counts from 0), for example 0/4"}
	}
	return Part{k, n}, nil
}

// String returns "K/N".
func (p Part) String() string { return strconv.Itoa(p.K) + "/" + strconv.Itoa(p.N) }

// IsWhole reports whether the part is the whole run.
func (p Part) IsWhole() bool { return p.N == 1 }

// Instances returns the ids i < total with i mod N = K, ascending. It panics
// if the part is not valid (0 ≤ K < N).
func (p Part) Instances(total int) []int {
	if p.N < 1 || p.K < 0 || p.K >= p.N {
		panic(fmt.Sprintf("runs: invalid part %d/%d", p.K, p.N))
	}
	var ids []int
	for i := p.K; i < total; i += p.N {
		ids = append(ids, i)
	}
	return ids
}
