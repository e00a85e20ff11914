package model

import (
	"math"
	"testing"
)

// Common practice, no published source: the checks in this file rest on
// the conventions the trade uses (stated in doc.go), not on a reference
// value.

// TestCriticalDampingAtWheel: critical damping at the wheel is
// c_crit = 2 sqrt(k_wheel m_s,corner), tyre ignored, with the wheel rate
// k·MR² and the sprung corner mass from statics (common practice, no
// source). A linear setup's equivalent damping at the wheel is then ζ·c_crit
// on every corner. Tolerance relative 1e-12 (a few roundings).
func TestCriticalDampingAtWheel(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	for _, v := range []Vehicle{demoCar(), asymmetricCar()} {
		zeta := [2]float64{0.45, 0.8}
		want := referenceWheelDamping(&v, zeta)
		cc := v.CriticalDamping()
		for i := 0; i < 4; i++ {
			if e := relErr(zeta[i/2]*cc[i], want[i]); e > tol {
				t.Errorf("%s %s: ζ·CriticalDamping = %.12g, 2ζ sqrt(k m) = %.12g", v.Name, CornerNames[i], zeta[i/2]*cc[i], want[i])
			}
		}
		ev, err := NewEvaluator(v, demoCases()[:1], EvaluatorOptions{})
		if err != nil {
			t.Fatal(err)
		}
		var res Result
		s := Setup{Axles: [2]AxleDamping{{BumpRatio: 0.3, ReboundRatio: 0.6}, {BumpRatio: 0.7, ReboundRatio: 0.9}}}
		if err := ev.Evaluate(s, &res); err != nil {
			t.Fatal(err)
		}
		// Linear bump/rebound: c_eq is their mean, exactly.
		want = referenceWheelDamping(&v, [2]float64{0.45, 0.8})
		for i := 0; i < 4; i++ {
			if e := relErr(res.Cases[0].EquivalentDamping[i], want[i]); e > tol {
				t.Errorf("%s %s: equivalent damping %.12g N s/m, ζ c_crit %.12g N s/m", v.Name, CornerNames[i], res.Cases[0].EquivalentDamping[i], want[i])
			}
		}
	}
}

// TestDamperCurvesMotionRatio: at the damper the low-speed slope is
// c_wheel/MR² and a force F_d at the damper acts at the wheel as F_d·MR
// (common practice, no source; the energy c_w v_w² = c_d v_d² with
// v_d = MR v_w). Tolerance relative 1e-12.
func TestDamperCurvesMotionRatio(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	v := demoCar()
	s := demoSetup()
	curves, err := DamperCurves(&v, &s, Adjustment{}, 0.5, 201)
	if err != nil {
		t.Fatal(err)
	}
	cw := referenceWheelDamping(&v, [2]float64{s.Axles[0].BumpRatio, s.Axles[1].BumpRatio})
	cwr := referenceWheelDamping(&v, [2]float64{s.Axles[0].ReboundRatio, s.Axles[1].ReboundRatio})
	for _, c := range curves {
		mr := v.Corners[c.Corner].DamperMotionRatio
		if e := relErr(c.BumpSlope, cw[c.Corner]/(mr*mr)); e > tol {
			t.Errorf("%s bump slope at the damper %.12g, c_wheel/MR² %.12g", CornerNames[c.Corner], c.BumpSlope, cw[c.Corner]/(mr*mr))
		}
		if e := relErr(c.ReboundSlope, cwr[c.Corner]/(mr*mr)); e > tol {
			t.Errorf("%s rebound slope at the damper %.12g, c_wheel/MR² %.12g", CornerNames[c.Corner], c.ReboundSlope, cwr[c.Corner]/(mr*mr))
		}
		// The power the damper absorbs is the same at damper and wheel:
		// F_d v_d = F_w v_w with v_w = v_d/MR and F_w the wheel-level law
		// (knee at v_knee/MR at the wheel).
		a := s.Axles[c.Corner/2]
		wheel := wheelDamper{cb: cw[c.Corner], cr: cwr[c.Corner], vb: a.KneeBump / mr, vr: a.KneeRebound / mr,
			rb: a.HighSpeedBump, rr: a.HighSpeedRebound}
		for k, vd := range c.Velocity {
			fw := refDamperForce(wheel, vd/mr)
			if math.Abs(c.Force[k]*mr-fw) > tol*math.Abs(fw)+1e-9 {
				t.Errorf("%s at %g m/s: damper force × MR = %.12g N, wheel force %.12g N", CornerNames[c.Corner], vd, c.Force[k]*mr, fw)
				break
			}
		}
	}
}

// TestMotionRatioInvariance: the damper motion ratio only converts between
// damper and wheel (common practice, no source; doc.go). Two cars that
// differ only in damper MR, with the knees at the damper scaled by the MR
// ratio so that the wheel-level damper is the same, give the same
// wheel-level metrics; damper velocity scales with MR and the mean damper
// force with 1/MR. Tolerance relative 1e-10: the same arithmetic but for
// the rounding of the converted knees, amplified a little by the fixed
// point.
func TestMotionRatioInvariance(t *testing.T) {
	t.Parallel()
	const tol = 1e-10
	v1 := demoCar()
	v2 := demoCar()
	ratio := [2]float64{1.2, 0.9} // new MR / old MR per axle
	for i := range v2.Corners {
		v2.Corners[i].DamperMotionRatio *= ratio[i/2]
	}
	s1 := symmetrySetups()[2]
	s2 := s1
	for ax := 0; ax < 2; ax++ {
		s2.Axles[ax].KneeBump *= ratio[ax]
		s2.Axles[ax].KneeRebound *= ratio[ax]
	}
	cases := demoCases()
	e1, err := NewEvaluator(v1, cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	e2, err := NewEvaluator(v2, cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var r1, r2 Result
	if err := e1.Evaluate(s1, &r1); err != nil {
		t.Fatal(err)
	}
	if err := e2.Evaluate(s2, &r2); err != nil {
		t.Fatal(err)
	}
	for ci := range cases {
		a, b := r1.Cases[ci], r2.Cases[ci]
		for i := 0; i < 4; i++ {
			k := ratio[i/2]
			if e := relErr(b.DamperVelocitySD[i], k*a.DamperVelocitySD[i]); e > tol {
				t.Errorf("%s %s: damper velocity sd %g, want MR ratio × %g", cases[ci].Name, CornerNames[i], b.DamperVelocitySD[i], a.DamperVelocitySD[i])
			}
			if e := relErr(b.MeanDamperForce[i], a.MeanDamperForce[i]/k); e > tol {
				t.Errorf("%s %s: mean damper force %g, want %g / MR ratio", cases[ci].Name, CornerNames[i], b.MeanDamperForce[i], a.MeanDamperForce[i])
			}
			a.DamperVelocitySD[i], b.DamperVelocitySD[i] = 0, 0
			a.MeanDamperForce[i], b.MeanDamperForce[i] = 0, 0
		}
		compareMetrics(t, cases[ci].Name, &a, &b, tol, false)
	}
}

// TestGripOptimumBelowPlatformOptimum: race-car baseline damping ratios sit
// above the quarter-car tyre-load optimum because platform control wants
// more damping (common practice, no source). On the demo car with linear
// dampers and one ζ for all four, the ζ that minimises the grip measure
// (RMS over corners and cases of the tyre-load sd over static load) lies
// below the ζ that minimises the platform measure (RMS over axles and cases
// of the ride-height sd). Both minima are located by golden-section search
// to ±0.002 in ζ, after a scan that brackets them.
func TestGripOptimumBelowPlatformOptimum(t *testing.T) {
	t.Parallel()
	v := demoCar()
	cases := demoCases()
	ev, err := NewEvaluator(v, cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	measures := func(zeta float64) (grip, platform float64) {
		var r Result
		s := Setup{Axles: [2]AxleDamping{{BumpRatio: zeta, ReboundRatio: zeta}, {BumpRatio: zeta, ReboundRatio: zeta}}}
		if err := ev.Evaluate(s, &r); err != nil {
			t.Fatal(err)
		}
		var g, p float64
		for _, m := range r.Cases {
			for i := 0; i < 4; i++ {
				g += m.TyreLoadSDRel[i] * m.TyreLoadSDRel[i]
			}
			p += m.RideHeightSD[0]*m.RideHeightSD[0] + m.RideHeightSD[1]*m.RideHeightSD[1]
		}
		nc := float64(len(r.Cases))
		return math.Sqrt(g / (4 * nc)), math.Sqrt(p / (2 * nc))
	}
	minimise := func(f func(float64) float64) float64 {
		// Scan, then golden section around the best scan point.
		lo, hi := 0.05, 3.0
		best, bestZ := math.Inf(1), 0.0
		const n = 60
		for k := 0; k <= n; k++ {
			z := lo + (hi-lo)*float64(k)/n
			if y := f(z); y < best {
				best, bestZ = y, z
			}
		}
		step := (hi - lo) / n
		a, b := math.Max(lo, bestZ-step), math.Min(hi, bestZ+step)
		if bestZ == lo || bestZ == hi {
			t.Fatalf("minimum at the scan bound ζ = %g", bestZ)
		}
		gr := (math.Sqrt(5) - 1) / 2
		c, d := b-gr*(b-a), a+gr*(b-a)
		fc, fd := f(c), f(d)
		for b-a > 0.002 {
			if fc < fd {
				b, d, fd = d, c, fc
				c = b - gr*(b-a)
				fc = f(c)
			} else {
				a, c, fc = c, d, fd
				d = a + gr*(b-a)
				fd = f(d)
			}
		}
		return (a + b) / 2
	}
	zGrip := minimise(func(z float64) float64 { g, _ := measures(z); return g })
	zPlat := minimise(func(z float64) float64 { _, p := measures(z); return p })
	t.Logf("demo car, one linear ζ for all dampers: grip-optimal ζ = %.3f, platform-optimal ζ = %.3f", zGrip, zPlat)
	if !(zGrip < zPlat-0.004) {
		t.Errorf("grip-optimal ζ %.3f is not below platform-optimal ζ %.3f", zGrip, zPlat)
	}
}
