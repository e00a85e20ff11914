package jobs

import (
	"context"
	"errors"
	"time"
)

// Watch returns a channel of snapshots of job id for the API's progress
// stream: the job as it is now, then each time its progress or state
// changes, polled every Config.WatchInterval. The channel is closed after
// the snapshot of a terminal state has been delivered, or when ctx is
// done. A slow reader misses intermediate snapshots, never the last one.
// An unknown id gives a *NotFoundError at once.
func (e *Engine) Watch(ctx context.Context, id string) (<-chan *Job, error) {
	j, err := e.Get(ctx, id)
	if err != nil {
		return nil, err
	}
	ch := make(chan *Job, 1)
	go func() {
		defer close(ch)
		t := time.NewTicker(e.cfg.WatchInterval)
		defer t.Stop()
		last := j
		if !send(ctx, ch, j) {
			return
		}
		for !last.State.Terminal() {
			select {
			case <-ctx.Done():
				return
			case <-t.C:
			}
			j, err := e.Get(ctx, id)
			if err != nil {
				// A passing database error: try again at the next tick.
				// A deleted job cannot be watched further.
				if ctx.Err() != nil || isNotFound(err) {
					return
				}
				continue
			}
			if j.State == last.State && j.Progress.UpdatedAt.Equal(last.Progress.UpdatedAt) && j.CancelRequested == last.CancelRequested {
				continue
			}
			last = j
			if !send(ctx, ch, j) {
				return
			}
		}
	}()
	return ch, nil
}

func send(ctx context.Context, ch chan<- *Job, j *Job) bool {
	select {
	case ch <- j:
		return true
	case <-ctx.Done():
		return false
	}
}

func isNotFound(err error) bool { return errors.Is(err, ErrNotFound) }
