package model

import (
	"math"
	"testing"
)

// refCurve is a direction's force-velocity curve written from its
// definition as a dyno table: the breakpoints (0, 0), (v_1, f_1), ... with
// f rising by c·s_(j-1)·(v_j - v_(j-1)) between knees, read by linear
// interpolation and extended with the last slope; friction adds ±F.
type refCurve struct {
	c     float64   // low-speed slope (N s/m)
	knees []float64 // knee velocities (m/s), increasing
	slope []float64 // slope above each knee over c
}

func (r refCurve) at(v float64) float64 {
	vs, fs, s := []float64{0}, []float64{0}, 1.0
	for j, k := range r.knees {
		fs = append(fs, fs[len(fs)-1]+r.c*s*(k-vs[len(vs)-1]))
		vs = append(vs, k)
		s = r.slope[j]
	}
	for j := 1; j < len(vs); j++ {
		if v <= vs[j] {
			return fs[j-1] + (fs[j]-fs[j-1])*(v-vs[j-1])/(vs[j]-vs[j-1])
		}
	}
	return fs[len(fs)-1] + r.c*s*(v-vs[len(vs)-1])
}

func (r refCurve) derivative(v float64) float64 {
	s := 1.0
	for j, k := range r.knees {
		if v > k {
			s = r.slope[j]
		}
	}
	return r.c * s
}

// refDamper is a damper of two refCurves and friction.
type refDamper struct {
	bump, rebound refCurve
	fric          float64
}

func (r refDamper) force(v float64) float64 {
	switch {
	case v > 0:
		return r.bump.at(v) + r.fric
	case v < 0:
		return -r.rebound.at(-v) - r.fric
	}
	return 0
}

func (r refDamper) slope(v float64) float64 {
	if v >= 0 {
		return r.bump.derivative(v)
	}
	return r.rebound.derivative(-v)
}

func (r refDamper) kinks() []float64 {
	k := []float64{0}
	for _, v := range r.bump.knees {
		k = append(k, v)
	}
	for _, v := range r.rebound.knees {
		k = append([]float64{-v}, k...)
	}
	return k
}

// hardwareCases are axle hardware at the damper, motion ratio 0.8 and
// low-speed slopes at the wheel of 3000 (bump) and 4500 N s/m (rebound),
// with the damper the model builds and the same damper from the
// definition, at the wheel.
var hardwareCases = []struct {
	name string
	a    AxleDamping
	ref  refDamper
}{
	{"three-stage digressive bump, two-stage progressive rebound",
		AxleDamping{KneeBump: 0.02, HighSpeedBump: 0.6, StagesBump: [MaxStages]Stage{{0.06, 0.3}, {0.15, 0.15}},
			KneeRebound: 0.05, HighSpeedRebound: 1.4, StagesRebound: [MaxStages]Stage{{0.2, 2.5}}},
		refDamper{bump: refCurve{3000, []float64{0.025, 0.075, 0.1875}, []float64{0.6, 0.3, 0.15}},
			rebound: refCurve{4500, []float64{0.0625, 0.25}, []float64{1.4, 2.5}}}},
	{"digressive then progressive, friction",
		AxleDamping{KneeBump: 0.03, HighSpeedBump: 0.4, StagesBump: [MaxStages]Stage{{0.1, 0.8}, {0.25, 1.6}, {0.4, 0.2}},
			KneeRebound: 0.03, HighSpeedRebound: 0.5, Friction: 60},
		refDamper{bump: refCurve{3000, []float64{0.0375, 0.125, 0.3125, 0.5}, []float64{0.4, 0.8, 1.6, 0.2}},
			rebound: refCurve{4500, []float64{0.0375}, []float64{0.5}}, fric: 48}},
	{"blow-off in both directions, a stage below the rebound blow-off inactive",
		// Knee at the wheel = F_bo·MR / c_wheel: 400·0.8/3000 and 900·0.8/4500.
		AxleDamping{BlowOffBump: 400, HighSpeedBump: 0.35, StagesBump: [MaxStages]Stage{{0.3, 0.1}},
			BlowOffRebound: 900, HighSpeedRebound: 0.5, StagesRebound: [MaxStages]Stage{{0.1, 0.9}, {0.3, 0.2}}},
		refDamper{bump: refCurve{3000, []float64{400 * 0.8 / 3000, 0.375}, []float64{0.35, 0.1}},
			rebound: refCurve{4500, []float64{900 * 0.8 / 4500, 0.375}, []float64{0.5, 0.2}}}},
	{"friction only, linear slopes", AxleDamping{Friction: 120},
		refDamper{bump: refCurve{c: 3000}, rebound: refCurve{c: 4500}, fric: 96}},
}

// TestMultiStageEquivalentQuadrature compares the closed forms of
// linearise.go for multi-stage curves, blow-off and friction with
// quadrature (gonum Gauss-Legendre on panels between the kinks, see
// gaussExpect) of E[f'(v)] (without friction, whose derivative is a
// delta at 0), E[f(v) v]/σ² (Roberts & Spanos 1990, ch. 5: the
// mean-square-optimal slope) and E[f(v)], for a Gaussian v at several σ;
// the force law against its definition as a dyno table (refCurve).
// Tolerance relative 1e-10 of c_b + c_r (times σ for the mean force, plus
// the friction force): the integrands are smooth on each panel, so the
// quadrature is good to about 1e-14.
func TestMultiStageEquivalentQuadrature(t *testing.T) {
	t.Parallel()
	const tol = 1e-10
	const mr = 0.8
	for _, tc := range hardwareCases {
		d := tc.a.axleDamper(3000, 4500, mr)
		ref := tc.ref
		for _, v := range []float64{-2, -0.3, -0.2, -0.06, -1e-3, 0, 1e-3, 0.03, 0.1, 0.2, 0.35, 0.6, 3} {
			if got, want := d.force(v), ref.force(v); math.Abs(got-want) > 1e-12*7500*(1+math.Abs(v))+1e-12*ref.fric {
				t.Errorf("%s: force(%g) = %.12g, definition %.12g", tc.name, v, got, want)
			}
		}
		for _, sigma := range []float64{0.01, 0.08, 0.3} {
			ceq, mean := d.Equivalent(sigma)
			scale := 7500.0 + ref.fric/sigma
			stein := gaussExpect(func(v float64) float64 { return ref.force(v) * v }, sigma, ref.kinks()) / (sigma * sigma)
			meanQ := gaussExpect(ref.force, sigma, ref.kinks())
			if math.Abs(ceq-stein) > tol*scale {
				t.Errorf("%s, σ %g: c_eq %.12g, E[f v]/σ² %.12g", tc.name, sigma, ceq, stein)
			}
			if ref.fric == 0 {
				if slope := gaussExpect(ref.slope, sigma, ref.kinks()); math.Abs(ceq-slope) > tol*scale {
					t.Errorf("%s, σ %g: c_eq %.12g, E[f'] %.12g", tc.name, sigma, ceq, slope)
				}
			}
			if math.Abs(mean-meanQ) > tol*scale*sigma {
				t.Errorf("%s, σ %g: E[f] %.12g, quadrature %.12g", tc.name, sigma, mean, meanQ)
			}
		}
	}
}

// TestCoulombFrictionClosedForm: for f = F sign(v) and a Gaussian v of
// sd σ, c_eq = F sqrt(2/π)/σ and E[f] = 0 (Roberts & Spanos 1990,
// "Random Vibration and Statistical Linearization", ch. 5, the Coulomb
// oscillator). Tolerance relative 1e-12: the closed form is evaluated
// with other roundings than the model's constant.
func TestCoulombFrictionClosedForm(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct{ f, sigma float64 }{{50, 0.05}, {200, 0.01}, {10, 1}} {
		d := wheelDamper{fric: tc.f}
		ceq, mean := d.Equivalent(tc.sigma)
		want := tc.f * math.Sqrt(2/math.Pi) / tc.sigma
		if relErr(ceq, want) > 1e-12 || mean != 0 {
			t.Errorf("F %g, σ %g: c_eq %.15g, E[f] %g; want %.15g and 0", tc.f, tc.sigma, ceq, mean, want)
		}
	}
	// A damper that does not move gets no friction slope (not +Inf).
	if ceq, _ := (&wheelDamper{cb: 10, cr: 20, fric: 50}).Equivalent(0); ceq != 15 {
		t.Errorf("σ = 0: c_eq %g, want the linear 15", ceq)
	}
}

// TestCubicDamperClosedForm: a cubic damper f = c1 v + c3 v³ under a
// Gaussian v of sd σ has c_eq = E[f'] = c1 + 3 c3 σ² (Roberts & Spanos
// 1990, ch. 5; E[v²] = σ²). The quadrature used as the reference in the
// other tests must reproduce it (tolerance 1e-10 relative: a polynomial
// times a Gaussian on 16-point panels is integrated to ~1e-14). The
// model's progressive multi-stage curve through the cubic's chords at
// knees 0.5σ, σ, ... 3σ must agree with it within the chord fit's own
// error, bounded by E[|g - f| |v|]/σ² (g the chord curve; |E[(g-f)v]| is
// at most that), computed by the same quadrature, plus 1e-9 relative.
func TestCubicDamperClosedForm(t *testing.T) {
	t.Parallel()
	const c1, c3, sigma = 2000.0, 5e4, 0.1
	want := c1 + 3*c3*sigma*sigma
	cubic := func(v float64) float64 { return c1*v + c3*v*v*v }
	if got := gaussExpect(func(v float64) float64 { return c1 + 3*c3*v*v }, sigma, nil); relErr(got, want) > 1e-10 {
		t.Fatalf("quadrature of E[f'] %.12g, closed form %.12g", got, want)
	}
	if got := gaussExpect(func(v float64) float64 { return cubic(v) * v }, sigma, nil) / (sigma * sigma); relErr(got, want) > 1e-10 {
		t.Fatalf("quadrature of E[f v]/σ² %.12g, closed form %.12g", got, want)
	}
	// Chords of the cubic through knees k_j: slope over c1 on each piece.
	knees := []float64{0.5 * sigma, sigma, 1.5 * sigma, 2 * sigma, 2.5 * sigma, 3 * sigma}
	a := AxleDamping{KneeBump: knees[0], KneeRebound: knees[0]}
	chord := func(lo, hi float64) float64 { return (cubic(hi) - cubic(lo)) / (hi - lo) / c1 }
	for j, k := range knees {
		s := chord(k, k+0.5*sigma)
		if j == len(knees)-1 {
			s = (c1 + 3*c3*k*k) / c1 // the tangent beyond the last knee
		}
		if j == 0 {
			a.HighSpeedBump, a.HighSpeedRebound = s, s
		} else {
			a.StagesBump[j-1], a.StagesRebound[j-1] = Stage{k, s}, Stage{k, s}
		}
	}
	// The low-speed slope is the first chord's.
	c0 := chord(0, knees[0]) * c1
	for j := range knees {
		if j == 0 {
			a.HighSpeedBump *= c1 / c0
			a.HighSpeedRebound *= c1 / c0
		} else {
			a.StagesBump[j-1].Factor *= c1 / c0
			a.StagesRebound[j-1].Factor *= c1 / c0
		}
	}
	if err := (&Setup{Axles: [2]AxleDamping{withRatios(a), withRatios(a)}}).Validate(); err != nil {
		t.Fatalf("chord curve refused: %v", err)
	}
	d := a.axleDamper(c0, c0, 1)
	ceq, mean := d.Equivalent(sigma)
	bound := gaussExpect(func(v float64) float64 { return math.Abs(d.force(v)-cubic(v)) * math.Abs(v) }, sigma, nil) / (sigma * sigma)
	t.Logf("cubic: closed form %.6g N s/m, chord curve %.6g (%+.2f%%), bound of the fit's error %.3g", want, ceq, 100*(ceq/want-1), bound)
	if math.Abs(ceq-want) > bound+1e-9*want {
		t.Errorf("chord curve c_eq %.8g, cubic closed form %.8g: differ by more than the fit's error %.3g", ceq, want, bound)
	}
	if math.Abs(mean) > 1e-9*want*sigma {
		t.Errorf("symmetric curve: E[f] %g, want 0", mean)
	}
}

// withRatios gives an axle plausible damping ratios for a validation.
func withRatios(a AxleDamping) AxleDamping {
	a.BumpRatio, a.ReboundRatio = 0.7, 0.7
	return a
}

// TestBadHardwareIsRefusedNamingTheField: each bad hardware input comes
// back as a problem naming its field.
func TestBadHardwareIsRefusedNamingTheField(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name  string
		a     AxleDamping
		field string
		words string
	}{
		{"stages out of order", AxleDamping{KneeBump: 0.05, StagesBump: [MaxStages]Stage{{0.2, 0.3}, {0.1, 0.2}}},
			"front.stages_bump[1].velocity_m_per_s", "out of order"},
		{"stage below the first knee", AxleDamping{KneeRebound: 0.05, StagesRebound: [MaxStages]Stage{{0.04, 0.3}}},
			"front.stages_rebound[0].velocity_m_per_s", "out of order"},
		{"gap in the stages", AxleDamping{KneeBump: 0.05, StagesBump: [MaxStages]Stage{{0.1, 0.3}, {}, {0.3, 0.2}}},
			"front.stages_bump[2]", "gap"},
		{"stage without a first knee", AxleDamping{StagesBump: [MaxStages]Stage{{0.1, 0.3}}},
			"front.stages_bump[0]", "first knee"},
		{"negative stage slope", AxleDamping{KneeBump: 0.05, StagesBump: [MaxStages]Stage{{0.1, -0.3}}},
			"front.stages_bump[0].factor", "must be in"},
		{"negative blow-off force", AxleDamping{BlowOffBump: -300}, "front.blow_off_bump_n", "must be in"},
		{"negative friction", AxleDamping{Friction: -20}, "front.friction_n", "must be in"},
		{"negative gas force", AxleDamping{GasForce: -150}, "front.gas_force_n", "must be in"},
		{"blow-off and knee together", AxleDamping{KneeRebound: 0.05, BlowOffRebound: 800}, "front.blow_off_rebound_n", "either"},
		{"NaN friction", AxleDamping{Friction: math.NaN()}, "front.friction_n", "finite"},
	}
	for _, tc := range tests {
		s := Setup{Axles: [2]AxleDamping{withRatios(tc.a), withRatios(AxleDamping{})}}
		if s.ok() {
			t.Errorf("%s: ok", tc.name)
		}
		wantProblem(t, tc.name, s.Validate(), tc.field, tc.words)
	}
	good := Setup{Axles: [2]AxleDamping{withRatios(hardwareCases[0].a), withRatios(hardwareCases[2].a)}}
	if err := good.Validate(); err != nil || !good.ok() {
		t.Errorf("good hardware refused: %v (ok %v)", err, good.ok())
	}
}

// TestGoodHardwareCheckAllocatesNothing: the hot path's check of a setup
// with hardware allocates nothing.
func TestGoodHardwareCheckAllocatesNothing(t *testing.T) {
	s := Setup{Axles: [2]AxleDamping{withRatios(hardwareCases[0].a), withRatios(hardwareCases[1].a)}}
	if n := testing.AllocsPerRun(100, func() { _ = s.ok() }); n != 0 {
		t.Errorf("Setup.ok allocates %g times", n)
	}
}

// TestEvaluateWithHardwareAllocatesNothing: the evaluation hot path stays
// allocation-free with multi-stage curves, blow-off and friction.
func TestEvaluateWithHardwareAllocatesNothing(t *testing.T) {
	e, err := NewEvaluator(demoCar(), demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	s := Setup{Axles: [2]AxleDamping{withRatios(hardwareCases[0].a), withRatios(hardwareCases[2].a)}}
	s.Axles[1].Friction = 40
	var r Result
	if err := e.Evaluate(s, &r); err != nil {
		t.Fatal(err)
	}
	if n := testing.AllocsPerRun(5, func() { _ = e.Evaluate(s, &r) }); n != 0 {
		t.Errorf("Evaluate with damper hardware allocates %g times", n)
	}
}
