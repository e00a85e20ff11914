package jobs

import (
	"context"
	"log/slog"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"dampfront/jobs/jobstest"
)

// A full disk under a running job spends no slice attempts: with
// MaxAttempts 2, the disk stays full until the slice has failed on it
// more than twice, and the job still succeeds, with the front of the run
// straight through, once room is made. Without the snooze on
// IsUnavailable errors the second failure would fail the job.
//
// The database is on a small tmpfs that the test mounts and fills, for a
// real SQLITE_FULL (jobstest.MountSmallDisk: root only, else skipped).
func TestDiskFullSpendsNoAttempts(t *testing.T) {
	t.Parallel()
	dir := jobstest.MountSmallDisk(t, "16m")
	waits := &countingHandler{prefix: "jobs: database unavailable"}
	b := setup(t, filepath.Join(dir, "dampfront.db"), func(c *Config) {
		c.Workers, c.MaxAttempts = 1, 2
		c.Logger = slog.New(waits)
	})
	// 3 s of work at least: the job must not be able to finish in the
	// rooms between fills before the slice has met the full disk (300
	// generations, 0.6 s, did once with the machine loaded).
	spec := toySpec{Generations: 1500, Size: 5, Seed: 3, StepDelay: 2 * time.Millisecond}
	j := b.submit(t, spec, nil)
	waitFor(t, b.engine, j.ID, "checkpointed", func(j *Job) bool { return j.Progress.Generation > 0 })

	// The disk fills and empties in turns, as a volume shared with files
	// that come and go would: the slice fails on it while full, and River
	// records the failure while there is room. Turns until the slice has
	// failed more than MaxAttempts times, within a bound.
	const failures = 3 // more than MaxAttempts
	// River's completer backs off 1 s, 2 s, 4 s ... while it cannot write,
	// so the turns take a few seconds to some tens; this bounds a hang.
	const bound = 2 * time.Minute
	deadline := time.Now().Add(bound)
	for turns := 0; waits.n.Load() < failures; turns++ {
		if time.Now().After(deadline) {
			t.Fatalf("the slice met the full disk %d times in %d turns within %v; want %d", waits.n.Load(), turns, bound, failures)
		}
		if j, err := b.engine.Get(context.Background(), j.ID); err == nil && j.State.Terminal() {
			t.Fatalf("job ended %s (%s) after the slice met the full disk %d times; want it to wait", j.State, j.Error, waits.n.Load())
		}
		filler := jobstest.Fill(t, dir, 0)
		time.Sleep(300 * time.Millisecond)
		if err := os.Remove(filler); err != nil {
			t.Fatal(err)
		}
		time.Sleep(300 * time.Millisecond)
	}

	j = waitTerminal(t, b.engine, j.ID)
	if j.State != StateSucceeded || j.Partial || j.Error != "" {
		t.Fatalf("job after %d runs met the full disk: %+v; want succeeded", waits.n.Load(), j)
	}
	sameFront(t, frontOf(t, b.engine, j.ID).Solutions, toyFrontAt(spec, spec.Generations))
}

// countingHandler counts the log records whose message starts with prefix.
type countingHandler struct {
	prefix string
	n      atomic.Int64
}

func (h *countingHandler) Enabled(context.Context, slog.Level) bool { return true }
func (h *countingHandler) WithAttrs([]slog.Attr) slog.Handler       { return h }
func (h *countingHandler) WithGroup(string) slog.Handler            { return h }
func (h *countingHandler) Handle(_ context.Context, r slog.Record) error {
	if strings.HasPrefix(r.Message, h.prefix) {
		h.n.Add(1)
	}
	return nil
}
