package model

import (
	"math"
	"testing"
)

// A car braked steadily onto its front bump stops settles where the
// spring and the rubber together carry the load (Hooke, statics by hand).
// With no anti-dive, no unsprung CG height and a left-right symmetric
// car, the front axle gains m_s A h/L from the rear (Milliken & Milliken
// 1995, ch. 18), P = m_s A h/(2L) per front corner, and the axle's forces
// are statically determinate (forces at the two axle lines only; the bar
// does not stroke in heave), so the front travel s solves
//
//	k_w s + F(s − g) = P
//
// with F the rubber's curve. Worked by hand for the curve (4 mm, 400 N),
// (10 mm, 2400 N) and a 5 mm gap: the first segment (slope 1e5 N/m)
// would put δ past 4 mm, so s lies on the second, slope
// S = 2000 N / 6 mm, where F = 400 + S(δ − 0.004) and
//
//	s = (P − 400 + S (g + 0.004)) / (k_w + S).
//
// Tolerance 1e-6 of the travel: nothing is approximate at equilibrium
// but the settling, and the slowest mode on the rubber (the front's rate
// four times the spring's with dampers set for the spring: decay rate
// 1.66 1/s, from the state matrix's eigenvalues with the rubber's slope,
// gonum) has decayed by e^(−1.66·7.7) ≈ 3e-6 of its ~1 mm start after
// the 7.7 s held, ~3e-7 of the travel. The same
// car without the curve passes through the gap to P/k_w (the stop's
// contact is counted, no force: what the time domain did before a curve
// could be given).
func TestBumpStopStaticsHooke(t *testing.T) {
	t.Parallel()
	v := transientCar()
	v.LoadPaths = LoadPaths{CGHeight: 0.45}
	const gap = 0.005
	curve := BumpStop{Deflection: []float64{0.004, 0.010}, Force: []float64{400, 2400}}
	for i := FL; i <= FR; i++ {
		v.Corners[i].BumpStopGap = gap
		v.Corners[i].BumpStop = curve
	}
	const accel = 1.5 * Gravity
	man := &Manoeuvre{Name: "brake", Shape: ShapeBrake, Speed: 40, Longitudinal: accel, Start: 0.1, Ramp: 0.1, Duration: 8}
	p := v.SprungMass * accel * v.LoadPaths.CGHeight / (2 * v.Wheelbase())
	kw := v.Corners[FL].SpringRate * v.Corners[FL].SpringMotionRatio * v.Corners[FL].SpringMotionRatio
	slope := 2000 / 0.006
	want := (p - 400 + slope*(gap+0.004)) / (kw + slope)
	if d := want - gap; d <= 0.004 || d > 0.010 {
		t.Fatalf("hand solution δ = %g m is not on the second segment", d)
	}
	travel := func(v *Vehicle) (float64, int) {
		d := linearDampers(v, 0.5)
		c := prepare(t, v, man, nil, TransientOptions{}, &d)
		log, w := logRun(t, c, &d)
		defer c.pool.Put(w)
		return log.out[len(log.out)-1][outTravel+FL], w.stop[FL]
	}
	got, steps := travel(&v)
	if math.Abs(got-want) > 1e-6*want {
		t.Errorf("front travel on the stop %.9g m, statics %.9g m (rel. %.2g)", got, want, relErr(got, want))
	}
	if steps == 0 {
		t.Error("no bump-stop contact counted")
	}
	free := v
	for i := FL; i <= FR; i++ {
		free.Corners[i].BumpStop = BumpStop{}
	}
	if got, steps := travel(&free); math.Abs(got-p/kw) > 1e-6*p/kw || steps == 0 {
		t.Errorf("without the curve: travel %.9g m, P/k_w %.9g m; %d steps past the gap", got, p/kw, steps)
	}
}

// Bad curves are refused naming the field.
func TestBumpStopValidation(t *testing.T) {
	t.Parallel()
	nan := math.NaN()
	for _, c := range []struct {
		name  string
		gap   float64
		curve BumpStop
		field string
	}{
		{"NaN deflection", 0.02, BumpStop{Deflection: []float64{nan}, Force: []float64{100}}, "corners[0].bump_stop.deflection_m[0]"},
		{"negative force", 0.02, BumpStop{Deflection: []float64{0.01}, Force: []float64{-5}}, "corners[0].bump_stop.force_n[0]"},
		{"deflection out of order", 0.02, BumpStop{Deflection: []float64{0.01, 0.005}, Force: []float64{100, 200}}, "corners[0].bump_stop.deflection_m[1]"},
		{"zero first deflection", 0.02, BumpStop{Deflection: []float64{0, 0.01}, Force: []float64{0, 200}}, "corners[0].bump_stop.deflection_m[0]"},
		{"falling force", 0.02, BumpStop{Deflection: []float64{0.01, 0.02}, Force: []float64{300, 200}}, "corners[0].bump_stop.force_n[1]"},
		{"lengths differ", 0.02, BumpStop{Deflection: []float64{0.01, 0.02}, Force: []float64{300}}, "corners[0].bump_stop.deflection_m"},
		{"no gap", 0, BumpStop{Deflection: []float64{0.01}, Force: []float64{300}}, "corners[0].bump_stop.deflection_m"},
	} {
		v := demoCar()
		v.Corners[FL].BumpStopGap = c.gap
		v.Corners[FL].BumpStop = c.curve
		synthWantField(t, v.Validate(), c.field)
	}
	v := demoCar()
	v.Corners[FL].BumpStop = BumpStop{Deflection: []float64{0.005, 0.01}, Force: []float64{500, 2000}}
	if err := v.Validate(); err != nil {
		t.Errorf("a good curve: %v", err)
	}
}

// The points at the damper keep the work F·δ of each point (a rubber
// referred through the motion ratio as a damper is), and each rate is
// its segment's slope: values by hand for MR 0.8.
func TestBumpStopPoints(t *testing.T) {
	t.Parallel()
	c := Corner{DamperMotionRatio: 0.8, BumpStop: BumpStop{Deflection: []float64{0.004, 0.010}, Force: []float64{400, 2400}}}
	want := []BumpStopPoint{
		{Deflection: 0.004, Force: 400, Rate: 1e5, DamperDeflection: 0.0032, DamperForce: 500},
		{Deflection: 0.010, Force: 2400, Rate: 2000 / 0.006, DamperDeflection: 0.008, DamperForce: 3000},
	}
	got := c.BumpStopPoints()
	if len(got) != len(want) {
		t.Fatalf("%d points, want %d", len(got), len(want))
	}
	for k := range want {
		g, w := got[k], want[k]
		for _, p := range [][2]float64{{g.Deflection, w.Deflection}, {g.Force, w.Force}, {g.Rate, w.Rate}, {g.DamperDeflection, w.DamperDeflection}, {g.DamperForce, w.DamperForce}} {
			if relErr(p[0], p[1]) > 1e-12 { // rounding
				t.Errorf("point %d: %+v, want %+v", k, g, w)
				break
			}
		}
	}
	if (&Corner{}).BumpStopPoints() != nil {
		t.Error("points without a curve")
	}
}
