package jobs

import (
	"bytes"
	"context"
	"database/sql"
	"errors"
	"fmt"
	"log/slog"
	"strings"
	"testing"
	"time"
)

// testTimeout bounds every wait in these tests; the jobs they run take
// well under a second of compute. The race detector slows the pure-Go
// SQLite driver some tenfold, hence the longer bound then.
var testTimeout = map[bool]time.Duration{false: 30 * time.Second, true: 120 * time.Second}[raceDetector]

// pollInterval is how often the tests read a job while waiting; it shares
// the database (one connection, for SQLite) with the engine under test.
const pollInterval = 25 * time.Millisecond

// testConfig has short slices and polls so a job of a few hundred
// generations crosses many slices in well under a second.
func testConfig(url string) Config {
	return Config{
		DatabaseURL:        url,
		Workers:            2,
		SliceDuration:      80 * time.Millisecond,
		SliceGrace:         5 * time.Second,
		RescueMargin:       time.Second,
		CheckpointInterval: 50 * time.Millisecond,
		ProgressInterval:   25 * time.Millisecond,
		CancelPollInterval: 20 * time.Millisecond,
		WatchInterval:      25 * time.Millisecond,
		FetchPollInterval:  20 * time.Millisecond,
		RetryDelay:         50 * time.Millisecond,
		StopTimeout:        5 * time.Second,
		FinalizeTimeout:    5 * time.Second,
		Logger:             slog.New(slog.DiscardHandler),
		testOnly:           true,
	}
}

type testBundle struct {
	engine *Engine
	opener *toyOpener
	url    string
}

// backends are the databases the engine tests run on: SQLite always,
// PostgreSQL when DAMPFRONT_TEST_DATABASE_URL is set.
var backends = []struct {
	name string
	url  func(t testing.TB) string
}{
	{"sqlite", testSQLitePath},
	{"postgres", testPostgresURL},
}

// setup opens and starts an engine on url with testConfig changed by mod.
func setup(t *testing.T, url string, mod func(*Config)) *testBundle {
	t.Helper()
	cfg := testConfig(url)
	if mod != nil {
		mod(&cfg)
	}
	b := &testBundle{opener: &toyOpener{}, url: url}
	e, err := Open(context.Background(), cfg, b.opener)
	if err != nil {
		t.Fatal(err)
	}
	b.engine = e
	t.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
		defer cancel()
		if err := e.Stop(ctx); err != nil {
			t.Errorf("Stop: %v", err)
		}
		_ = e.Close()
	})
	if _, err := e.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	return b
}

func (b *testBundle) submit(t *testing.T, spec toySpec, labels map[string]string) *Job {
	t.Helper()
	j, err := b.engine.Submit(context.Background(), &SubmitParams{Spec: spec.bytes(), Labels: labels})
	if err != nil {
		t.Fatal(err)
	}
	return j
}

// waitFor polls job id until cond holds, at most testTimeout.
func waitFor(t *testing.T, e *Engine, id string, what string, cond func(*Job) bool) *Job {
	t.Helper()
	return waitForWithin(t, e, id, what, testTimeout, cond)
}

// waitForWithin polls job id until cond holds, at most limit.
func waitForWithin(t *testing.T, e *Engine, id string, what string, limit time.Duration, cond func(*Job) bool) *Job {
	t.Helper()
	deadline := time.Now().Add(limit)
	for {
		j, err := e.Get(context.Background(), id)
		if err != nil {
			t.Fatal(err)
		}
		if cond(j) {
			return j
		}
		if time.Now().After(deadline) {
			t.Fatalf("job %s not %s within %v: %+v", id, what, limit, j)
		}
		time.Sleep(pollInterval)
	}
}

func waitTerminal(t *testing.T, e *Engine, id string) *Job {
	t.Helper()
	return waitFor(t, e, id, "finished", func(j *Job) bool { return j.State.Terminal() })
}

// frontOf reads a job's whole stored front, page by page.
func frontOf(t *testing.T, e *Engine, id string) *FrontPage {
	t.Helper()
	all := &FrontPage{}
	p := &FrontGetParams{JobID: id, PageSize: 7}
	for pages := 0; ; pages++ {
		if pages > 100 {
			t.Fatal("front paging did not end")
		}
		page, err := e.Front(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		all.Job, all.Partial, all.Total = page.Job, page.Partial, page.Total
		all.Solutions = append(all.Solutions, page.Solutions...)
		if page.NextPageToken == "" {
			return all
		}
		p.PageToken = page.NextPageToken
	}
}

// sameFront compares two fronts bit for bit.
func sameFront(t *testing.T, got, want []Solution) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("front has %d solutions, want %d", len(got), len(want))
	}
	for i := range want {
		g, w := got[i], want[i]
		if g.Index != w.Index || g.Feasible != w.Feasible || !bytes.Equal(g.Detail, w.Detail) ||
			!sameBits(g.Genes, w.Genes) || !sameBits(g.Objectives, w.Objectives) || !sameBits(g.Violations, w.Violations) {
			t.Fatalf("solution %d = %+v, want %+v bit for bit", i, g, w)
		}
	}
}

// TestJobSlicesMatchOneGo runs the same seeded job in one slice and in
// many, and checks both fronts against the toy run straight through.
func TestJobSlicesMatchOneGo(t *testing.T) {
	t.Parallel()
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			spec := toySpec{Generations: 200, Size: 13, Seed: 7, StepDelay: 2 * time.Millisecond}
			want := toyFrontAt(spec, spec.Generations)
			tests := []struct {
				name      string
				slice     time.Duration
				minSlices int
			}{
				// 200 generations of at least 2 ms: an 80 ms slice cannot
				// hold more than 40, so at least 5 slices.
				{"many slices", 80 * time.Millisecond, 5},
				{"one go", time.Minute, 1},
			}
			for _, tt := range tests {
				t.Run(tt.name, func(t *testing.T) {
					t.Parallel()
					b := setup(t, be.url(t), func(c *Config) { c.SliceDuration = tt.slice })
					j := b.submit(t, spec, nil)
					j = waitTerminal(t, b.engine, j.ID)
					if j.State != StateSucceeded || j.Partial || j.Error != "" {
						t.Fatalf("job ended %+v, want succeeded", j)
					}
					if j.Slices < tt.minSlices {
						t.Errorf("job ran in %d slices, want at least %d", j.Slices, tt.minSlices)
					}
					if tt.minSlices == 1 && j.Slices != 1 {
						t.Errorf("job ran in %d slices, want 1", j.Slices)
					}
					if got := b.opener.executed.Load(); got != int64(spec.Generations) {
						t.Errorf("%d generations executed over all slices, want exactly %d (no work redone or lost)", got, spec.Generations)
					}
					if j.Progress.Generation != spec.Generations || j.Progress.Evaluations != int64(spec.Generations*spec.Size) {
						t.Errorf("final progress %+v", j.Progress)
					}
					f := frontOf(t, b.engine, j.ID)
					if f.Partial || f.Total != spec.Size {
						t.Errorf("front: partial %v, total %d", f.Partial, f.Total)
					}
					sameFront(t, f.Solutions, want)
				})
			}
		})
	}
}

// TestCancelKeepsPartialFront cancels a running job from a second engine
// on the same database (as another process would) and checks that the
// stored front is the toy's at the generation where the job stopped.
func TestCancelKeepsPartialFront(t *testing.T) {
	t.Parallel()
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			b := setup(t, be.url(t), nil)
			other, err := Open(context.Background(), testConfig(b.url), &toyOpener{}) // no Start: a client only
			if err != nil {
				t.Fatal(err)
			}
			defer other.Close()

			spec := toySpec{Generations: 100000, Size: 5, Seed: 3, StepDelay: time.Millisecond}
			j := b.submit(t, spec, nil)
			waitFor(t, b.engine, j.ID, "past generation 30", func(j *Job) bool { return j.Progress.Generation > 30 })
			c, err := other.Cancel(context.Background(), j.ID)
			if err != nil {
				t.Fatal(err)
			}
			if !c.CancelRequested {
				t.Errorf("Cancel returned %+v without the request flag", c)
			}
			j = waitTerminal(t, b.engine, j.ID)
			if j.State != StateCancelled || !j.Partial {
				t.Fatalf("job ended %+v, want cancelled and partial", j)
			}
			f := frontOf(t, other, j.ID)
			if !f.Partial {
				t.Error("front of a cancelled job not marked partial")
			}
			sameFront(t, f.Solutions, toyFrontAt(spec, j.Progress.Generation))

			if _, err := other.Cancel(context.Background(), j.ID); !errors.Is(err, ErrFailedPrecondition) {
				t.Errorf("second Cancel: err = %v, want ErrFailedPrecondition", err)
			}
		})
	}
}

// TestStopHandsOver stops an engine mid-job and finishes the job on a
// new engine over the same database, losing no generation.
func TestStopHandsOver(t *testing.T) {
	t.Parallel()
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			url := be.url(t)
			spec := toySpec{Generations: 250, Size: 9, Seed: 11, StepDelay: time.Millisecond}
			cfg := testConfig(url)
			cfg.SliceDuration = time.Minute // the hand-over comes from Stop, not the slice clock
			cfg.CheckpointInterval = -1     // and the only checkpoint is Stop's
			first := &toyOpener{}
			e1, err := Open(context.Background(), cfg, first)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := e1.Start(context.Background()); err != nil {
				t.Fatal(err)
			}
			j, err := e1.Submit(context.Background(), &SubmitParams{Spec: spec.bytes()})
			if err != nil {
				t.Fatal(err)
			}
			waitFor(t, e1, j.ID, "past generation 50", func(j *Job) bool { return j.Progress.Generation > 50 })
			ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
			defer cancel()
			stopStart := time.Now()
			if err := e1.Stop(ctx); err != nil {
				t.Fatalf("Stop: %v", err)
			}
			t.Logf("Stop handed the running slice over in %v", time.Since(stopStart))
			stopped, err := e1.Get(ctx, j.ID)
			if err != nil {
				t.Fatal(err)
			}
			_ = e1.Close()
			if stopped.State != StateRunning {
				t.Fatalf("after Stop the job is %s, want running (handed over)", stopped.State)
			}
			ran := first.executed.Load()
			if int64(stopped.Progress.Generation) != ran {
				t.Errorf("Stop checkpointed generation %d, the study had run %d", stopped.Progress.Generation, ran)
			}

			b := setup(t, url, nil)
			j = waitTerminal(t, b.engine, j.ID)
			if j.State != StateSucceeded {
				t.Fatalf("job ended %+v", j)
			}
			if got := ran + b.opener.executed.Load(); got != int64(spec.Generations) {
				t.Errorf("%d generations over both engines, want exactly %d", got, spec.Generations)
			}
			sameFront(t, frontOf(t, b.engine, j.ID).Solutions, toyFrontAt(spec, spec.Generations))
		})
	}
}

// TestFailures covers the ways a job fails and the typed errors of the
// engine's API.
func TestFailures(t *testing.T) {
	t.Parallel()
	b := setup(t, testSQLitePath(t), nil)
	ctx := context.Background()

	t.Run("study step fails", func(t *testing.T) {
		t.Parallel()
		j := b.submit(t, toySpec{Generations: 100, Size: 3, FailAt: 60, StepDelay: time.Millisecond}, nil)
		j = waitTerminal(t, b.engine, j.ID)
		if j.State != StateFailed || !j.Partial || !bytes.Contains([]byte(j.Error), []byte("generation 60 diverged")) {
			t.Fatalf("job ended %+v, want failed with the study's error", j)
		}
		f := frontOf(t, b.engine, j.ID)
		if !f.Partial || f.Total != 3 {
			t.Errorf("front of the failed job: partial %v, %d solutions; want the last checkpoint's 3, partial", f.Partial, f.Total)
		}
	})
	t.Run("study does not open", func(t *testing.T) {
		t.Parallel()
		j, err := b.engine.store.JobInsert(ctx, &JobInsertParams{ID: "bad-spec", Spec: []byte(`{"generations":0}`), Now: time.Now()})
		if err != nil {
			t.Fatal(err)
		}
		// Queue it as Submit would, bypassing the spec validator.
		rq := b.engine.q.(*riverQueue[*sql.Tx])
		if _, err := rq.client.Insert(ctx, sliceArgs{JobID: j.ID, Slice: 1}, rq.insertOpts()); err != nil {
			t.Fatal(err)
		}
		j = waitTerminal(t, b.engine, j.ID)
		if j.State != StateFailed || !bytes.Contains([]byte(j.Error), []byte("open study")) {
			t.Fatalf("job ended %+v, want failed on open", j)
		}
	})
	t.Run("unknown id", func(t *testing.T) {
		t.Parallel()
		calls := map[string]func() error{
			"Get":    func() error { _, err := b.engine.Get(ctx, "no-such-job"); return err },
			"Cancel": func() error { _, err := b.engine.Cancel(ctx, "no-such-job"); return err },
			"Watch":  func() error { _, err := b.engine.Watch(ctx, "no-such-job"); return err },
			"Front":  func() error { _, err := b.engine.Front(ctx, &FrontGetParams{JobID: "no-such-job"}); return err },
		}
		for name, call := range calls {
			var nf *NotFoundError
			if err := call(); !errors.As(err, &nf) || nf.ID != "no-such-job" {
				t.Errorf("%s: err = %v, want *NotFoundError naming the ID", name, err)
			}
		}
	})
	t.Run("front of a running job", func(t *testing.T) {
		t.Parallel()
		j := b.submit(t, toySpec{Generations: 100000, Size: 2, StepDelay: time.Millisecond}, nil)
		waitFor(t, b.engine, j.ID, "running", func(j *Job) bool { return j.State == StateRunning })
		// The front so far, as the last checkpoint stored it, marked partial.
		page, err := b.engine.Front(ctx, &FrontGetParams{JobID: j.ID})
		if err != nil || !page.Partial {
			t.Errorf("Front of a running job: %+v, err = %v, want a partial page", page, err)
		}
		if _, err := b.engine.Cancel(ctx, j.ID); err != nil {
			t.Fatal(err)
		}
		waitTerminal(t, b.engine, j.ID)
	})
	t.Run("bad submit", func(t *testing.T) {
		t.Parallel()
		tests := []struct {
			name  string
			p     SubmitParams
			field string
		}{
			{"no spec", SubmitParams{}, "spec"},
			{"spec too large", SubmitParams{Spec: make([]byte, DefaultMaxSpecBytes+1)}, "spec"},
			{"bad label", SubmitParams{Spec: toySpec{Generations: 1, Size: 1}.bytes(), Labels: map[string]string{"-x": "y"}}, `labels["-x"]`},
		}
		for _, tt := range tests {
			_, err := b.engine.Submit(ctx, &tt.p)
			var ia *InvalidArgumentError
			if !errors.As(err, &ia) || !errors.Is(err, ErrInvalidArgument) || !hasField(ia, tt.field) {
				t.Errorf("%s: err = %v, want *InvalidArgumentError naming %q", tt.name, err, tt.field)
			}
		}
		// The spec is opaque to the engine, which never calls back to
		// check it (the caller has): a spec the opener refuses is
		// stored, and its job fails with the opener's reason.
		j, err := b.engine.Submit(ctx, &SubmitParams{Spec: []byte(`{"generations":5}`)})
		if err != nil {
			t.Fatalf("spec refused by the opener: Submit: %v", err)
		}
		if j = waitTerminal(t, b.engine, j.ID); j.State != StateFailed || !strings.Contains(j.Error, errToySpec.Error()) {
			t.Errorf("job of a spec the opener refuses ended %s with %q, want failed with %q", j.State, j.Error, errToySpec)
		}
	})
}

func hasField(ia *InvalidArgumentError, field string) bool {
	for _, v := range ia.Violations {
		if v.Field == field {
			return true
		}
	}
	return false
}

func TestOpenRejectsBadConfig(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name  string
		mod   func(*Config)
		field string
	}{
		{"no database", func(c *Config) { c.DatabaseURL = "" }, "database_url"},
		{"sqlite path with a query", func(c *Config) { c.DatabaseURL = "sqlite:x.db?mode=ro" }, "database_url"},
		{"negative slice", func(c *Config) { c.SliceDuration = -time.Second }, "config.slice_duration"},
		{"negative workers", func(c *Config) { c.Workers = -1 }, "config.workers"},
	}
	for _, tt := range tests {
		cfg := testConfig(testSQLitePath(t))
		tt.mod(&cfg)
		_, err := Open(context.Background(), cfg, &toyOpener{})
		var ia *InvalidArgumentError
		if !errors.As(err, &ia) || !hasField(ia, tt.field) {
			t.Errorf("%s: err = %v, want *InvalidArgumentError naming %q", tt.name, err, tt.field)
		}
	}
}

// TestWatch follows a job to its end: snapshots arrive with generations
// that never go down (no crash here), and the last is the final state.
func TestWatch(t *testing.T) {
	t.Parallel()
	b := setup(t, testSQLitePath(t), nil)
	spec := toySpec{Generations: 200, Size: 4, StepDelay: time.Millisecond}
	j := b.submit(t, spec, nil)
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	defer cancel()
	ch, err := b.engine.Watch(ctx, j.ID)
	if err != nil {
		t.Fatal(err)
	}
	var snaps []*Job
	for s := range ch {
		snaps = append(snaps, s)
	}
	if ctx.Err() != nil {
		t.Fatal("watch did not end before the test timeout")
	}
	if len(snaps) < 3 {
		t.Errorf("%d snapshots, want several for a 200-generation job", len(snaps))
	}
	for i := 1; i < len(snaps); i++ {
		if snaps[i].Progress.Generation < snaps[i-1].Progress.Generation {
			t.Errorf("generation went from %d to %d", snaps[i-1].Progress.Generation, snaps[i].Progress.Generation)
		}
	}
	last := snaps[len(snaps)-1]
	if last.State != StateSucceeded || last.Progress.Generation != spec.Generations {
		t.Errorf("last snapshot %+v, want succeeded at generation %d", last, spec.Generations)
	}
}

// TestListThroughEngine checks that the engine's list sees states and
// labels as jobs move.
func TestListThroughEngine(t *testing.T) {
	t.Parallel()
	b := setup(t, testSQLitePath(t), func(c *Config) { c.Workers = 1 })
	ctx := context.Background()
	var ids []string
	for i := range 5 {
		j := b.submit(t, toySpec{Generations: 5, Size: 2, Seed: int64(i)}, map[string]string{"batch": fmt.Sprint(i % 2)})
		ids = append(ids, j.ID)
	}
	for _, id := range ids {
		waitTerminal(t, b.engine, id)
	}
	res, err := b.engine.List(ctx, &JobListParams{States: []State{StateSucceeded}, Labels: map[string]string{"batch": "0"}, PageSize: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Jobs) != 2 || res.NextPageToken == "" {
		t.Fatalf("first page: %d jobs, token %q; want 2 and a token", len(res.Jobs), res.NextPageToken)
	}
	res2, err := b.engine.List(ctx, &JobListParams{States: []State{StateSucceeded}, Labels: map[string]string{"batch": "0"}, PageSize: 2, PageToken: res.NextPageToken})
	if err != nil {
		t.Fatal(err)
	}
	got := []string{res.Jobs[0].ID, res.Jobs[1].ID}
	for _, j := range res2.Jobs {
		got = append(got, j.ID)
	}
	// Batch 0 holds submissions 0, 2, 4; newest first.
	want := []string{ids[4], ids[2], ids[0]}
	if fmt.Sprint(got) != fmt.Sprint(want) || res2.NextPageToken != "" {
		t.Errorf("listed %v (next %q), want %v", got, res2.NextPageToken, want)
	}
}
