package jobs

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"github.com/riverqueue/river"
	"github.com/riverqueue/river/rivertype"
)

// A job is stranded when it is queued or running but none of its slices
// is left in River's queue: River discarded the last one after its
// attempts ran out without a worker seeing the end (each attempt's worker
// was killed, and River's rescuer, or a restarted process of the same
// node, gave up on it). Nothing else would ever end such a job, so every
// working engine reaps them, every ReapInterval and at Start; and a
// cancel ends a job at once when no slice of it is running.

// strandedBatch is how many stranded jobs one reap pass settles.
const strandedBatch = 100

// reapLoop reaps every ReapInterval until ctx ends.
func (rq *riverQueue[TTx]) reapLoop(ctx context.Context) {
	t := time.NewTicker(rq.e.cfg.ReapInterval)
	defer t.Stop()
	for {
		select {
		case <-ctx.Done():
			return
		case <-t.C:
		}
		if _, err := rq.reap(ctx); err != nil && ctx.Err() == nil {
			rq.e.cfg.Logger.WarnContext(ctx, "jobs: looking for stranded jobs failed; trying again later", "error", err)
		}
	}
}

// reap settles the stranded jobs and returns how many it found.
func (rq *riverQueue[TTx]) reap(ctx context.Context) (int, error) {
	stranded, err := rq.db.store.JobListStranded(ctx, &JobListStrandedParams{Limit: strandedBatch})
	if err != nil {
		return 0, err
	}
	for _, j := range stranded {
		cause := rq.lastSliceEnd(ctx, j.ID)
		rq.e.cfg.Logger.WarnContext(ctx, "jobs: job has no slice left in the queue", "job", j.ID, "cause", cause)
		if err := rq.settle(ctx, j, cause); err != nil {
			return len(stranded), err
		}
	}
	return len(stranded), nil
}

// slicesOf lists the River jobs of job id's slices in the given states,
// newest first, inside tx (on either backend: see sliceJobID).
func (rq *riverQueue[TTx]) slicesOf(ctx context.Context, tx TTx, id string, states ...rivertype.JobState) ([]*rivertype.JobRow, error) {
	p := river.NewJobListParams().Kinds(sliceKind).States(states...).
		OrderBy(river.JobListOrderByID, river.SortOrderDesc).First(strandedBatch).
		Where(sliceJobID+" = @job_id", river.NamedArgs{"job_id": id})
	res, err := rq.client.JobListTx(ctx, tx, p)
	if err != nil {
		return nil, err
	}
	return res.Jobs, nil
}

// lastSliceEnd tells how the newest finished slice of job id ended, for
// the job's error: "slice 3 discarded after 10 attempts, last: ...".
func (rq *riverQueue[TTx]) lastSliceEnd(ctx context.Context, id string) string {
	var rows []*rivertype.JobRow
	err := rq.db.withTx(ctx, func(tx TTx, _ *sqlStore) error {
		var err error
		rows, err = rq.slicesOf(ctx, tx, id, rivertype.JobStateDiscarded, rivertype.JobStateCancelled)
		return err
	})
	if err != nil || len(rows) == 0 {
		return "its slice left the queue unfinished"
	}
	r := rows[0]
	var args sliceArgs
	_ = json.Unmarshal(r.EncodedArgs, &args) // unreadable: slice 0, in the message only
	msg := fmt.Sprintf("slice %d %s after %d attempts", args.Slice, r.State, r.Attempt)
	if n := len(r.Errors); n > 0 {
		msg += ", last: " + r.Errors[n-1].Error
	}
	return msg
}

// settle ends or continues a job whose slice ran out of attempts (cause
// says how): cancelled when a cancel was requested; otherwise a fresh
// slice from the last checkpoint while Requeues < MaxRequeues; otherwise
// failed with cause. A job that another process settled meanwhile (or
// that ended) is left alone.
func (rq *riverQueue[TTx]) settle(ctx context.Context, j *Job, cause string) error {
	cfg := rq.e.cfg
	err := rq.db.withTx(ctx, func(tx TTx, st *sqlStore) error {
		switch {
		case j.CancelRequested:
			_, err := st.JobEnd(ctx, &JobEndParams{ID: j.ID, Requeues: j.Requeues, State: StateCancelled, Now: cfg.Now()})
			return err
		case j.Requeues < cfg.MaxRequeues:
			if _, err := st.JobRequeue(ctx, &JobRequeueParams{ID: j.ID, Requeues: j.Requeues, Now: cfg.Now()}); err != nil {
				return err
			}
			_, err := rq.client.InsertTx(ctx, tx, sliceArgs{JobID: j.ID, Slice: j.Slices + 1}, rq.insertOpts())
			return err
		default:
			msg := fmt.Sprintf("%s (the job's slices ran out of their %d attempts %d times; the front is that of the last checkpoint)",
				cause, cfg.MaxAttempts, j.Requeues+1)
			_, err := st.JobEnd(ctx, &JobEndParams{ID: j.ID, Requeues: j.Requeues, State: StateFailed, Error: msg, Now: cfg.Now()})
			return err
		}
	})
	if errors.Is(err, ErrFailedPrecondition) {
		return nil
	}
	return err
}

// cancelIdle ends job id, whose cancel has been requested, at once when
// no slice of it is running: its queued slices are cancelled in River and
// the job is cancelled with the front of its last checkpoint. A running
// slice sees the request and ends the job itself (or, if its worker is
// dead, River rescues it into a retry that does, or discards it and the
// reaper does). It returns the job as it then is.
func (rq *riverQueue[TTx]) cancelIdle(ctx context.Context, id string) (*Job, error) {
	var job *Job
	err := rq.db.withTx(ctx, func(tx TTx, st *sqlStore) error {
		j, err := st.jobGet(ctx, id)
		if err != nil {
			return err
		}
		job = j
		if !j.CancelRequested {
			return nil
		}
		live, err := rq.slicesOf(ctx, tx, id, rivertype.JobStateAvailable, rivertype.JobStatePending,
			rivertype.JobStateRetryable, rivertype.JobStateRunning, rivertype.JobStateScheduled)
		if err != nil {
			return err
		}
		for _, r := range live {
			if r.State == rivertype.JobStateRunning {
				return nil
			}
		}
		for _, r := range live {
			if _, err := rq.client.JobCancelTx(ctx, tx, r.ID); err != nil {
				return err
			}
		}
		if j.State.Terminal() {
			return nil
		}
		job, err = st.JobEnd(ctx, &JobEndParams{ID: id, Requeues: j.Requeues, State: StateCancelled, Now: rq.e.cfg.Now()})
		return err
	})
	return job, err
}
