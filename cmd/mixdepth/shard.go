package main

import (
	"strconv"
	"strings"
)

// shardSpec is a --shard K/N selection: the instances i with i mod N = K.
type shardSpec struct{ k, n int }

// parseShard reads "K/N" with 0 ≤ K < N; "" means the whole run (0/1).
func parseShard(spec string) (shardSpec, error) {
	if spec == "" {
		return shardSpec{0, 1}, nil
	}
	ks, ns, ok := strings.Cut(spec, "/")
	k, err1 := strconv.Atoi(ks)
	n, err2 := strconv.Atoi(ns)
	if !ok || err1 != nil || err2 != nil || n < 1 || k < 0 || k >= n {
		return shardSpec{}, badInput("--shard %q: write K/N with 0 ≤ K < N, for example 0/4", spec)
	}
	return shardSpec{k, n}, nil
}

// String returns "K/N".
func (s shardSpec) String() string { return strconv.Itoa(s.k) + "/" + strconv.Itoa(s.n) }

// whole reports whether the shard is the whole run.
func (s shardSpec) whole() bool { return s.n == 1 }

// instances returns the ids i < total with i mod N = K, ascending.
func (s shardSpec) instances(total int) []int {
	var ids []int
	for i := s.k; i < total; i += s.n {
		ids = append(ids, i)
	}
	return ids
}

// formatIDs writes ascending ids compactly as ranges: "0-9,12,15-20".
func formatIDs(ids []int) string {
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

// parseIDs reads the output of formatIDs: ascending, non-overlapping ids
// and ranges, at most maxInstances ids in all (the list comes from table
// metadata, so it is checked before it is expanded).
func parseIDs(s string) ([]int, error) {
	var ids []int
	if s == "" {
		return nil, nil
	}
	next := 0 // the smallest id the next item may start at
	for _, part := range strings.Split(s, ",") {
		lo, hi, isRange := strings.Cut(part, "-")
		a, err := strconv.Atoi(lo)
		if err != nil || a < 0 {
			return nil, badInput("instance list %q: %q is not an instance id", s, lo)
		}
		b := a
		if isRange {
			if b, err = strconv.Atoi(hi); err != nil || b < a {
				return nil, badInput("instance list %q: bad range %q", s, part)
			}
		}
		if a < next {
			return nil, badInput("instance list %q: %q is out of order or overlaps the item before it", s, part)
		}
		if len(ids)+(b-a) >= maxInstances {
			return nil, badInput("instance list %q: more than %d instances", s, maxInstances)
		}
		for i := a; i <= b; i++ {
			ids = append(ids, i)
		}
		next = b + 1
	}
	return ids, nil
}
