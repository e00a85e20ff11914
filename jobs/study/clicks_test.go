package study

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"dampfront/model"
)

// clickSpec is testSpec with nine-click low-speed adjusters from 1.2 to
// 0.4 in both directions on both axles, snapping on.
func clickSpec() *Spec {
	s := testSpec()
	for ax := range s.Adjusters.Axles {
		s.Adjusters.Axles[ax].LowBump = model.Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4}
		s.Adjusters.Axles[ax].LowRebound = model.Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4}
	}
	s.Design.SnapToClicks = true
	return s
}

// TestSnappedSolutionsReportClicks: with snapping, a solution's setup
// lies on its clicks (click step (1.2 - 0.4)/8 = 0.1, worked by hand),
// the clicks are reported per corner, and the objectives are those of
// the snapped setup.
func TestSnappedSolutionsReportClicks(t *testing.T) {
	t.Parallel()
	pl, err := Compile(context.Background(), clickSpec())
	if err != nil {
		t.Fatal(err)
	}
	genes := []float64{0.87, 0.41, 0.66, 1.04}
	s := pl.Problem().Design().Decode(genes)
	sol := pl.Evaluate(s)
	adj, err := pl.Spec().Adjusting(s)
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{0.9, 0.4, 0.7, 1.0} {
		got := [4]float64{s.Axles[0].BumpRatio, s.Axles[0].ReboundRatio, s.Axles[1].BumpRatio, s.Axles[1].ReboundRatio}[i]
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("ratio %d: %g, want the click's %g", i, got, want)
		}
	}
	wantClicks := [2][2]int{{3, 8}, {5, 2}}
	if len(adj.Clicks) != 4 {
		t.Fatalf("clicks %v, want one per corner", adj.Clicks)
	}
	for i, c := range adj.Clicks {
		if c.LowBump != wantClicks[i/2][0] || c.LowRebound != wantClicks[i/2][1] || c.HighBump != -1 || c.HighRebound != -1 {
			t.Errorf("corner %d clicks %+v, want LS %v and no HS", i, c, wantClicks[i/2])
		}
	}
	obj := make([]float64, pl.Problem().NumObjectives())
	viol := make([]float64, pl.Problem().NumConstraints())
	if err := pl.Problem().EvaluateGenes(genes, obj, viol); err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(obj, sol.Objectives) {
		t.Errorf("the search's objectives %v are not the snapped setup's %v", obj, sol.Objectives)
	}
	if adj.OutOfBand != nil {
		t.Errorf("a snapped setup is out of band: %v", adj.OutOfBand)
	}
}

// TestOutOfBandSolutionIsFlagged: a setup stiffer than the stiffest click
// is reported with its excess and warned about; with the adjustment band
// alone (no adjusters) the same.
func TestOutOfBandSolutionIsFlagged(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		spec func() *Spec
	}{
		{"adjusters", func() *Spec { s := clickSpec(); s.Design.SnapToClicks = false; return s }},
		{"adjustment band", func() *Spec {
			s := testSpec()
			s.Adjustment = model.Adjustment{BumpSoftest: 0.4, BumpStiffest: 1.2, ReboundSoftest: 0.4, ReboundStiffest: 1.2}
			return s
		}},
	} {
		pl, err := Compile(context.Background(), tc.spec())
		if err != nil {
			t.Fatal(err)
		}
		sol, err := pl.Spec().Adjusting(pl.Problem().Design().Decode([]float64{1.5, 0.8, 0.8, 0.8}))
		if err != nil {
			t.Fatal(err)
		}
		if len(sol.OutOfBand) != 2 || sol.OutOfBand[0].Corner != model.FL || sol.OutOfBand[0].Rebound || !sol.OutOfBand[0].Above {
			t.Errorf("%s: out of band %v, want front bump above the stiffest on both sides", tc.name, sol.OutOfBand)
		}
		n := 0
		for _, w := range sol.Warnings() {
			if strings.HasPrefix(w, "outside the adjuster range: FL bump") || strings.HasPrefix(w, "outside the adjuster range: FR bump") {
				n++
			}
		}
		if n != 2 {
			t.Errorf("%s: warnings %q, want both front corners", tc.name, sol.Warnings())
		}
	}
}

// TestSnapNeedsAdjusters: snapping without adjusters is refused at its path.
func TestSnapNeedsAdjusters(t *testing.T) {
	t.Parallel()
	s := testSpec()
	s.Design.SnapToClicks = true
	_, err := Check(s)
	if got := problemPaths(t, err); !slices.Equal(got, []string{"design_space.snap_to_clicks"}) {
		t.Errorf("paths %v", got)
	}
}
