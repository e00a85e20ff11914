package model

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
)

// Statistical linearisation of the piecewise-linear damper (Caughey,
// "Equivalent linearization techniques", J. Acoust. Soc. Am. 35(11), 1963,
// 1706-1711; Roberts & Spanos, "Random Vibration and Statistical
// Linearization", Wiley 1990, ch. 5): for a zero-mean Gaussian velocity v
// of standard deviation σ the equivalent slope is c_eq = E[f(v) v]/σ² =
// E[f'(v)] and the mean force E[f(v)]. The tests integrate these
// expectations numerically, and by Monte Carlo, for a force law written
// here from its definition (setup.go's doc comment): slope c up to the
// knee, factor·c above it, per direction.

// refDamperForce is the piecewise-linear damper at the wheel, bump v > 0.
func refDamperForce(d wheelDamper, v float64) float64 {
	branch := func(speed, c, knee, r float64) float64 {
		if knee <= 0 || speed <= knee {
			return c * speed
		}
		return c*knee + r*c*(speed-knee)
	}
	if v >= 0 {
		return branch(v, d.cb, d.vb, d.rb)
	}
	return -branch(-v, d.cr, d.vr, d.rr)
}

// refDamperSlope is df/dv (away from the kinks).
func refDamperSlope(d wheelDamper, v float64) float64 {
	if v >= 0 {
		if d.vb > 0 && v > d.vb {
			return d.rb * d.cb
		}
		return d.cb
	}
	if d.vr > 0 && -v > d.vr {
		return d.rr * d.cr
	}
	return d.cr
}

// gaussExpect returns E[g(v)] for v ~ N(0, σ²) by Gauss-Legendre
// quadrature (gonum) on panels between the kinks at −v_r, 0, v_b, over
// ±14σ (the density beyond is below 1e-42 of its peak).
func gaussExpect(g func(float64) float64, sigma float64, kinks []float64) float64 {
	lim := 14 * sigma
	pts := []float64{-lim}
	for _, k := range kinks {
		if k > -lim && k < lim {
			pts = append(pts, k)
		}
	}
	pts = append(pts, lim)
	f := func(v float64) float64 {
		return g(v) * math.Exp(-0.5*v*v/(sigma*sigma)) / (sigma * math.Sqrt(2*math.Pi))
	}
	sum := 0.0
	for i := 0; i+1 < len(pts); i++ {
		if pts[i+1] <= pts[i] {
			continue
		}
		const panels = 16
		for p := 0; p < panels; p++ {
			lo := pts[i] + (pts[i+1]-pts[i])*float64(p)/panels
			hi := pts[i] + (pts[i+1]-pts[i])*float64(p+1)/panels
			sum += quad.Fixed(f, lo, hi, 20, quad.Legendre{}, 0)
		}
	}
	return sum
}

// lineariseCases are dampers at the wheel (N s/m, m/s) against a velocity
// sd of 0.1 m/s: knees from far below to far above σ, digressive and
// progressive high-speed slopes, bump ≠ rebound.
var lineariseCases = []struct {
	name string
	d    wheelDamper
}{
	{"linear, rebound-heavy", wheelDamper{cb: 2000, cr: 3500, rb: 1, rr: 1}},
	{"knees at 0.5σ, digressive", wheelDamper{cb: 2500, cr: 4000, vb: 0.05, vr: 0.05, rb: 0.4, rr: 0.4}},
	{"knees at 2σ, bump digressive, rebound progressive", wheelDamper{cb: 3000, cr: 3000, vb: 0.2, vr: 0.2, rb: 0.3, rr: 1.5}},
	{"knees at 0.1σ and 0.3σ", wheelDamper{cb: 5000, cr: 6000, vb: 0.01, vr: 0.03, rb: 0.25, rr: 0.5}},
	{"rebound knee only", wheelDamper{cb: 1800, cr: 4200, vr: 0.07, rb: 1, rr: 0.35}},
	{"knee far above σ", wheelDamper{cb: 2200, cr: 2900, vb: 1.5, vr: 2, rb: 0.4, rr: 0.4}},
	{"bump-heavy, flat high-speed", wheelDamper{cb: 4000, cr: 2500, vb: 0.08, vr: 0.12, rb: 0.05, rr: 0.6}},
}

// TestEquivalentDampingQuadrature compares the closed forms of
// wheelDamper.Equivalent with quadrature of E[f'(v)], E[f(v) v]/σ² and
// E[f(v)] (Caughey 1963; Roberts & Spanos 1990, ch. 5). Tolerance relative
// 1e-10 of c_b + c_r (and of (c_b + c_r)·σ for the mean force): the
// integrands are smooth on each panel, so the quadrature is good to
// about 1e-14.
func TestEquivalentDampingQuadrature(t *testing.T) {
	t.Parallel()
	const tol = 1e-10
	const sigma = 0.1
	for _, tc := range lineariseCases {
		d := tc.d
		kinks := []float64{0}
		if d.vb > 0 {
			kinks = append(kinks, d.vb)
		}
		if d.vr > 0 {
			kinks = append([]float64{-d.vr}, kinks...)
		}
		// The model's force law is the one defined.
		for _, v := range []float64{-3, -0.2, -0.05, -1e-3, 0, 1e-3, 0.02, 0.1, 0.5, 4} {
			if got, want := d.force(v), refDamperForce(d, v); math.Abs(got-want) > 1e-12*(d.cb+d.cr)*(1+math.Abs(v)) {
				t.Errorf("%s: force(%g) = %g, definition %g", tc.name, v, got, want)
			}
		}
		ceq, mean := d.Equivalent(sigma)
		scale := d.cb + d.cr
		slope := gaussExpect(func(v float64) float64 { return refDamperSlope(d, v) }, sigma, kinks)
		stein := gaussExpect(func(v float64) float64 { return refDamperForce(d, v) * v }, sigma, kinks) / (sigma * sigma)
		meanQ := gaussExpect(func(v float64) float64 { return refDamperForce(d, v) }, sigma, kinks)
		if math.Abs(ceq-slope) > tol*scale {
			t.Errorf("%s: c_eq %.12g, E[f'] %.12g", tc.name, ceq, slope)
		}
		if math.Abs(ceq-stein) > tol*scale {
			t.Errorf("%s: c_eq %.12g, E[f v]/σ² %.12g", tc.name, ceq, stein)
		}
		if math.Abs(mean-meanQ) > tol*scale*sigma {
			t.Errorf("%s: E[f] %.12g, quadrature %.12g", tc.name, mean, meanQ)
		}
	}
}

// TestEquivalentDampingMonteCarlo compares the same closed forms with a
// seeded Monte Carlo sample of 400 000 Gaussian velocities. Tolerance 5
// standard errors of each sample mean (estimated from the sample): a
// correct formula fails for fewer than 1 seed in 10⁶, and the seed is
// fixed, so the test is deterministic.
func TestEquivalentDampingMonteCarlo(t *testing.T) {
	t.Parallel()
	const n = 400000
	const sigma = 0.1
	for ci, tc := range lineariseCases {
		d := tc.d
		rng := rand.New(rand.NewPCG(2024, uint64(ci)))
		var sSlope, sSlope2, sStein, sStein2, sF, sF2 float64
		for k := 0; k < n; k++ {
			v := sigma * rng.NormFloat64()
			a := refDamperSlope(d, v)
			b := refDamperForce(d, v) * v / (sigma * sigma)
			f := refDamperForce(d, v)
			sSlope += a
			sSlope2 += a * a
			sStein += b
			sStein2 += b * b
			sF += f
			sF2 += f * f
		}
		ceq, mean := d.Equivalent(sigma)
		for _, chk := range []struct {
			name    string
			sum, sq float64
			formula float64
		}{
			{"E[f']", sSlope, sSlope2, ceq},
			{"E[f v]/σ²", sStein, sStein2, ceq},
			{"E[f]", sF, sF2, mean},
		} {
			m := chk.sum / n
			se := math.Sqrt((chk.sq/n - m*m) / n)
			if math.Abs(m-chk.formula) > 5*se+1e-12*math.Abs(m) {
				t.Errorf("%s: %s sample %.8g ± %.2g, closed form %.8g (%.1f standard errors)",
					tc.name, chk.name, m, se, chk.formula, math.Abs(m-chk.formula)/se)
			}
		}
	}
}

// TestEquivalentDampingLimits checks limits that follow from the
// definitions: a linear damper's c_eq is (c_b + c_r)/2 and its mean
// force σ (c_b − c_r)/sqrt(2π) at every σ (E[v; v > 0] = σ/sqrt(2π));
// with the knee far above σ the damper acts linear; far below, as a
// linear damper of slopes r·c. Tolerance relative 1e-12 where exact,
// 1e-6 for the asymptotic limits (u = v_k/σ = 20 or 1e-7).
func TestEquivalentDampingLimits(t *testing.T) {
	t.Parallel()
	lin := wheelDamper{cb: 2000, cr: 3000, rb: 1, rr: 1}
	for _, s := range []float64{1e-4, 0.05, 2} {
		ceq, mean := lin.Equivalent(s)
		if relErr(ceq, 2500) > 1e-12 || relErr(mean, s*(2000-3000)/math.Sqrt(2*math.Pi)) > 1e-12 {
			t.Errorf("linear damper at σ = %g: c_eq %g, E[f] %g", s, ceq, mean)
		}
	}
	kneed := wheelDamper{cb: 2000, cr: 3000, vb: 0.1, vr: 0.1, rb: 0.3, rr: 0.5}
	for _, tc := range []struct {
		name      string
		sigma     float64
		ceq, mean float64
	}{
		{"knee 20σ above", 0.005, 2500, 0.005 * (2000 - 3000) / math.Sqrt(2*math.Pi)},
		{"knee 1e-7σ", 1e6, (0.3*2000 + 0.5*3000) / 2, 1e6 * (0.3*2000 - 0.5*3000) / math.Sqrt(2*math.Pi)},
	} {
		ceq, mean := kneed.Equivalent(tc.sigma)
		if relErr(ceq, tc.ceq) > 1e-6 || relErr(mean, tc.mean) > 1e-6 {
			t.Errorf("%s: c_eq %g (want %g), E[f] %g (want %g)", tc.name, ceq, tc.ceq, mean, tc.mean)
		}
	}

}

// TestLinearisationFixedPoint checks the evaluator's fixed point from the
// outside: a car with linear dampers of the reported equivalent slopes
// must show wheel velocities whose Gaussian linearisation (by quadrature
// of E[f'], Caughey 1963; Roberts & Spanos 1990) gives those slopes back,
// and the mean forces E[f] at those velocities must produce the reported
// jacking through the static stiffness of the car (assembled here, see
// lyapunov_test.go): K x̄ = −Σ_i D_iᵀ E[f_i]. Tolerance relative 1e-6: the
// fixed point is converged to 1e-8 in c_eq, and the velocity sd depends
// on c_eq smoothly.
func TestLinearisationFixedPoint(t *testing.T) {
	t.Parallel()
	const tol = 1e-6
	v := demoCar()
	s := demoSetup()
	cases := demoCases()
	ev, err := NewEvaluator(v, cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var res Result
	if err := ev.Evaluate(s, &res); err != nil {
		t.Fatal(err)
	}
	cw := referenceWheelDamping(&v, [2]float64{1, 1}) // c_crit per corner
	for ci := range cases {
		m := res.Cases[ci]
		if m.Iterations < 2 {
			t.Errorf("%s: %d iterations for a setup with knees", cases[ci].Name, m.Iterations)
		}
		// The linear car with the equivalent slopes (the demo car is
		// symmetric, so one ratio per axle holds both sides).
		lin := Setup{}
		for ax := 0; ax < 2; ax++ {
			z := m.EquivalentDamping[2*ax] / cw[2*ax]
			lin.Axles[ax] = AxleDamping{BumpRatio: z, ReboundRatio: z}
		}
		one, err := NewEvaluator(v, cases[ci:ci+1], EvaluatorOptions{})
		if err != nil {
			t.Fatal(err)
		}
		var lr Result
		if err := one.Evaluate(lin, &lr); err != nil {
			t.Fatal(err)
		}
		var fbar [4]float64
		for i := 0; i < 4; i++ {
			a := s.Axles[i/2]
			mr := v.Corners[i].DamperMotionRatio
			d := wheelDamper{cb: a.BumpRatio * cw[i], cr: a.ReboundRatio * cw[i], vb: a.KneeBump / mr, vr: a.KneeRebound / mr,
				rb: a.HighSpeedBump, rr: a.HighSpeedRebound}
			sigma := lr.Cases[0].DamperVelocitySD[i] / mr
			kinks := []float64{-d.vr, 0, d.vb}
			ceq := gaussExpect(func(x float64) float64 { return refDamperSlope(d, x) }, sigma, kinks)
			fbar[i] = gaussExpect(func(x float64) float64 { return refDamperForce(d, x) }, sigma, kinks)
			if e := relErr(m.EquivalentDamping[i], ceq); e > tol {
				t.Errorf("%s %s: c_eq %.10g, E[f'] at the linear car's σ %.10g (rel. %.2g)", cases[ci].Name, CornerNames[i], m.EquivalentDamping[i], ceq, e)
			}
			if e := relErr(m.MeanDamperForce[i]*mr, fbar[i]); e > tol {
				t.Errorf("%s %s: mean force %.10g N at the wheel, E[f] %.10g N", cases[ci].Name, CornerNames[i], m.MeanDamperForce[i]*mr, fbar[i])
			}
		}
		// Jacking from the reference stiffness.
		rm := referenceModel(&v, [4]float64{}, cases[ci].Speed, 0)
		f := mat.NewVecDense(7, nil)
		for i := 0; i < 4; i++ {
			for a := 0; a < 7; a++ {
				f.SetVec(a, f.AtVec(a)-rm.d[i][a]*fbar[i])
			}
		}
		var xbar mat.VecDense
		if err := xbar.SolveVec(rm.k, f); err != nil {
			t.Fatal(err)
		}
		want := [2]float64{xbar.AtVec(0) + v.CGToFrontAxle*xbar.AtVec(1), xbar.AtVec(0) - v.CGToRearAxle*xbar.AtVec(1)}
		for ax := 0; ax < 2; ax++ {
			if e := relErr(m.RideHeightShift[ax], want[ax]); e > tol {
				t.Errorf("%s: %s ride-height shift %.10g m, static solve %.10g m", cases[ci].Name, AxleNames[ax], m.RideHeightShift[ax], want[ax])
			}
		}
		if e := relErr(m.PitchShift, xbar.AtVec(1)); e > tol {
			t.Errorf("%s: pitch shift %.10g rad, static solve %.10g rad", cases[ci].Name, m.PitchShift, xbar.AtVec(1))
		}
	}
}

// TestLinearisationNoConvergence: an iteration budget too small to reach
// the fixed point gives an error wrapping ErrNoConvergence (issue 2: fail
// with a clear error).
func TestLinearisationNoConvergence(t *testing.T) {
	t.Parallel()
	ev, err := NewEvaluator(demoCar(), demoCases(), EvaluatorOptions{MaxIterations: 1})
	if err != nil {
		t.Fatal(err)
	}
	var res Result
	err = ev.Evaluate(demoSetup(), &res)
	if !errors.Is(err, ErrNoConvergence) || !IsConvergence(err) {
		t.Errorf("error %v, want one wrapping ErrNoConvergence", err)
	}
}
