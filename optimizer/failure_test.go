package optimizer

import (
	"context"
	"errors"
	"math"
	"strings"
	"sync/atomic"
	"testing"
)

// TestFailedEvaluations runs the faulty problem (problems_test.go), whose
// evaluation returns an error for x1 > 0.8, a NaN objective for
// 0.4 < x1 < 0.5 and violates x2 ≤ 0.9 above it. The run must complete;
// each such individual is infeasible with its reason; the front holds only
// feasible points outside those regions.
func TestFailedEvaluations(t *testing.T) {
	t.Parallel()
	s := DefaultSettings(10)
	s.PopulationSize, s.Generations = 30, 20
	st := mustNew(t, faulty{}, s)
	seen := map[string]int{}
	if err := st.Run(context.Background()); err != nil {
		t.Fatalf("run aborted: %v", err)
	}
	// TestFailedInitialPopulation sees every region; here the population
	// after selection is checked.
	for _, sol := range st.Population() {
		x1, x2 := sol.Genes[0], sol.Genes[1]
		switch {
		case x1 > 0.8:
			seen["error"]++
			if sol.Feasible || !strings.Contains(sol.Reason, errRegion.Error()) || !math.IsNaN(sol.Objectives[0]) || !math.IsInf(sol.Violations[0], 1) {
				t.Errorf("x1 = %v: feasible %v, reason %q, objectives %v, violations %v", x1, sol.Feasible, sol.Reason, sol.Objectives, sol.Violations)
			}
		case x1 > 0.4 && x1 < 0.5:
			seen["nan"]++
			if sol.Feasible || sol.Reason != "objective 1 is NaN" {
				t.Errorf("x1 = %v: feasible %v, reason %q", x1, sol.Feasible, sol.Reason)
			}
		case x2 > 0.9:
			seen["constraint"]++
			if sol.Feasible || !strings.HasPrefix(sol.Reason, "constraint 0 violated by ") || sol.Violations[0] != x2-0.9 {
				t.Errorf("x2 = %v: feasible %v, reason %q, violation %v", x2, sol.Feasible, sol.Reason, sol.Violations[0])
			}
		default:
			if !sol.Feasible || sol.Reason != "" || sol.Violations[0] != 0 {
				t.Errorf("x = %v: feasible %v, reason %q, violation %v", sol.Genes[:2], sol.Feasible, sol.Reason, sol.Violations[0])
			}
		}
	}
	t.Logf("final population: %v", seen)
	front := st.Front()
	if len(front) == 0 {
		t.Fatal("empty front")
	}
	for _, sol := range front {
		if x1, x2 := sol.Genes[0], sol.Genes[1]; !sol.Feasible || x1 > 0.8 || (x1 > 0.4 && x1 < 0.5) || x2 > 0.9 {
			t.Errorf("front holds %v (feasible %v)", sol.Genes[:2], sol.Feasible)
		}
	}
}

// TestFailedInitialPopulation checks the reasons in a population drawn
// before any selection: every region is hit by 2N = 200 uniform draws.
func TestFailedInitialPopulation(t *testing.T) {
	t.Parallel()
	s := DefaultSettings(10)
	st := mustNew(t, faulty{}, s)
	if _, err := st.Step(context.Background(), 0); err != nil {
		t.Fatal(err)
	}
	count := map[string]int{}
	for _, sol := range st.Population() {
		switch {
		case strings.Contains(sol.Reason, errRegion.Error()):
			count["error"]++
		case strings.Contains(sol.Reason, "NaN"):
			count["nan"]++
		case strings.Contains(sol.Reason, "constraint"):
			count["constraint"]++
		case sol.Feasible:
			count["feasible"]++
		}
	}
	for _, k := range []string{"error", "nan", "constraint", "feasible"} {
		if count[k] == 0 {
			t.Errorf("no %s individual among %v", k, count)
		}
	}
	if st.Evaluations() != 200 {
		t.Errorf("%d evaluations for the initial population, want 200", st.Evaluations())
	}
}

// countingProblem wraps a problem, counts evaluations and cancels a
// context at the given call.
type countingProblem struct {
	Problem
	calls    atomic.Int64
	cancelAt int64
	cancel   context.CancelFunc
}

func (c *countingProblem) Evaluate(x, obj, viol []float64) error {
	if c.calls.Add(1) == c.cancelAt && c.cancel != nil {
		c.cancel()
	}
	return c.Problem.Evaluate(x, obj, viol)
}

// TestCancellation cancels between generations (from the progress
// callback) and between evaluations (from inside an evaluation), checks
// that Step returns the context's error at the last completed generation,
// and that continuing ends bit-identical to an uninterrupted run.
func TestCancellation(t *testing.T) {
	t.Parallel()
	base := DefaultSettings(30)
	base.PopulationSize, base.Generations = 20, 10
	p := zdt{n: 30, h: zdt1H}
	ref := mustNew(t, p, base)
	want := finish(t, ref)
	// Evaluation calls before generation 4 starts; generation 4 makes
	// more than 5, so call after+5 falls inside it.
	after := ref.History()[3].Evaluations
	if ref.History()[4].Evaluations-after <= 5 {
		t.Fatal("generation 4 evaluates too few children for the test")
	}

	for _, tc := range []struct {
		name    string
		workers int
		// cancelGen cancels in the callback of that generation; cancelEval
		// at that evaluation call.
		cancelGen, cancelEval int
		wantGen               int
	}{
		{name: "between generations", workers: 1, cancelGen: 3, cancelEval: -1, wantGen: 3},
		{name: "during initial population", workers: 1, cancelGen: -1, cancelEval: 10, wantGen: -1},
		{name: "during generation 4", workers: 1, cancelGen: -1, cancelEval: after + 5, wantGen: 3},
		{name: "during generation 4, two workers", workers: 2, cancelGen: -1, cancelEval: after + 5, wantGen: 3},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			cp := &countingProblem{Problem: p, cancelAt: int64(tc.cancelEval), cancel: cancel}
			s := base
			s.Workers = tc.workers
			var st *Search
			s.Progress = func(pr Progress) {
				if pr.Generation == tc.cancelGen {
					cancel()
				}
			}
			st = mustNew(t, cp, s)
			done, err := st.Step(ctx, s.Generations)
			if !errors.Is(err, context.Canceled) {
				t.Fatalf("Step returned %v, want context.Canceled", err)
			}
			if done {
				t.Error("cancelled study reports done")
			}
			if tc.wantGen < 0 {
				if st.Started() {
					t.Errorf("study started after cancellation during the initial population")
				}
			} else if st.Generation() != tc.wantGen {
				t.Errorf("generation %d after cancellation, want %d", st.Generation(), tc.wantGen)
			}
			if len(st.History()) != tc.wantGen+1 {
				t.Errorf("%d history entries, want %d", len(st.History()), tc.wantGen+1)
			}
			if got := finish(t, st); !bytesEqual(got, want) {
				t.Error("continued run ends differently from the uninterrupted one")
			}
		})
	}

	t.Run("already cancelled", func(t *testing.T) {
		t.Parallel()
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		cp := &countingProblem{Problem: p}
		st := mustNew(t, cp, base)
		if _, err := st.Step(ctx, 1); !errors.Is(err, context.Canceled) {
			t.Errorf("Step returned %v", err)
		}
		if n := cp.calls.Load(); n != 0 {
			t.Errorf("%d evaluations with a cancelled context", n)
		}
	})
}

func bytesEqual(a, b []byte) bool { return string(a) == string(b) }
