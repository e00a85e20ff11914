package jobs

import (
	"context"
	"errors"
	"slices"
	"testing"
	"time"
)

// testStrandedRequeueEnd is the conformance test of JobListStranded,
// JobRequeue and JobEnd on store s, whose database holds no River slice
// at all: every queued or running job in it is stranded. (That a live
// slice keeps a job off the list is tested through the engine, which
// queues slices: TestReapStrandedJob.)
func testStrandedRequeueEnd(t *testing.T, s Store, t0 time.Time) {
	ctx := context.Background()
	for i, l := range []jobLife{
		{id: "queued"},
		{id: "running", start: time.Minute, checkpoint: 2 * time.Minute},
		{id: "done", start: time.Minute, end: StateSucceeded},
		{id: "flagged", start: time.Minute, cancel: true},
	} {
		l.live(ctx, t, s, t0, time.Duration(i)*time.Second)
	}
	ids := func(p *JobListStrandedParams) []string {
		t.Helper()
		js, err := s.JobListStranded(ctx, p)
		if err != nil {
			t.Fatal(err)
		}
		var out []string
		for _, j := range js {
			out = append(out, j.ID)
		}
		return out
	}
	if got, want := ids(&JobListStrandedParams{}), []string{"queued", "running", "flagged"}; !slices.Equal(got, want) {
		t.Errorf("stranded jobs %v, want %v (unfinished ones, oldest first)", got, want)
	}
	if got := ids(&JobListStrandedParams{Limit: 1}); !slices.Equal(got, []string{"queued"}) {
		t.Errorf("stranded jobs with limit 1: %v, want [queued]", got)
	}

	at := t0.Add(time.Hour)
	j, err := s.JobRequeue(ctx, &JobRequeueParams{ID: "running", Requeues: 0, Now: at})
	if err != nil {
		t.Fatal(err)
	}
	if j.State != StateRunning || j.Requeues != 1 || j.Progress.Generation != 1 {
		t.Errorf("after JobRequeue: %+v, want running, requeued once, progress untouched", j)
	}
	if err := s.ProgressPut(ctx, &ProgressPutParams{JobID: "running", Lease: "a", Now: at}); !errors.Is(err, ErrFailedPrecondition) {
		t.Errorf("progress under the lease of the run before the requeue: err = %v, want ErrFailedPrecondition", err)
	}
	var pe *PreconditionError
	if _, err := s.JobRequeue(ctx, &JobRequeueParams{ID: "running", Requeues: 0, Now: at}); !errors.As(err, &pe) || pe.State != StateRunning {
		t.Errorf("second JobRequeue with the count read before the first: err = %v, want *PreconditionError", err)
	}
	if _, err := s.JobEnd(ctx, &JobEndParams{ID: "running", Requeues: 0, State: StateFailed, Now: at}); !errors.Is(err, ErrFailedPrecondition) {
		t.Errorf("JobEnd with a stale requeue count: err = %v, want ErrFailedPrecondition", err)
	}
	end := at.Add(time.Minute)
	j, err = s.JobEnd(ctx, &JobEndParams{ID: "running", Requeues: 1, State: StateFailed, Error: "slice 2 discarded", Now: end})
	if err != nil {
		t.Fatal(err)
	}
	if j.State != StateFailed || !j.Partial || j.Error != "slice 2 discarded" || !j.FinishedAt.Equal(end) {
		t.Errorf("after JobEnd: %+v, want failed, partial, with the error and the end time", j)
	}
	c, err := s.CheckpointGet(ctx, &CheckpointGetParams{JobID: "running"})
	if err != nil || !c.SavedAt.Equal(t0.Add(2*time.Minute)) {
		t.Errorf("checkpoint after JobEnd: %+v, %v; want the one saved before, kept", c, err)
	}
	j, err = s.JobEnd(ctx, &JobEndParams{ID: "flagged", State: StateCancelled, Now: end})
	if err != nil || j.State != StateCancelled || !j.CancelRequested {
		t.Errorf("JobEnd cancelled: %+v, %v", j, err)
	}
	if got := ids(&JobListStrandedParams{}); !slices.Equal(got, []string{"queued"}) {
		t.Errorf("stranded jobs after the ends: %v, want [queued]", got)
	}

	for name, call := range map[string]func() error{
		"JobRequeue of a finished job": func() error {
			_, err := s.JobRequeue(ctx, &JobRequeueParams{ID: "done", Now: end})
			return err
		},
		"JobEnd of a finished job": func() error {
			_, err := s.JobEnd(ctx, &JobEndParams{ID: "done", State: StateFailed, Now: end})
			return err
		},
	} {
		if err := call(); !errors.As(err, &pe) || pe.State != StateSucceeded {
			t.Errorf("%s: err = %v, want *PreconditionError in state succeeded", name, err)
		}
	}
	for name, call := range map[string]func() error{
		"JobRequeue": func() error { _, err := s.JobRequeue(ctx, &JobRequeueParams{ID: "nope", Now: end}); return err },
		"JobEnd": func() error {
			_, err := s.JobEnd(ctx, &JobEndParams{ID: "nope", State: StateFailed, Now: end})
			return err
		},
	} {
		var nf *NotFoundError
		if err := call(); !errors.As(err, &nf) || nf.ID != "nope" {
			t.Errorf("%s of an unknown job: err = %v, want *NotFoundError", name, err)
		}
	}
	for _, tt := range []struct {
		name  string
		call  func() error
		field string
	}{
		{"end into succeeded", func() error {
			_, err := s.JobEnd(ctx, &JobEndParams{ID: "queued", State: StateSucceeded, Now: end})
			return err
		}, "state"},
		{"requeue without a time", func() error { _, err := s.JobRequeue(ctx, &JobRequeueParams{ID: "queued"}); return err }, "now"},
		{"requeue with a negative count", func() error {
			_, err := s.JobRequeue(ctx, &JobRequeueParams{ID: "queued", Requeues: -1, Now: end})
			return err
		}, "requeues"},
		{"list with a negative limit", func() error { _, err := s.JobListStranded(ctx, &JobListStrandedParams{Limit: -1}); return err }, "page_size"},
	} {
		var ia *InvalidArgumentError
		if err := tt.call(); !errors.As(err, &ia) || !hasField(ia, tt.field) {
			t.Errorf("%s: err = %v, want *InvalidArgumentError naming %q", tt.name, err, tt.field)
		}
	}
}
