package jobs

import (
	"context"
	"errors"
	"fmt"
	"maps"
	"slices"
	"testing"
	"time"
)

// jobLife is how a conformance test brings one job to its state, through
// the store's own transitions only. Times are offsets from the test's t0;
// 0 means the step is not taken.
type jobLife struct {
	id         string
	start      time.Duration // first JobStart, lease "a"
	restart    time.Duration // a second JobStart, lease "b": a rescued slice taking the job over
	checkpoint time.Duration // CheckpointSave under the current lease
	cancel     bool          // JobCancelRequest (a queued, never-started job is cancelled at once)
	end        State         // JobFinish under the current lease into this state
}

// live applies l to a new job in s; the job is created at t0 + created.
func (l jobLife) live(ctx context.Context, t *testing.T, s Store, t0 time.Time, created time.Duration) {
	t.Helper()
	if _, err := s.JobInsert(ctx, &JobInsertParams{ID: l.id, Spec: []byte(`{"spec":"` + l.id + `"}`), Now: t0.Add(created)}); err != nil {
		t.Fatalf("JobInsert(%s): %v", l.id, err)
	}
	lease := ""
	for _, st := range []struct {
		at    time.Duration
		lease string
	}{{l.start, "a"}, {l.restart, "b"}} {
		if st.at == 0 {
			continue
		}
		if _, err := s.JobStart(ctx, &JobStartParams{ID: l.id, Lease: st.lease, Now: t0.Add(st.at)}); err != nil {
			t.Fatalf("JobStart(%s, %s): %v", l.id, st.lease, err)
		}
		lease = st.lease
	}
	if l.checkpoint != 0 {
		if err := s.CheckpointSave(ctx, &CheckpointSaveParams{JobID: l.id, Lease: lease, Data: []byte{1},
			Progress: Progress{Generation: 1}, Now: t0.Add(l.checkpoint)}); err != nil {
			t.Fatalf("CheckpointSave(%s): %v", l.id, err)
		}
	}
	if l.cancel {
		if _, err := s.JobCancelRequest(ctx, &JobCancelRequestParams{ID: l.id, Now: t0.Add(time.Hour)}); err != nil {
			t.Fatalf("JobCancelRequest(%s): %v", l.id, err)
		}
	}
	if l.end != "" {
		if _, err := s.JobFinish(ctx, &JobFinishParams{ID: l.id, Lease: lease, State: l.end, Partial: l.end != StateSucceeded,
			Now: t0.Add(2 * time.Hour)}); err != nil {
			t.Fatalf("JobFinish(%s): %v", l.id, err)
		}
	}
}

// countByListing counts the jobs of s by state from JobList, paging two
// jobs at a time: the figures JobCounts must agree with.
func countByListing(ctx context.Context, t *testing.T, s Store) map[State]int {
	t.Helper()
	counts := map[State]int{}
	for _, st := range States {
		counts[st] = 0
	}
	p := JobListParams{PageSize: 2}
	for pages := 0; ; pages++ {
		if pages > 50 {
			t.Fatal("paging did not end")
		}
		res, err := s.JobList(ctx, &p)
		if err != nil {
			t.Fatal(err)
		}
		for _, j := range res.Jobs {
			counts[j.State]++
		}
		if p.PageToken = res.NextPageToken; p.PageToken == "" {
			return counts
		}
	}
}

// testJobCounts is the conformance test of Store.JobCounts, run by
// runStoreConformance on every implementation. The expected counts and
// times are those of each table row's construction, and the counts are
// checked against JobList too.
func testJobCounts(t *testing.T, newStore func(t testing.TB) Store, t0 time.Time) {
	ctx := context.Background()
	counts := func(q, r, s, f, c int) map[State]int {
		return map[State]int{StateQueued: q, StateRunning: r, StateSucceeded: s, StateFailed: f, StateCancelled: c}
	}
	tests := []struct {
		name   string
		jobs   []jobLife
		want   map[State]int
		oldest time.Duration // of OldestRunningSince from t0; -1 for the zero time
	}{
		{"empty store", nil, counts(0, 0, 0, 0, 0), -1},
		{"every state but running", []jobLife{
			{id: "queued-1"},
			{id: "queued-2"},
			{id: "cancelled-unstarted", cancel: true},
			{id: "succeeded", start: time.Minute, checkpoint: 2 * time.Minute, end: StateSucceeded},
			{id: "failed", start: time.Minute, end: StateFailed},
			{id: "cancelled-running", start: time.Minute, checkpoint: 3 * time.Minute, cancel: true, end: StateCancelled},
		}, counts(2, 0, 1, 1, 2), -1},
		// Running "a" checkpointed at 3 min, after "b" started at 2 min
		// and before "c" started at 4 min: the oldest is b's start. The
		// finished job's older checkpoint (30 s) does not count.
		{"a running job without a checkpoint counts from its start", []jobLife{
			{id: "a", start: time.Minute, checkpoint: 3 * time.Minute},
			{id: "b", start: 2 * time.Minute},
			{id: "c", start: 4 * time.Minute},
			{id: "done", start: 10 * time.Second, checkpoint: 30 * time.Second, end: StateSucceeded},
			{id: "queued"},
		}, counts(1, 3, 1, 0, 0), 2 * time.Minute},
		// "a" started first (1 min) but checkpointed last (6 min); "b"
		// started at 2 min and checkpointed at 5 min: b's checkpoint is
		// the oldest, and no start time is.
		{"the checkpoint replaces the start", []jobLife{
			{id: "a", start: time.Minute, checkpoint: 6 * time.Minute},
			{id: "b", start: 2 * time.Minute, checkpoint: 5 * time.Minute},
		}, counts(0, 2, 0, 0, 0), 5 * time.Minute},
		// A job taken over by a second slice and one whose cancellation
		// is requested are running, once each.
		{"rescued and cancel-requested jobs are running", []jobLife{
			{id: "rescued", start: time.Minute, restart: 7 * time.Minute, checkpoint: 8 * time.Minute},
			{id: "cancelling", start: 9 * time.Minute, cancel: true},
			{id: "failed", start: time.Second, end: StateFailed},
		}, counts(0, 2, 0, 1, 0), 8 * time.Minute},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			s := newStore(t)
			for i, l := range tt.jobs {
				l.live(ctx, t, s, t0, time.Duration(i)*time.Millisecond)
			}
			got, err := s.JobCounts(ctx, &JobCountsParams{})
			if err != nil {
				t.Fatal(err)
			}
			if !maps.Equal(got.ByState, tt.want) {
				t.Errorf("JobCounts by state = %v, want %v", got.ByState, tt.want)
			}
			if listed := countByListing(ctx, t, s); !maps.Equal(got.ByState, listed) {
				t.Errorf("JobCounts by state = %v, JobList counts %v", got.ByState, listed)
			}
			want := time.Time{}
			if tt.oldest >= 0 {
				want = t0.Add(tt.oldest)
			}
			if !got.OldestRunningSince.Equal(want) {
				t.Errorf("OldestRunningSince = %v, want %v", got.OldestRunningSince, want)
			}
		})
	}

	t.Run("inside a transaction", func(t *testing.T) {
		t.Parallel()
		s := newStore(t)
		(jobLife{id: "committed", start: time.Minute}).live(ctx, t, s, t0, 0)
		rollback := errors.New("roll back")
		err := s.Tx(ctx, func(ctx context.Context, tx Store) error {
			if _, err := tx.JobInsert(ctx, &JobInsertParams{ID: "uncommitted", Spec: []byte("x"), Now: t0}); err != nil {
				return err
			}
			got, err := tx.JobCounts(ctx, &JobCountsParams{})
			if err != nil {
				return err
			}
			if want := counts(1, 1, 0, 0, 0); !maps.Equal(got.ByState, want) {
				return fmt.Errorf("JobCounts in the transaction = %v, want %v with its own insert", got.ByState, want)
			}
			return rollback
		})
		if !errors.Is(err, rollback) {
			t.Fatal(err)
		}
		got, err := s.JobCounts(ctx, &JobCountsParams{})
		if err != nil {
			t.Fatal(err)
		}
		if want := counts(0, 1, 0, 0, 0); !maps.Equal(got.ByState, want) {
			t.Errorf("JobCounts after the rollback = %v, want %v", got.ByState, want)
		}
	})
}

// TestJobCountsSQLitePlan checks that SQLite answers both statements of
// JobCounts from the state index (the plans named in store_counts.go), so
// that the collector's scrape does not come to read every job row again
// if the index or the statements change. The plan lines are SQLite's
// EXPLAIN QUERY PLAN wording (sqlite.org/eqp.html).
func TestJobCountsSQLitePlan(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	s := newTestSQLiteStore(t).(*sqlStore)
	tests := []struct {
		name string
		sql  string
		args []any
		want string
	}{
		{"count by state", jobCountsSQL, nil, "SCAN dampfront_job USING COVERING INDEX dampfront_job_state_created"},
		{"oldest running", oldestRunningSQL, []any{string(StateRunning)}, "SEARCH j USING INDEX dampfront_job_state_created (state=?)"},
	}
	for _, tt := range tests {
		rows, err := s.q.query(ctx, "EXPLAIN QUERY PLAN "+tt.sql, tt.args...)
		if err != nil {
			t.Fatalf("%s: %v", tt.name, err)
		}
		var plan []string
		for rows.Next() {
			var (
				id, parent, unused int64
				detail             string
			)
			if err := rows.Scan(&id, &parent, &unused, &detail); err != nil {
				t.Fatalf("%s: %v", tt.name, err)
			}
			plan = append(plan, detail)
		}
		if err := rows.Err(); err != nil {
			t.Fatalf("%s: %v", tt.name, err)
		}
		rows.Close()
		if !slices.Contains(plan, tt.want) {
			t.Errorf("%s: plan %q has no step %q", tt.name, plan, tt.want)
		}
	}
}
