package jobs

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"testing"
	"time"
)

// runStoreConformance is the one test suite every Store implementation
// passes (River's riverdrivertest pattern). newStore must return an empty,
// migrated store of the test's own.
func runStoreConformance(t *testing.T, newStore func(t testing.TB) Store) {
	ctx := context.Background()
	// t0 is an arbitrary fixed instant; the store is given all its times.
	t0 := time.Date(2026, 3, 14, 9, 26, 53, 589793238, time.UTC)

	insert := func(t *testing.T, s Store, id string, at time.Time, labels map[string]string) *Job {
		t.Helper()
		j, err := s.JobInsert(ctx, &JobInsertParams{ID: id, Spec: []byte(`{"spec":"` + id + `"}`), Labels: labels, Now: at})
		if err != nil {
			t.Fatalf("JobInsert(%s): %v", id, err)
		}
		return j
	}
	start := func(t *testing.T, s Store, id, lease string) *Job {
		t.Helper()
		j, err := s.JobStart(ctx, &JobStartParams{ID: id, Lease: lease, Now: t0.Add(time.Minute)})
		if err != nil {
			t.Fatalf("JobStart(%s): %v", id, err)
		}
		return j
	}

	t.Run("JobInsertAndGet", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		labels := map[string]string{"car": "demo-gt", "track/kind": "smooth"}
		ins := insert(t, s, "job-a", t0, labels)
		got, err := s.JobGetByID(ctx, &JobGetByIDParams{ID: "job-a"})
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(ins, got) {
			t.Errorf("JobGetByID = %+v, JobInsert returned %+v", got, ins)
		}
		if got.State != StateQueued || !got.CreatedAt.Equal(t0) || !got.StartedAt.IsZero() ||
			!bytes.Equal(got.Spec, []byte(`{"spec":"job-a"}`)) || !reflect.DeepEqual(got.Labels, labels) {
			t.Errorf("stored job %+v does not hold the inserted fields", got)
		}
		_, err = s.JobInsert(ctx, &JobInsertParams{ID: "job-a", Spec: []byte("x"), Now: t0})
		if !errors.Is(err, ErrAlreadyExists) {
			t.Errorf("second JobInsert with the same ID: err = %v, want ErrAlreadyExists", err)
		}
	})

	t.Run("NotFound", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		calls := map[string]func() error{
			"JobGetByID": func() error { _, err := s.JobGetByID(ctx, &JobGetByIDParams{ID: "nope"}); return err },
			"JobCancelRequest": func() error {
				_, err := s.JobCancelRequest(ctx, &JobCancelRequestParams{ID: "nope", Now: t0})
				return err
			},
			"JobStart":      func() error { _, err := s.JobStart(ctx, &JobStartParams{ID: "nope", Lease: "l", Now: t0}); return err },
			"CheckpointGet": func() error { _, err := s.CheckpointGet(ctx, &CheckpointGetParams{JobID: "nope"}); return err },
			"ProgressGet":   func() error { _, err := s.ProgressGet(ctx, &ProgressGetParams{JobID: "nope"}); return err },
			"FrontGet":      func() error { _, err := s.FrontGet(ctx, &FrontGetParams{JobID: "nope"}); return err },
			"FrontPut":      func() error { return s.FrontPut(ctx, &FrontPutParams{JobID: "nope", Lease: "l"}) },
		}
		for name, call := range calls {
			err := call()
			var nf *NotFoundError
			if !errors.Is(err, ErrNotFound) || !errors.As(err, &nf) || nf.ID != "nope" || nf.Resource != "job" {
				t.Errorf("%s on an unknown job: err = %v, want *NotFoundError{job, nope}", name, err)
			}
		}
	})

	t.Run("InvalidArguments", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		insert(t, s, "job-a", t0, nil)
		tests := []struct {
			name  string
			call  func() error
			field string
		}{
			{"insert without id", func() error {
				_, err := s.JobInsert(ctx, &JobInsertParams{Spec: []byte("x"), Now: t0})
				return err
			}, "id"},
			{"insert without spec", func() error {
				_, err := s.JobInsert(ctx, &JobInsertParams{ID: "b", Now: t0})
				return err
			}, "spec"},
			{"insert with bad label key", func() error {
				_, err := s.JobInsert(ctx, &JobInsertParams{ID: "b", Spec: []byte("x"), Now: t0, Labels: map[string]string{"Team": "x"}})
				return err
			}, `labels["Team"]`},
			{"get without id", func() error {
				_, err := s.JobGetByID(ctx, &JobGetByIDParams{})
				return err
			}, "id"},
			{"list with negative page size", func() error {
				_, err := s.JobList(ctx, &JobListParams{PageSize: -1})
				return err
			}, "page_size"},
			{"list with unknown state", func() error {
				_, err := s.JobList(ctx, &JobListParams{States: []State{StateQueued, "paused"}})
				return err
			}, "filter.states[1]"},
			{"list with garbage token", func() error {
				_, err := s.JobList(ctx, &JobListParams{PageToken: "not-a-token"})
				return err
			}, "page_token"},
			{"finish into a non-terminal state", func() error {
				_, err := s.JobFinish(ctx, &JobFinishParams{ID: "job-a", Lease: "l", State: StateRunning, Now: t0})
				return err
			}, "state"},
			{"checkpoint without data", func() error {
				return s.CheckpointSave(ctx, &CheckpointSaveParams{JobID: "job-a", Lease: "l", Now: t0})
			}, "data"},
			{"progress with negative generation", func() error {
				return s.ProgressPut(ctx, &ProgressPutParams{JobID: "job-a", Lease: "l", Now: t0, Progress: Progress{Generation: -1}})
			}, "progress.generation"},
			{"front out of order", func() error {
				return s.FrontPut(ctx, &FrontPutParams{JobID: "job-a", Lease: "l", Solutions: []Solution{{Index: 1}}})
			}, "solutions"},
			{"front page with negative size", func() error {
				_, err := s.FrontGet(ctx, &FrontGetParams{JobID: "job-a", PageSize: -5})
				return err
			}, "page_size"},
		}
		for _, tt := range tests {
			err := tt.call()
			var ia *InvalidArgumentError
			if !errors.Is(err, ErrInvalidArgument) || !errors.As(err, &ia) {
				t.Errorf("%s: err = %v, want *InvalidArgumentError", tt.name, err)
				continue
			}
			found := false
			for _, v := range ia.Violations {
				found = found || v.Field == tt.field
			}
			if !found {
				t.Errorf("%s: violations %+v do not name field %q", tt.name, ia.Violations, tt.field)
			}
		}
	})

	t.Run("JobListPagingAndFilters", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		// Seven jobs; job-3 and job-4 share a creation time, so the ID
		// breaks the tie. Newest first: 6 5 4 3 2 1 0.
		var want []string
		for i := range 7 {
			at := t0.Add(time.Duration(i) * time.Second)
			if i == 4 {
				at = t0.Add(3 * time.Second)
			}
			team := "chassis"
			if i%2 == 1 {
				team = "aero"
			}
			insert(t, s, fmt.Sprintf("job-%d", i), at, map[string]string{"team": team, "night": "1"})
			want = append([]string{fmt.Sprintf("job-%d", i)}, want...)
		}
		start(t, s, "job-2", "lease-2")
		start(t, s, "job-5", "lease-5")

		list := func(p JobListParams) []string {
			t.Helper()
			var ids []string
			for pages := 0; ; pages++ {
				if pages > 10 {
					t.Fatal("paging did not end")
				}
				res, err := s.JobList(ctx, &p)
				if err != nil {
					t.Fatal(err)
				}
				if len(res.Jobs) > p.PageSize && p.PageSize > 0 {
					t.Fatalf("page of %d jobs, page size %d", len(res.Jobs), p.PageSize)
				}
				for _, j := range res.Jobs {
					ids = append(ids, j.ID)
				}
				if res.NextPageToken == "" {
					return ids
				}
				p.PageToken = res.NextPageToken
			}
		}
		tests := []struct {
			name string
			p    JobListParams
			want []string
		}{
			{"all, one page", JobListParams{}, want},
			{"all, pages of 3", JobListParams{PageSize: 3}, want},
			{"all, pages of 1", JobListParams{PageSize: 1}, want},
			{"running", JobListParams{PageSize: 1, States: []State{StateRunning}}, []string{"job-5", "job-2"}},
			{"queued or running", JobListParams{PageSize: 4, States: []State{StateRunning, StateQueued}}, want},
			{"succeeded", JobListParams{States: []State{StateSucceeded}}, nil},
			{"label", JobListParams{PageSize: 2, Labels: map[string]string{"team": "aero"}}, []string{"job-5", "job-3", "job-1"}},
			{"label and state", JobListParams{Labels: map[string]string{"team": "aero", "night": "1"}, States: []State{StateQueued}}, []string{"job-3", "job-1"}},
			{"label value absent", JobListParams{Labels: map[string]string{"team": "tyres"}}, nil},
		}
		for _, tt := range tests {
			if got := list(tt.p); !reflect.DeepEqual(got, tt.want) {
				t.Errorf("%s: listed %v, want %v", tt.name, got, tt.want)
			}
		}

		res, err := s.JobList(ctx, &JobListParams{PageSize: 2, States: []State{StateQueued}})
		if err != nil {
			t.Fatal(err)
		}
		_, err = s.JobList(ctx, &JobListParams{PageSize: 2, PageToken: res.NextPageToken})
		if !errors.Is(err, ErrInvalidArgument) {
			t.Errorf("token of a state-filtered list reused without the filter: err = %v, want ErrInvalidArgument", err)
		}
	})

	t.Run("CancelRequest", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		insert(t, s, "queued", t0, nil)
		insert(t, s, "running", t0, nil)
		start(t, s, "running", "l")

		j, err := s.JobCancelRequest(ctx, &JobCancelRequestParams{ID: "queued", Now: t0.Add(time.Hour)})
		if err != nil {
			t.Fatal(err)
		}
		if j.State != StateCancelled || !j.Partial || !j.CancelRequested || !j.FinishedAt.Equal(t0.Add(time.Hour)) {
			t.Errorf("never-started job after cancel: %+v, want cancelled, partial, finished", j)
		}
		j, err = s.JobCancelRequest(ctx, &JobCancelRequestParams{ID: "running", Now: t0.Add(time.Hour)})
		if err != nil {
			t.Fatal(err)
		}
		if j.State != StateRunning || !j.CancelRequested {
			t.Errorf("running job after cancel request: %+v, want running with the flag set", j)
		}
		_, err = s.JobCancelRequest(ctx, &JobCancelRequestParams{ID: "queued", Now: t0.Add(time.Hour)})
		var pe *PreconditionError
		if !errors.As(err, &pe) || !errors.Is(err, ErrFailedPrecondition) || pe.State != StateCancelled {
			t.Errorf("cancel of a cancelled job: err = %v, want *PreconditionError in state cancelled", err)
		}
	})

	t.Run("LeaseFencing", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		insert(t, s, "j", t0, nil)
		j := start(t, s, "j", "first")
		if j.State != StateRunning || j.Slices != 1 || !j.StartedAt.Equal(t0.Add(time.Minute)) {
			t.Errorf("after JobStart: %+v", j)
		}
		save := func(lease string, gen int) error {
			return s.CheckpointSave(ctx, &CheckpointSaveParams{JobID: "j", Lease: lease, Data: []byte{byte(gen)},
				Progress: Progress{Generation: gen}, Now: t0.Add(2 * time.Minute)})
		}
		if err := save("first", 1); err != nil {
			t.Fatal(err)
		}
		j = start(t, s, "j", "second") // a rescued slice takes the job over
		if j.Slices != 2 || !j.StartedAt.Equal(t0.Add(time.Minute)) {
			t.Errorf("second JobStart: slices %d, started %v; want 2 and the first start time", j.Slices, j.StartedAt)
		}
		if err := save("first", 2); !errors.Is(err, ErrFailedPrecondition) {
			t.Errorf("checkpoint under the stale lease: err = %v, want ErrFailedPrecondition", err)
		}
		if err := s.ProgressPut(ctx, &ProgressPutParams{JobID: "j", Lease: "first", Now: t0}); !errors.Is(err, ErrFailedPrecondition) {
			t.Errorf("progress under the stale lease: err = %v, want ErrFailedPrecondition", err)
		}
		if err := s.FrontPut(ctx, &FrontPutParams{JobID: "j", Lease: "first"}); !errors.Is(err, ErrFailedPrecondition) {
			t.Errorf("front under the stale lease: err = %v, want ErrFailedPrecondition", err)
		}
		if _, err := s.JobFinish(ctx, &JobFinishParams{ID: "j", Lease: "first", State: StateSucceeded, Now: t0}); !errors.Is(err, ErrFailedPrecondition) {
			t.Errorf("finish under the stale lease: err = %v, want ErrFailedPrecondition", err)
		}
		c, err := s.CheckpointGet(ctx, &CheckpointGetParams{JobID: "j"})
		if err != nil || !bytes.Equal(c.Data, []byte{1}) || c.Generation != 1 {
			t.Errorf("checkpoint after the stale write = %+v, %v; want generation 1 kept", c, err)
		}
		if err := save("second", 3); err != nil {
			t.Errorf("checkpoint under the current lease: %v", err)
		}
	})

	t.Run("CheckpointWithProgress", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		insert(t, s, "j", t0, nil)
		_, err := s.CheckpointGet(ctx, &CheckpointGetParams{JobID: "j"})
		var nf *NotFoundError
		if !errors.As(err, &nf) || nf.Resource != "checkpoint" {
			t.Errorf("CheckpointGet before any save: err = %v, want *NotFoundError for a checkpoint", err)
		}
		start(t, s, "j", "l")
		// Floats chosen to catch any lossy encoding: a NaN with a payload,
		// negative zero, the smallest subnormal, and a value that is not a
		// short decimal.
		best := []float64{math.Float64frombits(0x7ff8_0000_dead_beef), math.Copysign(0, -1), math.SmallestNonzeroFloat64, 1.0 / 3}
		prog := Progress{Generation: 17, Generations: 100, Evaluations: 1700, Hypervolume: 0.8125, Best: best}
		data := bytes.Repeat([]byte{0, 1, 2, 0xff}, 5000)
		saveAt := t0.Add(5 * time.Minute)
		if err := s.CheckpointSave(ctx, &CheckpointSaveParams{JobID: "j", Lease: "l", Data: data, Progress: prog, Now: saveAt}); err != nil {
			t.Fatal(err)
		}
		c, err := s.CheckpointGet(ctx, &CheckpointGetParams{JobID: "j"})
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(c.Data, data) || c.Generation != 17 || !c.SavedAt.Equal(saveAt) {
			t.Errorf("checkpoint = generation %d, %d bytes, saved %v", c.Generation, len(c.Data), c.SavedAt)
		}
		got, err := s.ProgressGet(ctx, &ProgressGetParams{JobID: "j"})
		if err != nil {
			t.Fatal(err)
		}
		if got.Generation != 17 || got.Generations != 100 || got.Evaluations != 1700 || got.Hypervolume != 0.8125 || !got.UpdatedAt.Equal(saveAt) {
			t.Errorf("progress after CheckpointSave = %+v", got)
		}
		if !sameBits(got.Best, best) {
			t.Errorf("best values %v do not round-trip bit for bit (want %v)", got.Best, best)
		}
		if err := s.ProgressPut(ctx, &ProgressPutParams{JobID: "j", Lease: "l", Progress: Progress{Generation: 20}, Now: saveAt.Add(time.Second)}); err != nil {
			t.Fatal(err)
		}
		c, err = s.CheckpointGet(ctx, &CheckpointGetParams{JobID: "j"})
		if err != nil || c.Generation != 17 {
			t.Errorf("ProgressPut changed the checkpoint: %+v, %v", c, err)
		}
	})

	t.Run("FrontPutGet", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		insert(t, s, "j", t0, nil)
		insert(t, s, "other", t0, nil)
		start(t, s, "j", "l")
		front := make([]Solution, 7)
		for i := range front {
			front[i] = Solution{
				Index:      i,
				Genes:      []float64{0.2 + 0.1*float64(i), 1.0 / float64(i+3), math.Copysign(0, -1), 1.6},
				Objectives: []float64{math.Float64frombits(0x7ff8_0000_0000_0001 + uint64(i)), -math.MaxFloat64},
				Violations: []float64{0, math.SmallestNonzeroFloat64 * float64(i)},
				Feasible:   i%2 == 0,
				Detail:     []byte(fmt.Sprintf(`{"curve":%d}`, i)),
			}
		}
		front[3].Detail = nil
		summary := []byte{0, 1, 2, 0xff}
		if err := s.FrontPut(ctx, &FrontPutParams{JobID: "j", Lease: "l", Solutions: front, Summary: summary}); err != nil {
			t.Fatal(err)
		}
		if j, err := s.JobGetByID(ctx, &JobGetByIDParams{ID: "j"}); err != nil || !bytes.Equal(j.Summary, summary) {
			t.Errorf("job summary after FrontPut: %v, %v; want %v", j.Summary, err, summary)
		}
		var got []Solution
		p := FrontGetParams{JobID: "j", PageSize: 3}
		for pages := 0; ; pages++ {
			if pages > 5 {
				t.Fatal("paging did not end")
			}
			res, err := s.FrontGet(ctx, &p)
			if err != nil {
				t.Fatal(err)
			}
			if res.Total != 7 || len(res.Solutions) > 3 {
				t.Fatalf("page: total %d, %d solutions", res.Total, len(res.Solutions))
			}
			got = append(got, res.Solutions...)
			if res.NextPageToken == "" {
				break
			}
			p.PageToken = res.NextPageToken
		}
		if len(got) != len(front) {
			t.Fatalf("paged front has %d solutions, want %d", len(got), len(front))
		}
		for i := range front {
			w, g := front[i], got[i]
			if g.Index != w.Index || g.Feasible != w.Feasible || !bytes.Equal(g.Detail, w.Detail) ||
				!sameBits(g.Genes, w.Genes) || !sameBits(g.Objectives, w.Objectives) || !sameBits(g.Violations, w.Violations) {
				t.Errorf("solution %d = %+v, want %+v bit for bit", i, g, w)
			}
		}
		_, err := s.FrontGet(ctx, &FrontGetParams{JobID: "other", PageToken: p.PageToken})
		if !errors.Is(err, ErrInvalidArgument) {
			t.Errorf("front token of another job: err = %v, want ErrInvalidArgument", err)
		}
		if err := s.FrontPut(ctx, &FrontPutParams{JobID: "j", Lease: "l", Solutions: front[:2]}); err != nil {
			t.Fatal(err)
		}
		if j, err := s.JobGetByID(ctx, &JobGetByIDParams{ID: "j"}); err != nil || j.Summary != nil {
			t.Errorf("job summary after a FrontPut without one: %v, %v; want nil", j.Summary, err)
		}
		res, err := s.FrontGet(ctx, &FrontGetParams{JobID: "j"})
		if err != nil || res.Total != 2 || len(res.Solutions) != 2 || res.NextPageToken != "" {
			t.Errorf("after replacing with 2 solutions: %+v, %v", res, err)
		}
		res, err = s.FrontGet(ctx, &FrontGetParams{JobID: "other"})
		if err != nil || res.Total != 0 || len(res.Solutions) != 0 {
			t.Errorf("front of a job that has none: %+v, %v", res, err)
		}
	})

	t.Run("JobFinish", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		insert(t, s, "j", t0, nil)
		start(t, s, "j", "l")
		end := t0.Add(time.Hour)
		j, err := s.JobFinish(ctx, &JobFinishParams{ID: "j", Lease: "l", State: StateFailed, Error: "study: bad", Partial: true, Now: end})
		if err != nil {
			t.Fatal(err)
		}
		if j.State != StateFailed || j.Error != "study: bad" || !j.Partial || !j.FinishedAt.Equal(end) {
			t.Errorf("finished job = %+v", j)
		}
		_, err = s.JobStart(ctx, &JobStartParams{ID: "j", Lease: "l2", Now: end})
		if !errors.Is(err, ErrFailedPrecondition) {
			t.Errorf("JobStart of a failed job: err = %v, want ErrFailedPrecondition", err)
		}
		err = s.ProgressPut(ctx, &ProgressPutParams{JobID: "j", Lease: "l", Now: end})
		var pe *PreconditionError
		if !errors.As(err, &pe) || pe.State != StateFailed {
			t.Errorf("ProgressPut after finish: err = %v, want *PreconditionError in state failed", err)
		}
	})

	t.Run("JobCounts", func(t *testing.T) {
		t.Parallel()
		testJobCounts(t, newStore, t0)
	})

	t.Run("StrandedRequeueEnd", func(t *testing.T) {
		t.Parallel()
		testStrandedRequeueEnd(t, newStore(t), t0)
	})

	t.Run("TxRollback", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		boom := errors.New("boom")
		err := s.Tx(ctx, func(ctx context.Context, tx Store) error {
			if _, err := tx.JobInsert(ctx, &JobInsertParams{ID: "j", Spec: []byte("x"), Now: t0}); err != nil {
				return err
			}
			if _, err := tx.JobGetByID(ctx, &JobGetByIDParams{ID: "j"}); err != nil {
				return fmt.Errorf("job not visible inside its own transaction: %w", err)
			}
			return boom
		})
		if !errors.Is(err, boom) {
			t.Fatalf("Tx returned %v, want the function's error", err)
		}
		if _, err := s.JobGetByID(ctx, &JobGetByIDParams{ID: "j"}); !errors.Is(err, ErrNotFound) {
			t.Errorf("job of a rolled-back transaction: err = %v, want ErrNotFound", err)
		}
	})
}

// sameBits reports whether a and b hold the same float64 bit patterns.
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}
