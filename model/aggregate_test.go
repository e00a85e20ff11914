package model

import (
	"math"
	"testing"
)

// pitchProblem is a problem with one objective, pitch, under aggregation
// a, on the demo car and cases with weights 1 and 3.
func pitchProblem(t *testing.T, a Aggregation) *Problem {
	t.Helper()
	cases := demoCases()
	cases[0].Weight, cases[1].Weight = 1, 3
	e, err := NewEvaluator(demoCar(), cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: demoSetup()}
	p, err := NewProblem(e, d, []Objective{{Kind: ObjectivePitch, Aggregation: a}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestAggregationHand checks each aggregation on per-case values and
// reference values worked by hand: weights 1 and 3, values 3 and 1,
// reference values 2 and 0.5.
//
//	mean square  sqrt((1·9 + 3·1)/4) = sqrt(3), shares 9/12, 3/12
//	worst        3, shares 1, 0
//	normalised   sqrt((1·4 + 3·0.25)/4) · sqrt((1·1.5² + 3·2²)/4)
//	             = sqrt(1.1875 · 3.5625), shares 2.25/14.25, 12/14.25
//
// Tolerance 1e-15 relative: a few roundings of numbers near 1.
func TestAggregationHand(t *testing.T) {
	t.Parallel()
	r := Result{Cases: []CaseMetrics{{PitchSD: 3}, {PitchSD: 1}}}
	for _, tc := range []struct {
		a      Aggregation
		want   float64
		shares [2]float64
	}{
		{AggregateMeanSquare, math.Sqrt(3), [2]float64{0.75, 0.25}},
		{AggregateWorst, 3, [2]float64{1, 0}},
		{AggregateNormalised, math.Sqrt(1.1875 * 3.5625), [2]float64{2.25 / 14.25, 12 / 14.25}},
	} {
		p := pitchProblem(t, tc.a)
		if tc.a == AggregateNormalised {
			p.reference = [][]float64{{2, 0.5}}
		}
		if got := p.ObjectiveValue(0, &r); math.Abs(got-tc.want) > 1e-15*tc.want {
			t.Errorf("%v = %v, want %v", tc.a, got, tc.want)
		}
		sh := p.CaseShares(0, &r)
		for c := range sh {
			if math.Abs(sh[c]-tc.shares[c]) > 1e-15 {
				t.Errorf("%v: shares %v, want %v", tc.a, sh, tc.shares)
			}
		}
	}
}

// TestNormalisedCountsRelativeChange drives two road cases that differ
// only in roughness, Gd(n0) 100 times larger on the second, with linear
// dampers (no knee), so every response of the second is 10 times the
// first's for any setup: a linear system's output variance is linear in
// the input spectral density (S_y = |H|² S_x; D. E. Newland, An
// Introduction to Random Vibrations, Spectral and Wavelet Analysis, 3rd
// ed., 1993, ch. 7). With weights 1 and 0.5 the closed forms are
//
//	mean square: share of the rough case 0.5·100/(1 + 0.5·100) = 50/51,
//	normalised:  share w_c/Σw = 1/3 and 2/3 at every setup, and the
//	             value equals the mean square's (g_c/r_c is the same on
//	             both cases).
//
// Tolerance 1e-9 relative: the two cases take the same path through the
// solver and differ by the scaling, the fixed point stops at 1e-8 in c_eq
// but c_eq does not depend on the amplitude of a linear damper.
func TestNormalisedCountsRelativeChange(t *testing.T) {
	t.Parallel()
	const tol = 1e-9
	cases := []RoadCase{
		{Name: "smooth", Speed: 40, Gd0: 1e-6, Weight: 1},
		{Name: "rough", Speed: 40, Gd0: 1e-4, Weight: 0.5},
	}
	e, err := NewEvaluator(demoCar(), cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lin := AxleDamping{BumpRatio: 0.5, ReboundRatio: 0.5, HighSpeedBump: 1, HighSpeedRebound: 1}
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Symmetric: true,
		Base: Setup{Axles: [2]AxleDamping{lin, lin}}}
	objs := func(a Aggregation) []Objective { return []Objective{{Kind: ObjectiveGrip, Aggregation: a}} }
	ms, err := NewProblem(e, d, objs(AggregateMeanSquare), nil)
	if err != nil {
		t.Fatal(err)
	}
	norm, err := NewProblem(e, d, objs(AggregateNormalised), nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range [][]float64{{0.3, 0.3}, {0.9, 0.4}, {1.5, 1.2}} {
		r := Result{Cases: make([]CaseMetrics, 2)}
		if err := e.Evaluate(d.Decode(x), &r); err != nil {
			t.Fatal(err)
		}
		near := func(what string, got, want float64) {
			if math.Abs(got-want) > tol*math.Abs(want) {
				t.Errorf("x = %v: %s = %.12g, want %.12g", x, what, got, want)
			}
		}
		near("mean-square share of the rough case", ms.CaseShares(0, &r)[1], 50.0/51)
		sh := norm.CaseShares(0, &r)
		near("normalised share of the smooth case", sh[0], 2.0/3)
		near("normalised share of the rough case", sh[1], 1.0/3)
		near("normalised grip", norm.ObjectiveValue(0, &r), ms.ObjectiveValue(0, &r))
	}
}

// TestNormalisedAtReference checks the definition's anchor: at the
// reference setup every ratio g_c/r_c is 1, so the normalised objective
// equals F_ref, the mean square of the reference (exactly, up to a few
// roundings: tolerance 1e-14 relative), and each case makes w_c/Σw.
func TestNormalisedAtReference(t *testing.T) {
	t.Parallel()
	ms, norm := pitchProblem(t, AggregateMeanSquare), pitchProblem(t, AggregateNormalised)
	ref := norm.Design().Middle()
	var r Result
	if err := norm.Evaluator().Evaluate(ref, &r); err != nil {
		t.Fatal(err)
	}
	if got, want := norm.ObjectiveValue(0, &r), ms.ObjectiveValue(0, &r); math.Abs(got-want) > 1e-14*want {
		t.Errorf("normalised at the reference %v, want the mean square %v", got, want)
	}
	if sh := norm.CaseShares(0, &r); math.Abs(sh[0]-0.25) > 1e-14 || math.Abs(sh[1]-0.75) > 1e-14 {
		t.Errorf("shares at the reference %v, want the weights' 0.25, 0.75", sh)
	}
	if m := ref.Axles[Front]; m.BumpRatio != 0.9 || m.ReboundRatio != 0.9 {
		t.Errorf("middle of ratio bounds 0.2 to 1.6 is %v, want 0.9", m)
	}
}

// TestSetReferenceRefusesBadSetup: a reference the model cannot evaluate
// is refused with the field named.
func TestSetReferenceRefusesBadSetup(t *testing.T) {
	t.Parallel()
	p := pitchProblem(t, AggregateNormalised)
	bad := p.Design().Middle()
	bad.Axles[Rear].BumpRatio = -1
	assertFields(t, p.SetReference(bad), []string{"reference_setup"})
}

// TestShortfalls checks the per-constraint report on hand-made metrics:
// a lift-off limit of 1 % against probabilities 0.5 % (case 0) and 3 %
// (case 1, rear right) is 2 percentage points over on case 1, violation
// 3/1 − 1 = 2; a jacking limit of 3 mm against shifts of −1 mm and 2 mm
// is met, 1 mm under.
func TestShortfalls(t *testing.T) {
	t.Parallel()
	cases := demoCases()
	e, err := NewEvaluator(demoCar(), cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: demoSetup()}
	p, err := NewProblem(e, d, DefaultObjectives(), []Constraint{{Kind: ConstraintLiftOff, Limit: 0.01}, {Kind: ConstraintJacking, Limit: 0.003}})
	if err != nil {
		t.Fatal(err)
	}
	r := Result{Cases: []CaseMetrics{
		{LiftOffProbability: [4]float64{0.005, 0, 0, 0}, RideHeightShift: [2]float64{-0.001, 0}},
		{LiftOffProbability: [4]float64{0, 0, 0, 0.03}, RideHeightShift: [2]float64{0, 0.002}},
	}}
	got := p.Shortfalls(&r)
	const tol = 1e-15 // a subtraction and a division of numbers near 1e-2
	if sf := got[0]; sf.Case != 1 || math.Abs(sf.Worst-0.03) > tol || math.Abs(sf.Over-0.02) > tol || math.Abs(sf.Violation-2) > 1e-13 {
		t.Errorf("lift-off shortfall %+v, want case 1, worst 0.03, over 0.02, violation 2", sf)
	}
	if sf := got[1]; sf.Case != 1 || sf.Worst != 0.002 || math.Abs(sf.Over+0.001) > tol || sf.Violation != 0 {
		t.Errorf("jacking shortfall %+v, want case 1, worst 0.002, over -0.001, violation 0", sf)
	}
	viol := make([]float64, 2)
	p.Score(&r, make([]float64, 2), viol)
	if viol[0] != got[0].Violation || viol[1] != got[1].Violation {
		t.Errorf("Score's violations %v differ from the shortfalls' %v, %v", viol, got[0].Violation, got[1].Violation)
	}
}
