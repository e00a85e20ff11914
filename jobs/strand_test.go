package jobs

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"
)

// onIdleEngines runs test, in parallel, on each backend with an engine
// that queues slices but works none (Workers 0), so that the test decides
// what happens to them; the engine's clock stands at now, and its slices
// get 2 attempts and 1 requeue.
func onIdleEngines(t *testing.T, test func(t *testing.T, e *Engine, now time.Time)) {
	t.Parallel()
	now := time.Date(2026, 5, 2, 3, 4, 5, 6, time.UTC)
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			cfg := testConfig(be.url(t))
			cfg.Workers, cfg.MaxAttempts, cfg.MaxRequeues = 0, 2, 1
			cfg.Now = func() time.Time { return now }
			e, err := Open(context.Background(), cfg, &toyOpener{})
			if err != nil {
				t.Fatal(err)
			}
			t.Cleanup(func() { _ = e.Close() })
			test(t, e, now)
		})
	}
}

// setSlices moves every slice of job id that is in one of the states
// from to state to, as River does: its rescuer discards a slice whose
// last attempt's worker died ("discarded"), a worker fetches one
// ("running"). It returns how many it moved.
func setSlices(t *testing.T, e *Engine, id, to string, from ...string) int64 {
	t.Helper()
	set := `state = 'discarded', attempt = max_attempts, finalized_at = scheduled_at`
	if to == "running" {
		set = `state = 'running', attempt = attempt + 1, attempted_at = scheduled_at`
	}
	args := []any{sliceKind, id}
	for _, s := range from {
		args = append(args, s)
	}
	n, err := e.store.q.exec(context.Background(), `UPDATE river_job SET `+set+` WHERE kind = ? AND `+sliceJobID+` = ?
		AND state IN (?`+strings.Repeat(", ?", len(from)-1)+`)`, args...)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// liveSlices counts the slices of job id still in River's queue.
func liveSlices(t *testing.T, e *Engine, id string) int64 {
	t.Helper()
	var n int64
	if err := e.store.q.queryRow(context.Background(), `SELECT COUNT(*) FROM river_job WHERE kind = ? AND `+sliceJobID+` = ?
		AND state IN ('available', 'pending', 'retryable', 'running', 'scheduled')`, sliceKind, id).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

// startedJob submits a toy job to e and stores what a slice run under
// lease "dead-run" would have left before its worker died: the job
// running, and a checkpoint with its front at generation 7.
func startedJob(t *testing.T, e *Engine, spec toySpec) *Job {
	t.Helper()
	ctx := context.Background()
	j, err := e.Submit(ctx, &SubmitParams{Spec: spec.bytes()})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := e.store.JobStart(ctx, &JobStartParams{ID: j.ID, Lease: "dead-run", Now: e.cfg.Now()}); err != nil {
		t.Fatal(err)
	}
	st, err := (&toyOpener{}).Open(spec.bytes(), nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.Step(ctx, 7); err != nil {
		t.Fatal(err)
	}
	data, _ := st.Checkpoint()
	front, _ := st.Front()
	if err := e.store.CheckpointSave(ctx, &CheckpointSaveParams{JobID: j.ID, Lease: "dead-run", Data: data, Progress: st.Progress(), Now: e.cfg.Now()}); err != nil {
		t.Fatal(err)
	}
	if err := e.store.FrontPut(ctx, &FrontPutParams{JobID: j.ID, Lease: "dead-run", Solutions: front}); err != nil {
		t.Fatal(err)
	}
	return j
}

// TestReapStrandedJob: a job whose slice River discarded (its attempts
// spent by workers that died) is given a fresh slice from its checkpoint
// by the reaper, once (MaxRequeues 1); when that slice is discarded
// too, the reaper fails the job with the reason, keeping the front of the
// checkpoint, and Watch returns with the failed job.
func TestReapStrandedJob(t *testing.T) {
	onIdleEngines(t, func(t *testing.T, e *Engine, now time.Time) {
		ctx := context.Background()
		spec := toySpec{Generations: 50, Size: 5, Seed: 9}
		j := startedJob(t, e, spec)
		stranded := func() int {
			t.Helper()
			js, err := e.store.JobListStranded(ctx, &JobListStrandedParams{})
			if err != nil {
				t.Fatal(err)
			}
			return len(js)
		}
		if n := stranded(); n != 0 {
			t.Fatalf("%d stranded jobs while the slice is queued, want 0", n)
		}
		if n := setSlices(t, e, j.ID, "running", "available"); n != 1 {
			t.Fatalf("%d slices fetched, want 1", n)
		}
		if n := stranded(); n != 0 {
			t.Fatalf("%d stranded jobs while the slice runs, want 0", n)
		}
		setSlices(t, e, j.ID, "discarded", "running")
		if n := stranded(); n != 1 {
			t.Fatalf("%d stranded jobs after the discard, want 1", n)
		}

		if n, err := e.q.reap(ctx); err != nil || n != 1 {
			t.Fatalf("first reap: %d jobs, %v; want 1", n, err)
		}
		got, err := e.Get(ctx, j.ID)
		if err != nil {
			t.Fatal(err)
		}
		if got.State != StateRunning || got.Requeues != 1 || liveSlices(t, e, j.ID) != 1 {
			t.Fatalf("after the first reap: %+v with %d live slices; want running, requeued once, one fresh slice", got, liveSlices(t, e, j.ID))
		}
		if err := e.store.ProgressPut(ctx, &ProgressPutParams{JobID: j.ID, Lease: "dead-run", Now: now}); !errors.Is(err, ErrFailedPrecondition) {
			t.Errorf("progress under the lease of the run before the requeue: err = %v, want ErrFailedPrecondition", err)
		}

		wctx, cancel := context.WithTimeout(ctx, testTimeout)
		defer cancel()
		watch, err := e.Watch(wctx, j.ID)
		if err != nil {
			t.Fatal(err)
		}
		setSlices(t, e, j.ID, "discarded", "available")
		if n, err := e.q.reap(ctx); err != nil || n != 1 {
			t.Fatalf("second reap: %d jobs, %v; want 1", n, err)
		}
		var last *Job
		for s := range watch {
			last = s
		}
		if wctx.Err() != nil || last == nil {
			t.Fatal("Watch did not return after the job ended")
		}
		if last.State != StateFailed || !last.Partial || !last.FinishedAt.Equal(now) ||
			!strings.Contains(last.Error, "discarded after 2 attempts") || !strings.Contains(last.Error, "ran out of their 2 attempts 2 times") {
			t.Fatalf("last snapshot: %+v; want failed at %v, partial, with the reason", last, now)
		}
		f := frontOf(t, e, j.ID)
		if !f.Partial {
			t.Error("front of the failed job not marked partial")
		}
		sameFront(t, f.Solutions, toyFrontAt(spec, 7))
		if n, err := e.q.reap(ctx); err != nil || n != 0 {
			t.Errorf("reap after the end: %d jobs, %v; want none", n, err)
		}
		t.Logf("ended: %s", last.Error)
	})
}

// TestCancelWithoutRunningSlice: Cancel ends at once a job whose slice
// waits in the queue or is gone, keeping its checkpoint's front; one
// with a running slice keeps running until that slice (or, when the
// slice is discarded, the reaper) ends it.
func TestCancelWithoutRunningSlice(t *testing.T) {
	onIdleEngines(t, func(t *testing.T, e *Engine, now time.Time) {
		ctx := context.Background()
		spec := toySpec{Generations: 50, Size: 4, Seed: 2}
		tests := []struct {
			name     string
			slice    string // what becomes of the job's slice before the cancel
			endsAt   bool   // Cancel ends the job
			discards bool   // the running slice is discarded after the cancel, then reaped
		}{
			{"slice queued", "available", true, false},
			{"slice discarded", "discarded", true, false},
			{"slice running, then discarded", "running", false, true},
		}
		for _, tt := range tests {
			j := startedJob(t, e, spec)
			if tt.slice != "available" {
				setSlices(t, e, j.ID, tt.slice, "available")
			}
			got, err := e.Cancel(ctx, j.ID)
			if err != nil {
				t.Fatalf("%s: %v", tt.name, err)
			}
			if tt.discards {
				if got.State != StateRunning || !got.CancelRequested {
					t.Fatalf("%s: after Cancel %+v, want running with the request flagged", tt.name, got)
				}
				setSlices(t, e, j.ID, "discarded", "running")
				if _, err := e.q.reap(ctx); err != nil {
					t.Fatal(err)
				}
				if got, err = e.Get(ctx, j.ID); err != nil {
					t.Fatal(err)
				}
			}
			if got.State != StateCancelled || !got.Partial || !got.FinishedAt.Equal(now) || liveSlices(t, e, j.ID) != 0 {
				t.Errorf("%s: job %+v with %d live slices; want cancelled at %v, partial, no slice left", tt.name, got, liveSlices(t, e, j.ID), now)
				continue
			}
			sameFront(t, frontOf(t, e, j.ID).Solutions, toyFrontAt(spec, 7))
		}
	})
}
