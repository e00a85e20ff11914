package model

import (
	"math"
	"testing"
)

// The degeneracy the platform objective exists for. Under statistical
// linearisation with equal knees and high-speed factors in bump and
// rebound, c_eq = (c_b + c_r)(1/2 - (1 - r) Q(u)) depends on the sum of
// the slopes only (Caughey 1963; the closed form in linearise.go), so every
// RMS metric is the same for two splits of the same sum, and only the mean
// damper force, hence the ride-height shift, tells them apart.
func TestSameSumSplitsDifferOnlyInPlatform(t *testing.T) {
	t.Parallel()
	// relTol: the two evaluations solve the same linear system up to the
	// rounding of c_b + c_r and of the fixed point (tolerance 1e-12).
	const relTol = 1e-9
	e, err := NewEvaluator(demoCar(), demoCases(), EvaluatorOptions{Tolerance: 1e-12})
	if err != nil {
		t.Fatal(err)
	}
	mk := func(b, r float64) Setup {
		s := demoSetup()
		for ax := range s.Axles {
			s.Axles[ax].BumpRatio, s.Axles[ax].ReboundRatio = b, r
			s.Axles[ax].KneeBump, s.Axles[ax].KneeRebound = 0.05, 0.05
			s.Axles[ax].HighSpeedBump, s.Axles[ax].HighSpeedRebound = 0.5, 0.5
		}
		return s
	}
	var ra, rb Result
	if err := e.Evaluate(mk(0.4, 1.0), &ra); err != nil {
		t.Fatal(err)
	}
	if twin := mk(0.4, 1.0).SameSumTwin(); twin != mk(0.7, 0.7) {
		t.Fatalf("the same-sum twin of 0.4/1.0 is %+v, want 0.7/0.7 on both axles", twin.Axles)
	}
	if err := e.Evaluate(mk(0.4, 1.0).SameSumTwin(), &rb); err != nil {
		t.Fatal(err)
	}
	study, err := NewProblem(e, DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}}, DefaultObjectives(), nil)
	if err != nil {
		t.Fatal(err)
	}
	for c := range ra.Cases {
		a, b := &ra.Cases[c], &rb.Cases[c]
		pairs := map[string][2]float64{
			"tyre load FL":  {a.TyreLoadSD[FL], b.TyreLoadSD[FL]},
			"tyre load RR":  {a.TyreLoadSD[RR], b.TyreLoadSD[RR]},
			"ride front":    {a.RideHeightSD[Front], b.RideHeightSD[Front]},
			"ride rear":     {a.RideHeightSD[Rear], b.RideHeightSD[Rear]},
			"pitch":         {a.PitchSD, b.PitchSD},
			"roll":          {a.RollSD, b.RollSD},
			"damper vel FL": {a.DamperVelocitySD[FL], b.DamperVelocitySD[FL]},
		}
		for name, p := range pairs {
			if math.Abs(p[0]-p[1]) > relTol*math.Abs(p[1]) {
				t.Errorf("case %d %s: %g vs %g, want equal (same c_eq)", c, name, p[0], p[1])
			}
		}
		if b.RideHeightShift[Front] != 0 && math.Abs(b.RideHeightShift[Front]) > 1e-12 {
			t.Errorf("case %d: equal bump and rebound must not jack, got %g m", c, b.RideHeightShift[Front])
		}
		if !(a.RideHeightShift[Front] < -1e-5) {
			t.Errorf("case %d: rebound-heavy split must pull the car down, got %g m", c, a.RideHeightShift[Front])
		}
	}
	pa, pb := study.ObjectiveValue(1, &ra), study.ObjectiveValue(1, &rb)
	ga, gb := study.ObjectiveValue(0, &ra), study.ObjectiveValue(0, &rb)
	if math.Abs(ga-gb) > relTol*gb {
		t.Errorf("grip %g vs %g, want equal", ga, gb)
	}
	if !(pa > pb*(1+1e-3)) {
		t.Errorf("platform of the jacking split %g must exceed the balanced one's %g", pa, pb)
	}
}

func TestStudyConstraintsAndValidation(t *testing.T) {
	t.Parallel()
	e, err := NewEvaluator(demoCar(), demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: demoSetup()}
	// A travel limit of 0.1 mm is certainly violated (travel sd is about
	// 1 mm on these cases); a jacking limit of 0.1 m (the largest
	// plausible) certainly holds.
	s, err := NewProblem(e, d, DefaultObjectives(), []Constraint{{Kind: ConstraintTravel, Limit: 1e-4}, {Kind: ConstraintJacking, Limit: 0.1}})
	if err != nil {
		t.Fatal(err)
	}
	obj, viol := make([]float64, 2), make([]float64, 2)
	if err := s.EvaluateGenes([]float64{0.6, 0.9, 0.6, 0.9}, obj, viol); err != nil {
		t.Fatal(err)
	}
	if !(viol[0] > 1) || viol[1] != 0 {
		t.Errorf("violations %v, want [>1, 0]", viol)
	}
	_, err = NewProblem(e, DesignSpace{Ratios: [4]Range{{-1, 1}, {0.2, 0.1}, {0.2, 1}, {0.2, 1}}},
		[]Objective{{Kind: 99}, {Kind: ObjectiveGrip}, {Kind: ObjectiveGrip}, {Kind: ObjectivePitch}},
		[]Constraint{{Kind: ConstraintLiftOff, Limit: 0}})
	want := []string{"design.ratios.front_bump.min", "design.ratios.front_rebound.max", "objectives",
		"objectives[0].kind", "objectives[2].kind", "constraints[0].limit"}
	assertFields(t, err, want)
}

// assertFields checks that err is a *ValidationError naming every field in want.
func assertFields(t *testing.T, err error, want []string) {
	t.Helper()
	ve, ok := err.(*ValidationError)
	if !ok {
		t.Fatalf("error %v (%T), want *ValidationError", err, err)
	}
	got := map[string]bool{}
	for _, p := range ve.Problems {
		got[p.Field] = true
	}
	for _, f := range want {
		if !got[f] {
			t.Errorf("no problem reported for %s; got %v", f, ve)
		}
	}
}

func TestDesignSpaceRoundTrip(t *testing.T) {
	t.Parallel()
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.3, 1.5}, {0.2, 1.6}, {0.3, 1.5}},
		Knee: [2]*Range{{0.02, 0.1}, nil}, HighSpeed: [2]*Range{nil, {0.3, 1}}, Base: demoSetup()}
	x := []float64{0.5, 0.8, 0.6, 0.9, 0.04, 0.7}
	if g := d.Genes(); len(g) != len(x) || g[4].Name != "front_knee_m_per_s" || g[5].Name != "rear_high_speed" {
		t.Fatalf("genes %+v", g)
	}
	s := d.Decode(x)
	if s.Axles[Front].KneeRebound != 0.04 || s.Axles[Rear].HighSpeedBump != 0.7 || s.Axles[Rear].KneeBump != demoSetup().Axles[Rear].KneeBump {
		t.Errorf("decoded %+v", s)
	}
	y := d.Encode(s)
	for i := range x {
		if x[i] != y[i] {
			t.Errorf("gene %d: %v -> %v", i, x[i], y[i])
		}
	}
	sym := DesignSpace{Symmetric: true, Ratios: d.Ratios, Base: demoSetup()}
	s = sym.Decode([]float64{0.5, 0.7})
	if s.Axles[Front].BumpRatio != 0.5 || s.Axles[Front].ReboundRatio != 0.5 || s.Axles[Rear].ReboundRatio != 0.7 {
		t.Errorf("symmetric decode %+v", s)
	}
}
