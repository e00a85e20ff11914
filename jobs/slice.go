package jobs

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"github.com/riverqueue/river"
	"github.com/riverqueue/river/riverdriver"
)

// runLease names one run of a slice: River client, River job, attempt, and
// the times it was snoozed, which River records in the job's metadata and
// which tell apart the runs of one attempt (a snooze does not count one).
func runLease(client string, rj *river.Job[sliceArgs]) string {
	var m struct {
		Snoozes int64 `json:"snoozes"`
	}
	_ = json.Unmarshal(rj.Metadata, &m) // absent or unreadable: never snoozed
	return fmt.Sprintf("%s/%d/%d/%d", client, rj.ID, rj.Attempt, m.Snoozes)
}

// sliceWorker is River's worker for slices.
type sliceWorker[TTx any] struct {
	river.WorkerDefaults[sliceArgs]
	rq *riverQueue[TTx]
}

// Timeout is the finite per-kind timeout: SliceDuration + SliceGrace.
func (w *sliceWorker[TTx]) Timeout(*river.Job[sliceArgs]) time.Duration {
	return w.rq.e.cfg.sliceTimeout()
}

// NextRetry retries a slice after Config.RetryDelay, not River's
// exponential back-off: a failed slice attempt is a database hiccup, and
// the job's progress waits for it.
func (w *sliceWorker[TTx]) NextRetry(*river.Job[sliceArgs]) time.Time { return w.rq.retryAt() }

// Work runs one slice. A slice that fails because the database is
// unreachable or full (IsUnavailable) is snoozed for RetryDelay instead:
// River then runs it again without counting an attempt, so an outage of
// any length delays a job but never fails it, and the job goes on from
// its last stored checkpoint when the database is back. Other errors
// spend one of MaxAttempts.
func (w *sliceWorker[TTx]) Work(ctx context.Context, rj *river.Job[sliceArgs]) error {
	err := w.rq.runSlice(ctx, rj)
	if err != nil && ctx.Err() == nil && IsUnavailable(err) {
		w.rq.e.cfg.Logger.WarnContext(ctx, "jobs: database unavailable; the slice waits and runs again",
			"job", rj.Args.JobID, "slice", rj.Args.Slice, "retry_in", w.rq.e.cfg.RetryDelay, "error", err)
		return river.JobSnooze(w.rq.e.cfg.RetryDelay)
	}
	if err != nil && rj.Attempt >= rj.MaxAttempts {
		// River discards the slice after this attempt; settle the job
		// (a fresh slice, or failed) rather than leave it stranded. If
		// even that cannot be written, keep the slice (snoozed, so this
		// stays the last attempt) until it can; the reaper would settle
		// the job too, once the slice is gone.
		if serr := w.rq.outOfAttempts(ctx, rj, err); serr != nil {
			w.rq.e.cfg.Logger.ErrorContext(ctx, "jobs: could not settle job after its last slice attempt; trying again",
				"job", rj.Args.JobID, "retry_in", w.rq.e.cfg.RetryDelay, "error", serr)
			return river.JobSnooze(w.rq.e.cfg.RetryDelay)
		}
	}
	return err
}

// runSlice is one slice of a job:
//
//  1. take the job (JobStart with a lease naming this attempt);
//  2. open the study from the spec and the last checkpoint;
//  3. step until the study is done, the slice time is up, a cancel is
//     requested, or the engine stops; checkpoint every
//     CheckpointInterval and write progress every ProgressInterval;
//  4. in one transaction: the checkpoint and progress, the front, and
//     then either the job's final state or the next slice, and the
//     completion of this slice's River job.
//
// A returned error makes River retry the slice, which resumes from the
// last checkpoint; nothing a study does is retried.
func (rq *riverQueue[TTx]) runSlice(ctx context.Context, rj *river.Job[sliceArgs]) error {
	e, st, id := rq.e, rq.db.store, rj.Args.JobID
	job, err := st.jobGet(ctx, id)
	switch {
	case errors.Is(err, ErrNotFound):
		return river.JobCancel(fmt.Errorf("slice of unknown job %q: %w", id, err))
	case err != nil:
		return err
	case job.State.Terminal():
		return nil // cancelled while queued, or a stale duplicate
	}
	select {
	case <-e.stopping:
		// Fetched while the engine stops: hand the job straight on.
		return rq.handOver(ctx, rj, "", nil)
	default:
	}
	lease := runLease(rq.id, rj)
	job, err = st.JobStart(ctx, &JobStartParams{ID: id, Lease: lease, Now: e.cfg.Now()})
	if errors.Is(err, ErrFailedPrecondition) {
		return nil // finished meanwhile
	}
	if err != nil {
		return err
	}
	if job.CancelRequested {
		return rq.finish(ctx, rj, lease, StateCancelled, "", nil)
	}
	var checkpoint []byte
	c, err := st.CheckpointGet(ctx, &CheckpointGetParams{JobID: id})
	switch {
	case err == nil:
		checkpoint = c.Data
	case !errors.Is(err, ErrNotFound):
		return err
	}
	study, err := e.opener.Open(job.Spec, checkpoint)
	if err != nil {
		return rq.finish(ctx, rj, lease, StateFailed, "open study: "+err.Error(), nil)
	}
	return rq.drive(ctx, rj, lease, study)
}

// drive steps the study for one slice and ends it.
func (rq *riverQueue[TTx]) drive(ctx context.Context, rj *river.Job[sliceArgs], lease string, study Run) (err error) {
	cfg, st, id := rq.e.cfg, rq.db.store, rj.Args.JobID
	outcome := SliceError
	if cfg.OnSlice != nil {
		opened, before := time.Now(), study.Progress()
		defer func() {
			if err != nil {
				outcome = SliceError
			}
			after := study.Progress()
			cfg.OnSlice(SliceStats{JobID: id, Duration: time.Since(opened), Outcome: outcome,
				Generations: after.Generation - before.Generation, Evaluations: after.Evaluations - before.Evaluations})
		}()
	}
	sliceCtx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)
	// The slice clock starts after the first step, so that every slice
	// makes progress even when one step takes longer than a slice; River's
	// own timeout still bounds the attempt.
	var timer *time.Timer
	defer func() {
		if timer != nil {
			timer.Stop()
		}
	}()
	start := time.Now()
	defer rq.track(id, cancel)()
	go rq.pollCancel(sliceCtx, cancel, id)

	lastCheckpoint, lastProgress := time.Now(), time.Now()
	for {
		done, err := study.Step(sliceCtx, cfg.StepGenerations)
		if timer == nil && !done && errors.Is(context.Cause(ctx), context.DeadlineExceeded) {
			// The slice's first step ran into River's timeout of the
			// attempt: the next slice would start the same step from the
			// same checkpoint and be stopped there again, for ever.
			outcome = SliceFailed
			return rq.finish(ctx, rj, lease, StateFailed, stepTooLong(cfg), study)
		}
		if timer == nil {
			timer = time.AfterFunc(max(0, cfg.SliceDuration-time.Since(start)), func() { cancel(errSliceOver) })
		}
		if err != nil && sliceCtx.Err() == nil {
			outcome = SliceFailed
			return rq.finish(ctx, rj, lease, StateFailed, "step: "+err.Error(), nil)
		}
		if done {
			outcome = SliceSucceeded
			return rq.finish(ctx, rj, lease, StateSucceeded, "", study)
		}
		if sliceCtx.Err() != nil {
			break
		}
		now := time.Now()
		switch {
		case cfg.CheckpointInterval > 0 && now.Sub(lastCheckpoint) >= cfg.CheckpointInterval:
			if err := rq.db.withTx(ctx, func(_ TTx, tx *sqlStore) error { return rq.saveState(ctx, tx, id, lease, study) }); err != nil {
				return err
			}
			lastCheckpoint, lastProgress = now, now
		case now.Sub(lastProgress) >= cfg.ProgressInterval:
			if err := st.ProgressPut(ctx, &ProgressPutParams{JobID: id, Lease: lease, Progress: study.Progress(), Now: cfg.Now()}); err != nil {
				return err
			}
			lastProgress = now
		}
	}
	if errors.Is(context.Cause(sliceCtx), errCancelRequested) {
		outcome = SliceCancelled
		return rq.finish(ctx, rj, lease, StateCancelled, "", study)
	}
	// Slice time up, engine stopping, or River's timeout: hand over.
	outcome = SliceHandedOver
	return rq.handOver(ctx, rj, lease, study)
}

// stepTooLong says why a job whose step outlasts a slice's attempt fails.
func stepTooLong(cfg Config) string {
	return fmt.Sprintf("one step of the job ran past a slice's time limit (%v: the slice, %v, and its grace, %v) and was stopped; "+
		"the next slice would repeat it from the same checkpoint. The polish of the front runs as one step: "+
		"run the workers with a longer slice (--slice) or make the polish smaller (polish_budget, population), and submit the job again",
		cfg.sliceTimeout(), cfg.SliceDuration, cfg.SliceGrace)
}

// pollCancel ends the slice when its job's cancel flag is set, which is
// how a Cancel made in another process reaches it.
func (rq *riverQueue[TTx]) pollCancel(ctx context.Context, cancel context.CancelCauseFunc, id string) {
	t := time.NewTicker(rq.e.cfg.CancelPollInterval)
	defer t.Stop()
	for {
		select {
		case <-ctx.Done():
			return
		case <-t.C:
			j, err := rq.db.store.jobGet(ctx, id)
			if err == nil && (j.CancelRequested || j.State.Terminal()) {
				cancel(errCancelRequested)
				return
			}
		}
	}
}

// saveState writes the study's checkpoint, progress and front.
func (rq *riverQueue[TTx]) saveState(ctx context.Context, tx *sqlStore, id, lease string, study Run) error {
	data, err := study.Checkpoint()
	if err != nil {
		return fmt.Errorf("study checkpoint: %w", err)
	}
	front, err := study.Front()
	if err != nil {
		return fmt.Errorf("study front: %w", err)
	}
	for i := range front {
		front[i].Index = i
	}
	var summary []byte
	if sm, ok := study.(Summarizer); ok {
		if summary, err = sm.Summary(); err != nil {
			return fmt.Errorf("study summary: %w", err)
		}
	}
	if err := tx.CheckpointSave(ctx, &CheckpointSaveParams{JobID: id, Lease: lease, Data: data, Progress: study.Progress(), Now: rq.e.cfg.Now()}); err != nil {
		return err
	}
	return tx.FrontPut(ctx, &FrontPutParams{JobID: id, Lease: lease, Solutions: front, Summary: summary})
}

// finalContext is for the writes that end a slice: they must happen even
// when River has cancelled the work context (timeout, hard stop), within
// FinalizeTimeout. The River client stays in the context's values.
func (rq *riverQueue[TTx]) finalContext(ctx context.Context) (context.Context, context.CancelFunc) {
	return context.WithTimeout(context.WithoutCancel(ctx), rq.e.cfg.FinalizeTimeout)
}

// handOver checkpoints (when study is not nil), queues the job's next
// slice and completes this one, in one transaction.
func (rq *riverQueue[TTx]) handOver(ctx context.Context, rj *river.Job[sliceArgs], lease string, study Run) error {
	ctx, cancel := rq.finalContext(ctx)
	defer cancel()
	return finishedElsewhere(rq.db.withTx(ctx, func(tx TTx, st *sqlStore) error {
		if err := rq.saveGiven(ctx, st, rj.Args.JobID, lease, study); err != nil {
			return err
		}
		next := sliceArgs{JobID: rj.Args.JobID, Slice: rj.Args.Slice + 1}
		if study == nil {
			next.Slice = rj.Args.Slice
		}
		if _, err := rq.client.InsertTx(ctx, tx, next, rq.insertOpts()); err != nil {
			return err
		}
		_, err := river.JobCompleteTx[riverdriver.Driver[TTx]](ctx, tx, rj)
		return err
	}))
}

// finish moves the job to a terminal state, saving the study's final
// state and front first when study is not nil (otherwise the front of the
// last checkpoint stays), and completes this slice, in one transaction.
func (rq *riverQueue[TTx]) finish(ctx context.Context, rj *river.Job[sliceArgs], lease string, state State, msg string, study Run) error {
	ctx, cancel := rq.finalContext(ctx)
	defer cancel()
	return finishedElsewhere(rq.db.withTx(ctx, func(tx TTx, st *sqlStore) error {
		if err := rq.saveGiven(ctx, st, rj.Args.JobID, lease, study); err != nil {
			return err
		}
		if _, err := st.JobFinish(ctx, &JobFinishParams{ID: rj.Args.JobID, Lease: lease, State: state,
			Error: msg, Partial: state != StateSucceeded, Now: rq.e.cfg.Now()}); err != nil {
			return err
		}
		_, err := river.JobCompleteTx[riverdriver.Driver[TTx]](ctx, tx, rj)
		return err
	}))
}

// saveGiven saves the study's state when study is not nil.
func (rq *riverQueue[TTx]) saveGiven(ctx context.Context, st *sqlStore, id, lease string, study Run) error {
	if study == nil {
		return nil
	}
	return rq.saveState(ctx, st, id, lease, study)
}

// finishedElsewhere turns the error of a slice's last transaction into
// nil when the job had already reached a terminal state (a *PreconditionError
// from the lease check): nothing was written, and River may complete the
// slice. A lost lease stays an error, so River retries the slice.
func finishedElsewhere(err error) error {
	var pe *PreconditionError
	if errors.As(err, &pe) && pe.State.Terminal() {
		return nil
	}
	return err
}

// outOfAttempts settles the job of a slice whose last attempt failed with
// cause and which River is about to discard.
func (rq *riverQueue[TTx]) outOfAttempts(ctx context.Context, rj *river.Job[sliceArgs], cause error) error {
	ctx, cancel := rq.finalContext(ctx)
	defer cancel()
	j, err := rq.db.store.jobGet(ctx, rj.Args.JobID)
	switch {
	case errors.Is(err, ErrNotFound):
		return nil
	case err != nil:
		return err
	case j.State.Terminal():
		return nil
	}
	return rq.settle(ctx, j, fmt.Sprintf("slice %d failed %d times, last: %v", rj.Args.Slice, rj.Attempt, cause))
}
