package crash

import (
	"errors"
	"strings"
	"sync"
	"testing"
)

// TestRecoverInGoroutine: a goroutine's panic becomes an error that wraps
// ErrPanic and keeps the panicking goroutine's stack (common practice: an
// unrecovered goroutine panic would end the process with Go's status 2).
func TestRecoverInGoroutine(t *testing.T) {
	var err error
	var wg sync.WaitGroup
	wg.Add(1)
	go func() {
		defer wg.Done()
		err = func() (err error) {
			defer Recover(&err)
			panic("boom")
		}()
	}()
	wg.Wait()
	var e *Error
	if !errors.Is(err, ErrPanic) || !errors.As(err, &e) || e.Value != "boom" || !strings.Contains(string(e.Stack), "crash_test.go") {
		t.Fatalf("got %v (%#v)", err, e)
	}
}

// TestCarrierRethrow: the first panic of a group is raised again in the
// waiting goroutine, as the same *Error (its stack kept); no panic, no raise.
func TestCarrierRethrow(t *testing.T) {
	var c Carrier
	var wg sync.WaitGroup
	for i := range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer c.Catch()
			if i == 2 {
				panic("part 2")
			}
		}()
	}
	wg.Wait()
	got := func() (err error) {
		defer Recover(&err)
		c.Rethrow()
		return nil
	}()
	var e *Error
	if !errors.As(got, &e) || e.Value != "part 2" {
		t.Fatalf("rethrown %v", got)
	}
	var quiet Carrier
	quiet.Rethrow() // must not panic
}
