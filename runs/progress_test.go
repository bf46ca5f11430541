package runs

import (
	"strings"
	"testing"
	"time"
)

// TestProgressLine checks the line's arithmetic on a fixed clock: 100 of
// 400 units in 50 s is 2 per second, 150 s left; nothing during the quiet
// time.
func TestProgressLine(t *testing.T) {
	p := NewProgress(nil, "instances", 400, true)
	p.start = time.Unix(1000, 0)
	if _, ok := p.Line(p.start.Add(59 * time.Second)); ok {
		t.Error("a line within the quiet minute")
	}
	p.Quiet = 0
	if line, _ := p.Line(p.start.Add(30 * time.Second)); !strings.Contains(line, "0/400 instances (0%), none finished after 30s") {
		t.Errorf("no unit done: %q", line)
	}
	for range 100 {
		p.Done()
	}
	want := "progress: 100/400 instances (25%), 2 per second, about 2m30s left"
	if line, ok := p.Line(p.start.Add(50 * time.Second)); !ok || line != want {
		t.Errorf("line %q, want %q", line, want)
	}
}
