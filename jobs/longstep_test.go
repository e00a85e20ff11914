package jobs

import (
	"context"
	"strings"
	"testing"
	"time"
)

// A step longer than a slice's attempt (slice plus grace, River's
// timeout of the attempt) cannot finish in any slice: each would start it
// again from the same checkpoint. The job fails at the first slice whose
// first step runs into that timeout, saying why and what to change,
// instead of handing itself over for ever.
func TestStepLongerThanASliceFailsTheJob(t *testing.T) {
	t.Parallel()
	b := setup(t, testSQLitePath(t), func(c *Config) { c.SliceGrace = 400 * time.Millisecond })
	spec := toySpec{Generations: 8, Size: 3, Seed: 5, StepDelay: time.Millisecond, LongStepAt: 5, LongStep: 3 * time.Second}
	j := b.submit(t, spec, nil)
	ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	for {
		got, err := b.engine.Get(ctx, j.ID)
		if err != nil {
			t.Fatalf("job never ended: %v", err)
		}
		if got.State.Terminal() {
			if got.State != StateFailed || !strings.Contains(got.Error, "ran past a slice's time limit") || !strings.Contains(got.Error, "--slice") {
				t.Fatalf("job ended %s: %q; want failed, saying a step outlasts the slice", got.State, got.Error)
			}
			if got.Progress.Generation != 4 {
				t.Errorf("failed at generation %d, want the 4 before the long step", got.Progress.Generation)
			}
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
}
