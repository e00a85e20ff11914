package model

import (
	"math"
	"strings"
	"testing"
)

// transientProblem is the demo car (with load paths) on one road case,
// a braking and a turn-in manoeuvre and a kerb, with the three transient
// objectives.
func transientProblem(t testing.TB) *Problem {
	t.Helper()
	v := demoCar()
	v.LoadPaths = LoadPaths{CGHeight: 0.45, RollCentreHeight: [2]float64{0.05, 0.08}, UnsprungCGHeight: [2]float64{0.33, 0.34}}
	e, err := NewEvaluator(v, demoCases()[:1], EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ms := []Manoeuvre{
		{Name: "brake", Shape: ShapeBrake, Speed: 55, Longitudinal: 1.8 * Gravity, Start: 0.1, Ramp: 0.15},
		{Name: "turn", Shape: ShapeTurnIn, Speed: 45, Lateral: 1.6 * Gravity, Start: 0.1, Ramp: 0.3, Weight: 2},
	}
	ks := []Kerb{{Name: "kerb", Shape: KerbTrapezoid, Side: KerbLeft, Height: 0.03, Length: 1.5, Speed: 40}}
	if err := e.SetTransientCases(ms, ks, TransientOptions{}); err != nil {
		t.Fatal(err)
	}
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: demoSetup()}
	p, err := NewProblem(e, d, []Objective{{Kind: ObjectiveDriverResponse}, {Kind: ObjectiveTransientBalance}, {Kind: ObjectiveKerbLoadLoss}},
		[]Constraint{{Kind: ConstraintUnloadedTime, Limit: 0.05}})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// Superposition (a law of linear systems): with bump = rebound, no knee,
// no stops and no lift-off, releasing the brake from −A is the braking
// step to −A mirrored, so the driver response (normalised by the change)
// is the same to rounding (1e-9 relative: the two runs differ only in
// the order of floating-point sums). With rebound ≠ bump the mirror
// breaks (braking works the front in bump, release in rebound), and the
// driver response tells the front split apart (> 1 %).
func TestDriverResponseSeesTheSplit(t *testing.T) {
	t.Parallel()
	v := transientCar()
	response := func(d *[nDamp]wheelDamper, shape ManoeuvreShape) float64 {
		man := &Manoeuvre{Name: "m", Shape: shape, Speed: 40, Longitudinal: 0.8 * Gravity, Start: 0.1, Ramp: 0.1, Duration: 2.5}
		c := prepare(t, &v, man, nil, TransientOptions{MaxRatio: 2}, d)
		var m TransientMetrics
		if err := c.evaluate(d, &m); err != nil {
			t.Fatal(err)
		}
		return m.Response
	}
	lin := linearDampers(&v, 0.5)
	a, b := response(&lin, ShapeBrake), response(&lin, ShapeBrakeRelease)
	if relErr(a, b) > 1e-9 {
		t.Errorf("linear dampers: braking %v and release %v differ", a, b)
	}
	split := lin
	split[FL].cr *= 2 // front rebound twice bump, rear as it was
	split[FR].cr *= 2
	a, b = response(&split, ShapeBrake), response(&split, ShapeBrakeRelease)
	if relErr(a, b) < 0.01 {
		t.Errorf("front rebound twice bump: braking %v and release %v do not differ", a, b)
	}
}

// The transient objectives are finite and positive, a warm evaluation
// allocates nothing, and an objective with no case to read is refused.
func TestTransientObjectives(t *testing.T) { // not parallel: AllocsPerRun
	p := transientProblem(t)
	x := p.Design().Encode(demoSetup())
	obj, viol := make([]float64, 3), make([]float64, 1)
	if err := p.EvaluateGenes(x, obj, viol); err != nil {
		t.Fatal(err)
	}
	for j, v := range obj {
		if !(v > 0) || math.IsInf(v, 0) {
			t.Errorf("objective %s = %v", p.Objectives()[j].Kind, v)
		}
	}
	allocs := testing.AllocsPerRun(3, func() {
		if err := p.EvaluateGenes(x, obj, viol); err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 0 {
		t.Errorf("%v allocations per evaluation", allocs)
	}
	e, err := NewEvaluator(demoCar(), demoCases()[:1], EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: demoSetup()}
	_, err = NewProblem(e, d, []Objective{{Kind: ObjectiveGrip}, {Kind: ObjectiveKerbLoadLoss}}, nil)
	if err == nil || !strings.Contains(err.Error(), "objectives[1].kind") {
		t.Errorf("kerb objective without kerbs: %v", err)
	}
}
