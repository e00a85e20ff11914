package optimizer

import (
	"bytes"
	"context"
	"fmt"
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
