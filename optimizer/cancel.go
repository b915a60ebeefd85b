package optimizer

import (
	"context"
	"errors"
)

// cancelEvery is how many settled nodes the search runs between two looks
// at its context: a power of two, so the test is a mask. A whole plan of
// the demo long-haul flight (3,231 settled nodes) takes about 28 ms in
// BenchmarkPlanLongHaul on the 2-core test machine, some 9 us a node, so
// a cancelled search stops within a few milliseconds while the look
// itself, a mutex, stays out of the profile.
const cancelEvery = 256

// CancelledError is returned by SolveContext and AssessContext when their
// context is done before the result is complete. It wraps the context's
// error, so errors.Is(err, context.Canceled) and errors.Is(err,
// context.DeadlineExceeded) tell the two apart.
type CancelledError struct {
	Err error // ctx.Err()
}

func (e *CancelledError) Error() string { return "optimizer: stopped before the end: " + e.Err.Error() }

func (e *CancelledError) Unwrap() error { return e.Err }

// ctxErr is ctx.Err() wrapped in a CancelledError, or nil when ctx is nil
// or not done.
func ctxErr(ctx context.Context) error {
	if ctx == nil {
		return nil
	}
	if err := ctx.Err(); err != nil {
		return &CancelledError{Err: err}
	}
	return nil
}

// isCancelled reports whether err comes from a done context (ctxErr).
func isCancelled(err error) bool {
	var c *CancelledError
	return errors.As(err, &c)
}
