package optimizer

import (
	"context"
	"fmt"
	"sync"
	"testing"
	"time"
)

// gatedProblem records the largest number of evaluations in flight. With
// rendezvous set, an evaluation waits (up to a bound) for a second one to
// start, so that a parallel run must show two at once.
type gatedProblem struct {
	Problem
	rendezvous bool
	mu         sync.Mutex
	cond       *sync.Cond
	inFlight   int
	maxFlight  int
}

func newGatedProblem(p Problem, rendezvous bool) *gatedProblem {
	g := &gatedProblem{Problem: p, rendezvous: rendezvous}
	g.cond = sync.NewCond(&g.mu)
	return g
}

func (g *gatedProblem) Evaluate(x, obj, viol []float64) error {
	g.mu.Lock()
	g.inFlight++
	g.maxFlight = max(g.maxFlight, g.inFlight)
	g.cond.Broadcast()
	if g.rendezvous && g.maxFlight < 2 {
		// Bounded wait: a serial run gets here with nobody to meet.
		deadline := time.AfterFunc(2*time.Second, func() {
			g.mu.Lock()
			g.cond.Broadcast()
			g.mu.Unlock()
		})
		start := time.Now()
		for g.maxFlight < 2 && time.Since(start) < 2*time.Second {
			g.cond.Wait()
		}
		deadline.Stop()
	}
	g.inFlight--
	g.mu.Unlock()
	return g.Problem.Evaluate(x, obj, viol)
}

// TestWorkersLimit checks that Workers bounds the evaluations in flight,
// across islands too, and that Workers = 2 does evaluate two at once.
func TestWorkersLimit(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		workers, islands int
		rendezvous       bool
		want             int
	}{
		{1, 1, false, 1},
		{1, 3, false, 1},
		{2, 1, true, 2},
		{2, 3, false, 2},
	} {
		t.Run(fmt.Sprintf("workers=%d/islands=%d", tc.workers, tc.islands), func(t *testing.T) {
			t.Parallel()
			s := DefaultSettings(30)
			s.PopulationSize, s.Generations, s.Workers, s.Islands = 10, 3, tc.workers, tc.islands
			s.MigrationEvery, s.Migrants = 1, 2
			g := newGatedProblem(zdt{n: 30, h: zdt1H}, tc.rendezvous)
			st := mustNew(t, g, s)
			if err := st.Run(context.Background()); err != nil {
				t.Fatal(err)
			}
			if tc.rendezvous && g.maxFlight != tc.want || g.maxFlight > tc.workers {
				t.Errorf("at most %d evaluations in flight, want %d (Workers %d)", g.maxFlight, tc.want, tc.workers)
			}
		})
	}
}
