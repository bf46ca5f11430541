// Package crash carries panics out of worker goroutines. A panic in a
// goroutine that nobody recovers ends the process with Go's own exit status
// 2, which a batch script cannot tell from bad input; so every goroutine the
// project starts recovers its panic, and either returns it as an error that
// wraps ErrPanic (Recover) or hands it to the goroutine that waits for it
// (Carrier), which panics again with the original stack.
package crash

import (
	"errors"
	"fmt"
	"runtime/debug"
	"sync"
)

// ErrPanic is wrapped by every *Error: a recovered panic, a bug in the
// program rather than a problem with its input.
var ErrPanic = errors.New("internal error")

// Error is a recovered panic with the stack of the goroutine that panicked.
type Error struct {
	Value any
	Stack []byte
}

func (e *Error) Error() string {
	return fmt.Sprintf("internal error (%v): this is a bug in mixdepth; please report it with the command line", e.Value)
}

// Unwrap returns ErrPanic.
func (e *Error) Unwrap() error { return ErrPanic }

// From returns the *Error for a value recovered from a panic: the value
// itself when it already is one (a panic carried from another goroutine,
// whose stack is kept), else a new one with the current stack.
func From(p any) *Error {
	if e, ok := p.(*Error); ok {
		return e
	}
	return &Error{Value: p, Stack: debug.Stack()}
}

// Recover, deferred at the top of a goroutine that returns an error, turns
// its panic into an *Error in *err.
func Recover(err *error) {
	if p := recover(); p != nil {
		*err = From(p)
	}
}

// Carrier collects the first panic of a group of goroutines so that the
// goroutine waiting for them can panic with it. The zero Carrier is ready.
type Carrier struct {
	once sync.Once
	err  *Error
}

// Catch, deferred at the top of a goroutine, records its panic.
func (c *Carrier) Catch() {
	if p := recover(); p != nil {
		e := From(p)
		c.once.Do(func() { c.err = e })
	}
}

// Rethrow panics with the first recorded panic, if any; call it after the
// goroutines have finished.
func (c *Carrier) Rethrow() {
	if c.err != nil {
		panic(c.err)
	}
}
