package optimizer

import (
	"context"
	"fmt"
	"slices"
	"testing"
)

// valley is a hand-made problem with no published source: four genes in
// [0, 1] as two pairs (x0, x1) and (x2, x3), like the bump and rebound
// ratios of two axles, and two objectives
//
//	f_1 = (s_a − 1)² + (s_b − 1)² − c (d_a + d_b / 2)
//	f_2 = (s_a − 1)² + (s_b − 1)² − c (d_a / 2 + d_b)
//	s_a = x0 + x1, d_a = x0 − x1, s_b = x2 + x3, d_b = x2 − x3.
//
// Along d (the sums kept) both objectives fall; a move of one gene by δ
// changes a sum by δ too and raises the worse objective by δ² − cδ/2,
// which is positive for δ > c/2. With c below twice the polish's
// smallest step, no compass poll point improves on x = (½, ½, ½, ½): the
// improvement lies along a narrow diagonal valley that only a move of two
// genes at once reaches.
type valley struct{ c float64 }

func (valley) Bounds() []Bound     { return []Bound{{0, 1}, {0, 1}, {0, 1}, {0, 1}} }
func (valley) NumObjectives() int  { return 2 }
func (valley) NumConstraints() int { return 0 }
func (v valley) Evaluate(x, obj, _ []float64) error {
	sa, da, sb, db := x[0]+x[1], x[0]-x[1], x[2]+x[3], x[2]-x[3]
	wall := (sa-1)*(sa-1) + (sb-1)*(sb-1)
	obj[0] = wall - v.c*(da+db/2)
	obj[1] = wall - v.c*(da/2+db)
	return nil
}

// TestPolishDiagonalValley polishes the single point (½, ½, ½, ½) of
// valley: the compass search alone (Descent unset) cannot move it, the
// default polish, with its descent step, finds points that dominate it.
func TestPolishDiagonalValley(t *testing.T) {
	t.Parallel()
	prob := valley{c: 1e-3} // c/2 = 5e-4, half DefaultPolish's MinStep
	shape, err := readProblem(prob)
	if err != nil {
		t.Fatal(err)
	}
	start := &Solution{Genes: []float64{0.5, 0.5, 0.5, 0.5}, Objectives: make([]float64, 2), Feasible: true}
	if err := prob.Evaluate(start.Genes, start.Objectives, nil); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name    string
		descent bool
		moves   bool
	}{{"compass", false, false}, {"compass+descent", true, true}} {
		for _, seed := range []uint64{1, 2, 3} {
			pol := DefaultPolish(seed)
			pol.Budget, pol.Descent = 40, tc.descent
			found, evals, err := polishPoints(context.Background(), prob, shape, []*Solution{start}, asfWeights([]*Solution{start}, shape.nObj), pol, 0)
			if err != nil {
				t.Fatal(err)
			}
			if moved := len(found) == 1; moved != tc.moves {
				t.Fatalf("%s seed %d: moved %v, want %v (found %v)", tc.name, seed, moved, tc.moves, found)
			}
			if len(found) == 0 {
				continue
			}
			f := found[0]
			t.Logf("%s seed %d: %d evaluations, x %.4f, f %.3e", tc.name, seed, evals, f.Genes, f.Objectives)
			// Exact comparison: the found point must dominate the start
			// (Dominates is strict in one objective, no tolerance needed).
			if !Dominates(f.Objectives, start.Objectives) {
				t.Errorf("%s seed %d: end point %v does not dominate the start %v", tc.name, seed, f.Objectives, start.Objectives)
			}
		}
	}
}

// TestPolishZDT1Descent polishes a short NSGA-II run on ZDT1 (Zitzler,
// Deb & Thiele 2000, §4; 30 genes) with a budget large enough for failed
// poll rounds and so for descent steps (a round polls 60 points), and
// checks that the polish never makes a point worse: every point of the
// archive before it is dominated or equalled after it (exact comparison;
// the archive keeps points, it does not round them).
func TestPolishZDT1Descent(t *testing.T) {
	t.Parallel()
	for _, descent := range []bool{false, true} {
		st := runZDT(t, zdt{n: 30, h: zdt1H}, 40, 1)
		before := st.Front()
		pol := DefaultPolish(1)
		pol.Budget, pol.Descent, pol.Workers = 400, descent, 2
		rep, err := st.Polish(context.Background(), pol)
		if err != nil {
			t.Fatal(err)
		}
		after := st.Front()
		neverWorse(t, fmt.Sprintf("descent %v", descent), before, after)
		ref := analyticFront(zdt1H, 2001)
		t.Logf("descent %v: %d points, %d evaluations, %d improved; igd %.3e -> %.3e; hypervolume %.5f",
			descent, rep.Points, rep.Evaluations, rep.Improved, igd(before, ref), igd(after, ref), rep.Hypervolume)
	}
}

// neverWorse fails the test for every point of before that is neither
// kept nor dominated in after (exact comparison: the archive keeps
// points, it does not round them).
func neverWorse(t *testing.T, label string, before, after []Solution) {
	t.Helper()
	for i, x := range before {
		if !slices.ContainsFunc(after, func(y Solution) bool {
			return Dominates(y.Objectives, x.Objectives) || slices.Equal(y.Objectives, x.Objectives)
		}) {
			t.Errorf("%s: point %d %v is neither kept nor dominated after the polish", label, i, x.Objectives)
		}
	}
}
