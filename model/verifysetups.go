package model

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"
)

// SetupError is the error of one setup of VerifySetups, with its position.
type SetupError struct {
	Index int // position in the setups
	Err   error
}

func (e *SetupError) Error() string { return e.Err.Error() }
func (e *SetupError) Unwrap() error { return e.Err }

// VerifySetups runs Verify for each setup on the same car, road cases and
// options, at most parallel at a time (at least one), and returns the
// reports in the order of setups. Each report depends only on its setup
// and opt (case i of every setup draws its road from the stream
// (opt.Seed, i)), never on which goroutine ran it or when, so the reports
// are the same whatever parallel. done, when not nil, is called as each
// check ends (from its goroutine).
//
// After an error no further setup is started, and the error of the first
// failed setup in order is returned as a *SetupError. Verify cannot be
// cancelled: when ctx ends, VerifySetups returns at once with an error
// wrapping ctx.Err() and leaves the running checks to finish on their
// own, their results unused.
func VerifySetups(ctx context.Context, v Vehicle, cases []RoadCase, setups []Setup, opt VerifyOptions, parallel int, done func()) ([]*VerifyReport, error) {
	reps := make([]*VerifyReport, len(setups))
	errs := make([]error, len(setups))
	var next atomic.Int64 // index of the next setup to start
	var failed atomic.Bool
	var wg sync.WaitGroup
	for range min(max(parallel, 1), len(setups)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for !failed.Load() && ctx.Err() == nil {
				i := int(next.Add(1) - 1)
				if i >= len(setups) {
					return
				}
				reps[i], errs[i] = Verify(v, cases, setups[i], opt)
				if done != nil {
					done()
				}
				if errs[i] != nil {
					failed.Store(true)
				}
			}
		}()
	}
	all := make(chan struct{})
	go func() { wg.Wait(); close(all) }()
	select {
	case <-all:
	case <-ctx.Done():
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("interrupted: %w", err)
	}
	for i, err := range errs {
		if err != nil {
			return nil, &SetupError{Index: i, Err: err}
		}
	}
	return reps, nil
}
