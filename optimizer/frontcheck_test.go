package optimizer

import (
	"context"
	"math"
	"testing"
)

// splitPair is a problem constructed here (no published source) with the
// structure the same-sum twin looks for: genes u, v in [0, 1], sum
// s = u + v and split d = u − v, and
//
//	f1 = s + d²,  f2 = (2 − s)² + d².
//
// At a given s the split adds d² to both objectives, so the Pareto set is
// d = 0 and a point's twin ((u+v)/2, (u+v)/2) beats it by exactly d² in
// each objective.
type splitPair struct{}

func (splitPair) Bounds() []Bound     { return []Bound{{0, 1}, {0, 1}} }
func (splitPair) NumObjectives() int  { return 2 }
func (splitPair) NumConstraints() int { return 0 }
func (splitPair) Evaluate(x, obj, _ []float64) error {
	s, d := x[0]+x[1], x[0]-x[1]
	obj[0] = s + d*d
	obj[1] = (2-s)*(2-s) + d*d
	return nil
}

func splitTwin(x, dst []float64) bool {
	m := (x[0] + x[1]) / 2
	dst[0], dst[1] = m, m
	return true
}

// TestCheckFrontSplitPair checks a hand-made front of splitPair: points on
// the Pareto set (d = 0) are beaten by nothing, points with d² above the
// margin are beaten by their twin, and every reported beater, evaluated
// again, is better by more than the margin in both objectives.
func TestCheckFrontSplitPair(t *testing.T) {
	t.Parallel()
	p := splitPair{}
	var front []Solution
	add := func(u, v float64) {
		s := Solution{Genes: []float64{u, v}, Objectives: make([]float64, 2), Feasible: true}
		if err := p.Evaluate(s.Genes, s.Objectives, nil); err != nil {
			t.Fatal(err)
		}
		front = append(front, s)
	}
	for _, s := range []float64{0.2, 0.6, 1.0, 1.4, 1.8} {
		add(s/2, s/2) // d = 0
	}
	add(0.5, 0.1)   // d = 0.4, d² = 0.16
	add(0.9, 0.5)   // d = 0.4
	add(0.52, 0.48) // d = 0.04, d² = 0.0016: below the margin below
	c := FrontCheck{Twin: splitTwin, Radius: []float64{0.03, 0.03}, Perturbations: 4, Margin: 0.001, Seed: 3, Workers: 2}
	rep, err := CheckFront(context.Background(), p, front, c)
	if err != nil {
		t.Fatal(err)
	}
	// Margins: 0.001 of the extents over the front. f1 spans 0.2 to 1.8,
	// f2 from (2 − 1.8)² = 0.04 to (2 − 0.2)² = 3.24.
	wantMargin := []float64{0.001 * 1.6, 0.001 * 3.2}
	for j := range wantMargin {
		if math.Abs(rep.Margin[j]-wantMargin[j]) > 1e-12 { // rounding of a few sums
			t.Errorf("margin[%d] = %v, want %v", j, rep.Margin[j], wantMargin[j])
		}
	}
	if rep.Points != len(front) || rep.Twins != 3 {
		t.Errorf("points %d (want %d), twins %d (want 3: the d = 0 points are their own)", rep.Points, len(front), rep.Twins)
	}
	for i := range 5 {
		if rep.Checks[i].Beaten {
			t.Errorf("point %d on the Pareto set reported beaten by %v", i, rep.Checks[i].By.Genes)
		}
	}
	for _, i := range []int{5, 6} {
		if pc := rep.Checks[i]; !pc.Beaten || !pc.ByTwin {
			t.Errorf("point %d with d² = 0.16 not beaten by its twin: %+v", i, pc)
		}
	}
	if rep.Checks[7].ByTwin {
		t.Errorf("point 7 beaten by its twin within the margin")
	}
	beaten := 0
	for i, pc := range rep.Checks {
		if !pc.Beaten {
			continue
		}
		beaten++
		obj := make([]float64, 2)
		if err := p.Evaluate(pc.By.Genes, obj, nil); err != nil {
			t.Fatal(err)
		}
		if !beats(obj, front[i].Objectives, rep.Margin) {
			t.Errorf("point %d: beater %v evaluates to %v, not better than %v by %v", i, pc.By.Genes, obj, front[i].Objectives, rep.Margin)
		}
	}
	if beaten != rep.Beaten || rep.Beaten != rep.BeatenByTwin+rep.BeatenByNeighbour || rep.BeatenByTwin != 2 {
		t.Errorf("counts %+v, %d points marked beaten", rep, beaten)
	}
	again, _ := CheckFront(context.Background(), p, front, FrontCheck{Twin: splitTwin, Radius: c.Radius, Perturbations: 4, Margin: 0.001, Seed: 3, Workers: 1})
	if again.Evaluations != rep.Evaluations || again.Beaten != rep.Beaten {
		t.Errorf("1 worker: %+v; 2 workers: %+v", again, rep)
	}
	if _, err := CheckFront(context.Background(), p, front, FrontCheck{Radius: []float64{0.03}, Workers: 1}); err == nil {
		t.Error("radius of the wrong length: no error")
	}
}

// TestPolishFixesSplitPair polishes the beaten points of splitPair with
// the twin as the first poll point: after the polish no point of the
// archive is beaten by its twin (the twin is on the Pareto set).
func TestPolishFixesSplitPair(t *testing.T) {
	t.Parallel()
	p := splitPair{}
	s := DefaultSettings(2)
	s.PopulationSize, s.Generations = 12, 3
	st := mustNew(t, p, s)
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	c := FrontCheck{Twin: splitTwin, Radius: []float64{0.03, 0.03}, Perturbations: 4, Margin: 0.001, Seed: 1, Workers: 1}
	before, err := CheckFront(context.Background(), p, st.Front(), c)
	if err != nil {
		t.Fatal(err)
	}
	pol := DefaultPolish(1)
	pol.Twin = splitTwin
	rep, err := st.Polish(context.Background(), pol)
	if err != nil {
		t.Fatal(err)
	}
	after, err := CheckFront(context.Background(), p, st.Front(), c)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("before: %d of %d beaten; polish improved %d; after: %d of %d beaten", before.Beaten, before.Points, rep.Improved, after.Beaten, after.Points)
	if before.Beaten == 0 {
		t.Error("a 3-generation front has no beaten point: the test checks nothing")
	}
	if after.BeatenByTwin != 0 {
		t.Errorf("%d points beaten by their twin after the polish", after.BeatenByTwin)
	}
}
