package api

import (
	"context"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/optimizer"
)

// smallDemo is the demo job (testdata/demo-manoeuvre-job.yaml: three road
// cases, a braking and a turn-in manoeuvre, a kerb; grip, platform and
// driver response; its polish budget) with a smaller search and a coarse
// grid, so that it runs in a few seconds.
func smallDemo(t testing.TB, seed uint64) *compiledSpec {
	t.Helper()
	spec := readDemoJob(t, "demo-manoeuvre-job.yaml")
	spec.Search.PopulationSize, spec.Search.Generations, spec.Search.Seed = 16, 8, &seed
	spec.Grid = &pb.Grid{MinHz: 0.1, MaxHz: 250, Points: 61}
	pl, err := compileSpec(spec)
	if err != nil {
		t.Fatal(err)
	}
	return pl
}

// TestPolishedFrontCheck is the decision-space bar of the demo (issue:
// driver inputs and kerbs, done means): on a seeded job with manoeuvre
// and kerb cases, no front point is beaten in every objective by more
// than 0.1 % of the front's extent by its bump = rebound twin or by a
// ±0.03 neighbour of its ratios, as the job's own front check reports it
// (4 random neighbours a point from the check's seeded stream). The same
// search polished without the closing neighbourhood rounds (the compass
// search alone, the polish before them) leaves points beaten; with them
// none is. The job runs as the worker runs it (study.OpenRun), cut and
// resumed from a checkpoint after every generation, on 2 workers; the
// polish without the rounds runs on the optimiser directly.
func TestPolishedFrontCheck(t *testing.T) {
	t.Parallel()
	const seed = 8
	pl := smallDemo(t, seed)
	ctx := context.Background()

	s, err := optimizer.New(pl.SearchProblem(), pl.Settings(2, nil))
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Run(ctx); err != nil {
		t.Fatal(err)
	}
	p := pl.PolishSettings(2)
	if p == nil {
		t.Fatal("the demo job has no polish")
	}
	p.Neighbourhood = nil
	rep, err := s.Polish(ctx, *p)
	if err != nil {
		t.Fatal(err)
	}
	without, err := pl.CheckFront(ctx, s.Front(), &rep, 2)
	if err != nil {
		t.Fatal(err)
	}

	r, err := study.OpenRun(pl.Plan, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	for {
		done, err := r.Step(ctx, 1)
		if err != nil {
			t.Fatal(err)
		}
		if done {
			break
		}
		ck, err := r.Checkpoint()
		if err != nil {
			t.Fatal(err)
		}
		if r, err = study.OpenRun(pl.Plan, 1, ck); err != nil {
			t.Fatal(err)
		}
	}
	with := r.Check()
	for name, c := range map[string]*study.FrontCheck{"without the rounds": without, "with them": with} {
		t.Logf("%s: %d points, beaten %d by the twin and %d by a neighbour; polish improved %d (%d rounds, %d replaced, %d evaluations)",
			name, c.Points, c.BeatenByTwin, c.BeatenByNeighbour, c.Polished, c.PolishRounds, c.PolishReplaced, c.PolishEvaluations)
	}
	if without.Beaten == 0 {
		t.Errorf("without the rounds no point is beaten: the test shows nothing")
	}
	if with.Points == 0 || with.Beaten != 0 || with.PolishRounds == 0 {
		t.Errorf("with the rounds %d of %d points are beaten (%d rounds)", with.Beaten, with.Points, with.PolishRounds)
	}
}
