package study

import (
	"context"
	"errors"
	"testing"

	"dampfront/model"
)

// TestRankRefined sorts five hand-made refined points and marks the
// unsettled ones. The ranks are those of the definition of non-dominated
// sorting with constrained domination (Deb et al. 2002, §III-A and §IV),
// worked out by hand here:
//
//	a (1, 4) ± (0.1, 0.1)   rank 1, dominates d only within 3 errors: unsettled
//	b (2, 2) ± (0.1, 0.1)   rank 1, dominates e surely, nothing else: settled
//	c (4, 1) ± 0            rank 1, dominates nothing: settled
//	d (1.5, 4.2) ± (0.1, 0.1)  rank 2 (a dominates it within 3 errors): unsettled
//	e (3, 3) ± (0.1, 0.1)   rank 2, b surely dominates it: settled
//	f (0, 0), infeasible    rank 3 (behind every feasible point): settled
func TestRankRefined(t *testing.T) {
	t.Parallel()
	pt := func(f1, f2, e float64, viol float64) *RefinedPoint {
		return &RefinedPoint{Refined: model.Refined{Objectives: []float64{f1, f2}, ObjectiveErrors: []float64{e, e}, Violations: []float64{viol}}}
	}
	points := []*RefinedPoint{pt(1, 4, 0.1, 0), pt(2, 2, 0.1, 0), pt(4, 1, 0, 0), pt(1.5, 4.2, 0.1, 0), pt(3, 3, 0.1, 0), pt(0, 0, 0, 0.5),
		{Failed: "diverged"}}
	seed := uint64(3)
	sum := rankRefined(points, Refinement{Enabled: true, Duration: 10, Seed: &seed, Sigmas: 3})
	wantRank := []int{1, 1, 1, 2, 2, 3, 0}
	wantUnsettled := []bool{true, false, false, true, false, false, false}
	for i, p := range points {
		if p.Rank != wantRank[i] || p.Unsettled != wantUnsettled[i] {
			t.Errorf("point %d: rank %d unsettled %v, want %d %v", i, p.Rank, p.Unsettled, wantRank[i], wantUnsettled[i])
		}
	}
	want := RefineSummary{Points: 7, Failed: 1, OffFront: 3, Infeasible: 1, Unsettled: 2, Duration: 10, Seed: 3, Sigmas: 3}
	if *sum != want {
		t.Errorf("summary %+v, want %+v", *sum, want)
	}
	// Without errors every order is sure.
	for _, p := range points[:5] {
		p.ObjectiveErrors = []float64{0, 0}
	}
	sum = rankRefined(points, Refinement{Enabled: true, Duration: 10, Seed: &seed, Sigmas: 3})
	if sum.Unsettled != 0 {
		t.Errorf("without errors %d points unsettled, want 0", sum.Unsettled)
	}
}

// TestRefinementChecks: the refinement's settings are checked with the
// spec, each problem at its path.
func TestRefinementChecks(t *testing.T) {
	t.Parallel()
	s := testSpec()
	seed := uint64(2)
	s.Refinement = Refinement{Duration: 10, Seed: &seed}
	_, err := Check(s)
	if got := problemPaths(t, err); len(got) != 1 || got[0] != "refinement.enabled" {
		t.Errorf("settings without enabled: problems at %v", got)
	}
	s.Refinement = Refinement{Enabled: true, Duration: -1, Sigmas: 11}
	_, err = Check(s)
	if got := problemPaths(t, err); len(got) != 2 || got[0] != "refinement.duration_s" || got[1] != "refinement.sigmas" {
		t.Errorf("bad duration and sigmas: problems at %v", got)
	}
	s.Refinement = Refinement{Enabled: true}
	c, err := Check(s)
	if err != nil {
		t.Fatal(err)
	}
	// The defaults are the time-domain check's (model.DefaultDuration,
	// model.VerdictSigmas) and the search's seed.
	r := c.Spec().Refinement
	if r.Duration != model.DefaultDuration || r.Sigmas != model.VerdictSigmas || *r.Seed != *s.Search.Seed {
		t.Errorf("defaults %+v (seed %d)", r, *r.Seed)
	}
}

// TestRefinementStopsWithItsContext: a step whose context is done checks
// no further point and reports not done, with no error or the context's
// (jobs.Run), and the points checked before are kept; the next step goes
// on. (A run that reported done here would be stored as finished with its
// refinement cut short.)
func TestRefinementStopsWithItsContext(t *testing.T) {
	t.Parallel()
	spec := testSpec()
	spec.Refinement = Refinement{Enabled: true, Duration: 5}
	pl, err := Compile(context.Background(), spec)
	if err != nil {
		t.Fatal(err)
	}
	r, err := OpenRun(pl, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	checked := func() int {
		n := 0
		for _, p := range r.refine.points {
			if p != nil {
				n++
			}
		}
		return n
	}
	for checked() == 0 {
		if done, err := r.Step(context.Background(), 100); err != nil || done {
			t.Fatalf("step: done %v, %v before any point was refined", done, err)
		}
	}
	before := checked()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	done, err := r.Step(ctx, 100)
	if done || err != nil && !errors.Is(err, context.Canceled) || checked() != before {
		t.Fatalf("cancelled step: done %v, error %v, %d points checked (before %d)", done, err, checked(), before)
	}
	if _, err := r.Step(context.Background(), 100); err != nil || checked() != before+1 {
		t.Fatalf("next step: error %v, %d points checked (before %d)", err, checked(), before)
	}
	// Run to the end: the finished stage lets its verifier (and the road
	// inputs it keeps) go before the run saves its refined front.
	for {
		done, err := r.Step(context.Background(), 100)
		if err != nil {
			t.Fatal(err)
		}
		if done {
			break
		}
		if r.refine.verifier == nil {
			t.Fatal("the verifier went before every point was checked")
		}
	}
	if r.refine.summary == nil || r.refine.verifier != nil {
		t.Errorf("finished refinement: summary %v, verifier still held %v", r.refine.summary != nil, r.refine.verifier != nil)
	}
}
