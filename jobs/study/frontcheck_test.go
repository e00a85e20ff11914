package study

import (
	"context"
	"math"
	"reflect"
	"testing"

	"dampfront/optimizer"
)

// runToEnd steps a run of pl to its end, through a checkpoint and a
// reopen after every step when resume is set.
func runToEnd(t *testing.T, pl *Plan, step int, resume bool) *run {
	t.Helper()
	r, err := OpenRun(pl, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	for {
		done, err := r.Step(context.Background(), step)
		if err != nil {
			t.Fatal(err)
		}
		if done {
			return r
		}
		if resume {
			ck, err := r.Checkpoint()
			if err != nil {
				t.Fatal(err)
			}
			if r, err = OpenRun(pl, 1, ck); err != nil {
				t.Fatal(err)
			}
		}
	}
}

// TestFrontCheckSeededJob runs a small seeded job with and without the
// polish and checks the front check's counts against a fresh evaluation:
// every point reported beaten is beaten, re-evaluated through the model's
// problem, by more than 0.1 % of the front's extent in every objective
// (extent recomputed here from the front), and every point reported not
// beaten is not beaten by its same-sum twin; the counts add up; the same
// check comes out when the run is cut and reopened after every
// generation.
func TestFrontCheckSeededJob(t *testing.T) {
	t.Parallel()
	for _, budget := range []int{0, 12} {
		spec := testSpec()
		spec.Search.Generations, spec.Search.PolishBudget = 4, budget
		pl, err := Compile(context.Background(), spec)
		if err != nil {
			t.Fatal(err)
		}
		r := runToEnd(t, pl, 100, false)
		c, front := r.Check(), r.search.Front()
		if c == nil {
			t.Fatal("no check after the end")
		}
		t.Logf("polish budget %d: %+v", budget, *c)
		m := pl.Problem().NumObjectives()
		margin := make([]float64, m)
		for j := range margin {
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, s := range front {
				lo, hi = min(lo, s.Objectives[j]), max(hi, s.Objectives[j])
			}
			margin[j] = CheckMargin * (hi - lo)
		}
		better := func(x []float64, of optimizer.Solution) bool {
			obj := make([]float64, m)
			viol := make([]float64, pl.Problem().NumConstraints())
			if err := pl.Problem().EvaluateGenes(x, obj, viol); err != nil {
				t.Fatal(err)
			}
			for j := range obj {
				if !(obj[j] < of.Objectives[j]-margin[j]) {
					return false
				}
			}
			return optimizer.TotalViolation(viol) == 0
		}
		beaten := map[int]bool{}
		byTwin := 0
		for _, b := range c.BeatenPoints {
			beaten[b.Index] = true
			if b.ByTwin {
				byTwin++
			}
			if !better(b.By, front[b.Index]) {
				t.Errorf("point %d reported beaten by %v, which is not better by the margin", b.Index, b.By)
			}
		}
		twins := 0
		for i, s := range front {
			y := make([]float64, len(s.Genes))
			if pl.twin(s.Genes, y) && !reflect.DeepEqual(y, s.Genes) {
				twins++
				if !beaten[i] && better(y, s) {
					t.Errorf("point %d reported not beaten, yet its twin %v beats it", i, y)
				}
			}
		}
		if c.Points != len(front) || c.Twins != twins || c.Beaten != len(c.BeatenPoints) ||
			c.BeatenByTwin != byTwin || c.Beaten != c.BeatenByTwin+c.BeatenByNeighbour {
			t.Errorf("counts %+v for %d points, %d twins, %d beaten (%d by the twin)", *c, len(front), twins, len(c.BeatenPoints), byTwin)
		}
		if (budget > 0) != (c.PolishEvaluations > 0) || c.Polished > c.PolishEvaluations {
			t.Errorf("polish budget %d: %d evaluations, %d improved", budget, c.PolishEvaluations, c.Polished)
		}
		cut := runToEnd(t, pl, 1, true)
		if !reflect.DeepEqual(cut.Check(), c) || !reflect.DeepEqual(cut.search.Front(), front) {
			t.Errorf("polish budget %d: run cut every generation ends with another front or check: %+v", budget, *cut.Check())
		}
	}
}

// The polish and stagnation settings are checked with the others, each
// problem at its path in the spec.
func TestCheckPolishAndStagnation(t *testing.T) {
	t.Parallel()
	s := testSpec()
	s.Search.PolishBudget = MaxPolishBudget + 1
	s.Search.StagnationWindow, s.Search.StagnationTolerance = -2, 1
	_, err := Check(s)
	want := []string{"search.polish_budget", "search.stagnation_tolerance", "search.stagnation_window"}
	if got := problemPaths(t, err); !reflect.DeepEqual(got, want) {
		t.Errorf("problems at %v, want %v", got, want)
	}
}
