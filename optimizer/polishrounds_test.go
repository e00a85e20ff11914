package optimizer

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"reflect"
	"testing"
)

// TestPolishNeighbourhoodZDT1 runs a short NSGA-II search on ZDT1 with 4
// genes (Zitzler, Deb & Thiele 2000, §4: f1 = x1, g = 1 + 9 Σ x2..xn /
// (n − 1), f2 = g (1 − √(f1/g)); its Pareto set is x2 = … = xn = 0) and
// polishes it with a budget too small to converge (2 evaluations a
// point), with and without the neighbourhood rounds on the ±0.03 box.
// A front check with 16 seeded random corners of that box per point (its
// own stream) then finds beaten points without the rounds and none with
// them: the rounds test every corner, and the check's margin (10⁻³ of the
// extent) is twice theirs. With the rounds the polish never makes a point
// worse (every point before it is dominated or kept, exact comparison),
// the rounds end before their bound, and the result is the same on 1 and
// 3 workers and after a checkpoint (version 5) and restore.
func TestPolishNeighbourhoodZDT1(t *testing.T) {
	t.Parallel()
	prob := zdt{n: 4, h: zdt1H}
	radius := []float64{0.03, 0.03, 0.03, 0.03}
	check := FrontCheck{Radius: radius, Perturbations: 16, Margin: 1e-3, Seed: 99, Workers: 2}
	polish := func(rounds bool, workers int) (*Search, PolishReport) {
		s := DefaultSettings(4)
		s.Generations, s.Seed, s.PopulationSize = 10, 3, 20
		st := mustNew(t, prob, s)
		if err := st.Run(context.Background()); err != nil {
			t.Fatal(err)
		}
		pol := DefaultPolish(3)
		pol.Budget, pol.Workers = 2, workers
		if rounds {
			pol.Neighbourhood = &Neighbourhood{Radius: radius, Margin: 5e-4, Rounds: 200}
		}
		before := st.Front()
		rep, err := st.Polish(context.Background(), pol)
		if err != nil {
			t.Fatal(err)
		}
		neverWorse(t, fmt.Sprintf("rounds %v", rounds), before, st.Front())
		return st, rep
	}
	for _, rounds := range []bool{false, true} {
		st, rep := polish(rounds, 2)
		cr, err := CheckFront(context.Background(), prob, st.Front(), check)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("rounds %v: %d points, %d rounds, %d replaced, %d evaluations; check: %d beaten", rounds, cr.Points, rep.Rounds, rep.Replaced, rep.Evaluations, cr.Beaten)
		if !rounds {
			if cr.Beaten == 0 {
				t.Errorf("without the rounds no point is beaten: the test shows nothing")
			}
			continue
		}
		if cr.Beaten != 0 || rep.Rounds == 0 || rep.Rounds >= 200 {
			t.Errorf("with the rounds: %d beaten after %d rounds", cr.Beaten, rep.Rounds)
		}
		one, rep1 := polish(true, 1)
		if !reflect.DeepEqual(one.Front(), st.Front()) || rep1 != rep {
			t.Errorf("1 worker gives another front or report: %+v, %+v", rep1, rep)
		}
		ck, err := st.Checkpoint()
		if err != nil {
			t.Fatal(err)
		}
		if v := ck[len(checkpointMagic)]; v != checkpointVersion {
			t.Errorf("checkpoint version %d, want %d", v, checkpointVersion)
		}
		s := DefaultSettings(4)
		s.Generations, s.Seed, s.PopulationSize = 10, 3, 20
		back, err := Restore(prob, s, ck)
		if err != nil {
			t.Fatal(err)
		}
		got, ok := back.Polished()
		ck2, _ := back.Checkpoint()
		if !ok || got != rep || !reflect.DeepEqual(back.Front(), st.Front()) || !bytes.Equal(ck, ck2) {
			t.Errorf("restored polish %+v (%v), want %+v; same front %v, same bytes %v", got, ok, rep, reflect.DeepEqual(back.Front(), st.Front()), bytes.Equal(ck, ck2))
		}
	}
}

// A neighbourhood that is not well formed is refused, naming the field.
func TestPolishNeighbourhoodValidate(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		nb    Neighbourhood
		field string
	}{
		{Neighbourhood{Radius: []float64{0.1}, Rounds: 1}, "Polish.Neighbourhood.Radius"},
		{Neighbourhood{Radius: []float64{0.1, -1, 0, 0}, Rounds: 1}, "Polish.Neighbourhood.Radius[1]"},
		{Neighbourhood{Radius: make([]float64, 4), Margin: -1, Rounds: 1}, "Polish.Neighbourhood.Margin"},
		{Neighbourhood{Radius: make([]float64, 4)}, "Polish.Neighbourhood.Rounds"},
	} {
		p := DefaultPolish(1)
		p.Neighbourhood = &tc.nb
		err := p.validate(4)
		if fe, ok := err.(*FieldError); !ok || fe.Field != tc.field {
			t.Errorf("%+v: error %v, want one at %s", tc.nb, err, tc.field)
		}
	}
}

// narrowCone is a linear problem constructed here (no published source):
// genes u, v in [0, 1] and
//
//	f1 = -u + 3v,  f2 = -u - 3v.
//
// From a point x, a move d lowers both objectives only when d_u > 3|d_v|:
// a cone of half-angle atan(1/3) about the u axis, which holds no corner
// of a square box around x (every corner has |d_v| = |d_u|).
type narrowCone struct{}

func (narrowCone) Bounds() []Bound     { return []Bound{{0, 1}, {0, 1}} }
func (narrowCone) NumObjectives() int  { return 2 }
func (narrowCone) NumConstraints() int { return 0 }
func (narrowCone) Evaluate(x, obj, _ []float64) error {
	obj[0] = -x[0] + 3*x[1]
	obj[1] = -x[0] - 3*x[1]
	return nil
}

// TestLinearModelStep: on narrowCone no corner of the ±0.03 box beats the
// point (0.5, 0.5), and the model step after them finds the move the
// linear programme gives by hand: maximise t subject to -d_u + 3 d_v +
// t m ≤ 0, -d_u - 3 d_v + t m ≤ 0, |d| ≤ 0.03, whose optimum is d_v = 0,
// d_u = 0.03 (adding the two rows, 2 t m ≤ 2 d_u ≤ 0.06), lowering both
// objectives by 0.03. The least-squares model of a linear function from
// the corners is exact up to rounding, so the step is checked to 1e-12.
// Near the bound u = 1 the box is clipped and the step stops at it.
func TestLinearModelStep(t *testing.T) {
	t.Parallel()
	prob := narrowCone{}
	shape, err := readProblem(prob)
	if err != nil {
		t.Fatal(err)
	}
	radius := []float64{0.03, 0.03}
	margin := []float64{0.001, 0.001}
	for _, tc := range []struct{ u, wantU float64 }{{0.5, 0.53}, {0.99, 1}} {
		x := evaluateAt(prob, shape, []float64{tc.u, 0.5})
		// The corners alone (no model step) beat nothing.
		var corners []Solution
		for c := range 4 {
			y := []float64{min(1, x.Genes[0]+radius[0]*float64(1-2*(c&1))), x.Genes[1] + radius[1]*float64(1-2*(c>>1&1))}
			s := evaluateAt(prob, shape, y)
			if beats(s.Objectives, x.Objectives, margin) {
				t.Fatalf("u = %g: corner %v beats the point: the problem shows nothing", tc.u, y)
			}
			corners = append(corners, s)
		}
		got, evals := scanNeighbourhood(context.Background(), prob, shape, &x, radius, margin, nil)
		if got == nil {
			t.Fatalf("u = %g: the model step found no beater (%d evaluations)", tc.u, evals)
		}
		if math.Abs(got.Genes[0]-tc.wantU) > 1e-12 || math.Abs(got.Genes[1]-0.5) > 1e-12 {
			t.Errorf("u = %g: step to %v, want (%g, 0.5) from the programme worked by hand", tc.u, got.Genes, tc.wantU)
		}
		if y, ok := linearModelStep(&x, corners[:2], []int{0, 1}, radius, shape.bounds, margin); ok {
			t.Errorf("u = %g: a model fitted to 2 points for 2 genes proposed %v", tc.u, y)
		}
	}
}

// BenchmarkLinearModelStep times the model step alone (the least-squares
// fit and the linear programme) for four genes and three objectives from
// the 16 corners of a box, the shape of the demo job's rounds.
func BenchmarkLinearModelStep(b *testing.B) {
	x := &Solution{Genes: []float64{0.5, 0.5, 0.5, 0.5}, Objectives: []float64{0, 0, 0}}
	grad := [3][4]float64{{-1, 3, 0.5, -0.2}, {-1, -3, 0.1, 0.4}, {-0.5, 0.2, -2, 1}}
	var seen []Solution
	for c := range 16 {
		s := Solution{Genes: make([]float64, 4), Objectives: make([]float64, 3)}
		for i := range 4 {
			s.Genes[i] = 0.5 + 0.03*float64(1-2*(c>>i&1))
		}
		for m := range 3 {
			for i := range 4 {
				s.Objectives[m] += grad[m][i] * (s.Genes[i] - 0.5)
			}
		}
		seen = append(seen, s)
	}
	radius := []float64{0.03, 0.03, 0.03, 0.03}
	bounds := []Bound{{0, 1}, {0, 1}, {0, 1}, {0, 1}}
	margin := []float64{1e-4, 1e-4, 1e-4}
	moved := []int{0, 1, 2, 3}
	if _, ok := linearModelStep(x, seen, moved, radius, bounds, margin); !ok {
		b.Fatal("the model promises no step: the benchmark would time the early exit")
	}
	b.ReportAllocs()
	for b.Loop() {
		linearModelStep(x, seen, moved, radius, bounds, margin)
	}
}
