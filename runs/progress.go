package runs

import (
	"fmt"
	"io"
	"sync"
	"sync/atomic"
	"time"
)

// ProgressEvery is the interval between two progress lines of a run whose
// stderr is not a terminal (a batch job's log).
const ProgressEvery = 30 * time.Second

// ProgressQuiet is how long a run off a terminal stays silent before its
// first progress line when --progress was not asked for: short runs print
// nothing.
const ProgressQuiet = time.Minute

// Progress counts finished units of a run (instances) and writes, from
// its own goroutine, one line every Every on W once Quiet has passed since
// Start: units done, the rate, and the time left at that rate. Done may be
// called from any goroutine. The zero value is not usable; use NewProgress.
type Progress struct {
	W            io.Writer
	Label        string // "instances"
	Total        int
	Every, Quiet time.Duration

	done  atomic.Int64
	start time.Time
	stop  chan struct{}
	wg    sync.WaitGroup
}

// NewProgress returns a Progress of total units on w with the intervals
// ProgressEvery and, when quiet is true, ProgressQuiet (else no silence).
func NewProgress(w io.Writer, label string, total int, quiet bool) *Progress {
	p := &Progress{W: w, Label: label, Total: total, Every: ProgressEvery}
	if quiet {
		p.Quiet = ProgressQuiet
	}
	return p
}

// Done records one finished unit.
func (p *Progress) Done() { p.done.Add(1) }

// Start starts the clock and the goroutine that writes the lines.
func (p *Progress) Start() {
	p.start = time.Now()
	p.stop = make(chan struct{})
	p.wg.Add(1)
	go func() {
		defer p.wg.Done()
		t := time.NewTicker(p.Every)
		defer t.Stop()
		for {
			select {
			case <-p.stop:
				return
			case now := <-t.C:
				if line, ok := p.Line(now); ok {
					fmt.Fprintln(p.W, line)
				}
			}
		}
	}()
}

// Stop ends the goroutine; no line is written after it returns.
func (p *Progress) Stop() {
	if p.stop != nil {
		close(p.stop)
		p.wg.Wait()
		p.stop = nil
	}
}

// Line returns the progress line at time now, and false while the run is
// within its quiet time:
//
//	progress: 120/400 instances (30%), 2.1 per second, about 2m13s left
func (p *Progress) Line(now time.Time) (string, bool) {
	elapsed := now.Sub(p.start)
	if elapsed < p.Quiet {
		return "", false
	}
	done := int(p.done.Load())
	line := fmt.Sprintf("progress: %d/%d %s (%d%%)", done, p.Total, p.Label, 100*done/max(p.Total, 1))
	if done == 0 || elapsed <= 0 {
		return line + fmt.Sprintf(", none finished after %s", elapsed.Round(time.Second)), true
	}
	rate := float64(done) / elapsed.Seconds()
	left := time.Duration(float64(p.Total-done) / rate * float64(time.Second))
	return line + fmt.Sprintf(", %.3g per second, about %s left", rate, left.Round(time.Second)), true
}
