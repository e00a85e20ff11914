package model

import (
	"math"
	"testing"
)

// A car reduced to one heave degree of freedom per axle, on a brake step,
// against the step response of a damped single-degree-of-freedom system
// (Rao, Mechanical Vibrations, 5th ed., §4.x; any vibration text):
// overshoot exp(−πζ/sqrt(1−ζ²)), peak time π/(ω_n sqrt(1−ζ²)), settled
// value F/k (Hooke).
//
// The reduction, worked by hand: a dynamic index I_θ/(m a b) = 1
// decouples the front and rear axle points, each a mass m_s b/L (front)
// or m_s a/L (rear) (Gillespie 1992, Fundamentals of Vehicle Dynamics,
// ch. 5); tyres of 1e9 N/m and wheels of 0.5 kg hold the wheels on the
// road; no anti-dive, roll centres or unsprung CG height, so the brake
// step's only load is the pitch moment m_s A h, the couple ±m_s A h/L at
// the axles; each axle's heave damper is linear, slope c_a on the mean
// wheel travel u = (s_L + s_R)/2, and the corner dampers are a token
// c_w = 50 N s/m (the roll and wheel modes need some damping to be
// stable; in heave they add 2 c_w). The axle then obeys
// m_a ü + (c_a + 2 c_w) u̇ + k_a u = F_a with k_a = 2 k_w + k3 MR3² (the
// corner springs and the heave spring on the mean travel; the bar does
// not stroke in heave), so ζ_a = (c_a + 2 c_w)/(2 sqrt(k_a m_a)) and
// ω_n = sqrt(k_a/m_a).
// Tolerance 1e-3 relative: the tyres in series shift k_a by
// k_a/(2 k_t) ≈ 2e-4, and the peak time is read to the step (2e-5 s of
// ~0.13 s).
func TestTransientHeaveDamperSingleDOF(t *testing.T) {
	t.Parallel()
	v := heaveCar()
	v.Aero = Aero{}
	v.LoadPaths = LoadPaths{CGHeight: 0.45}
	v.PitchInertia = v.SprungMass * v.CGToFrontAxle * v.CGToRearAxle
	for ax := range v.Heave {
		v.Heave[ax].PackerGap, v.Heave[ax].PackerRate = 0, 0
	}
	for i := range v.Corners {
		v.Corners[i].TyreRate = 1e9
		v.Corners[i].UnsprungMass = 0.5
		v.Corners[i].TyreDamping = 0
		v.Corners[i].TyreEnvelopeLength = 0
		v.Corners[i].BumpStopGap = 0
	}
	l := v.Wheelbase()
	mass := [2]float64{v.SprungMass * v.CGToRearAxle / l, v.SprungMass * v.CGToFrontAxle / l}
	const cw = 50.0 // N s/m
	zeta := [2]float64{0.35, 0.25}
	var k [2]float64
	var d [nDamp]wheelDamper
	for i := 0; i < 4; i++ {
		d[i] = wheelDamper{cb: cw, cr: cw, rb: 1, rr: 1}
	}
	for ax := 0; ax < 2; ax++ {
		h, cn := v.Heave[ax], v.Corners[2*ax]
		k[ax] = 2*cn.SpringRate*cn.SpringMotionRatio*cn.SpringMotionRatio + h.SpringRate*h.MotionRatio*h.MotionRatio
		ca := zeta[ax]*2*math.Sqrt(k[ax]*mass[ax]) - 2*cw // the heave damper's slope for ζ_a
		d[dampHeave+ax] = wheelDamper{cb: ca, cr: ca, rb: 1, rr: 1}
	}
	const accel = 9.0 // m/s², braking
	man := &Manoeuvre{Name: "brake", Shape: ShapeBrake, Speed: 40, Longitudinal: accel, Start: 0.05, Duration: 1.3}
	cs := prepare(t, &v, man, nil, TransientOptions{}, &d)
	log, w := logRun(t, cs, &d)
	defer cs.pool.Put(w)
	load := [2]float64{v.SprungMass * accel * v.LoadPaths.CGHeight / l, -v.SprungMass * accel * v.LoadPaths.CGHeight / l}
	for ax := 0; ax < 2; ax++ {
		final := load[ax] / k[ax]
		peak, at := 0.0, 0
		for n, o := range log.out {
			if u := o[outAxleHeave+ax]; math.Abs(u) > math.Abs(peak) {
				peak, at = u, n
			}
		}
		wn := math.Sqrt(k[ax] / mass[ax])
		z := zeta[ax]
		wantOS := math.Exp(-math.Pi * z / math.Sqrt(1-z*z))
		if e := relErr(peak/final-1, wantOS); e > 1e-3 {
			t.Errorf("%s: overshoot %.6g, closed form %.6g (ζ %.2f; rel. %.2g)", AxleNames[ax], peak/final-1, wantOS, z, e)
		}
		tp := float64(at)*cs.h - man.Start
		wantTp := math.Pi / (wn * math.Sqrt(1-z*z))
		if e := relErr(tp, wantTp); e > 1e-3 {
			t.Errorf("%s: peak time %.6g s, closed form %.6g s (rel. %.2g)", AxleNames[ax], tp, wantTp, e)
		}
	}
	// The same through the case's run: its tyre loads settle to the
	// static transfer ±m_s A h/(2L) per tyre (Milliken & Milliken 1995,
	// ch. 18), the heave dampers having done their work. Tolerance 1e-3
	// of the transfer: the slower axle's decay e^(−ζωt), ζω ≈ 6 1/s
	// over the 1.25 s after the step, leaves ~6e-4.
	for i := 0; i < 4; i++ {
		want := load[i/2] / 2
		if got := w.tyre[i][cs.steps-1]; math.Abs(got-want) > 1e-3*math.Abs(want) {
			t.Errorf("%s: tyre load change %.6g N at the end, statics %.6g N", CornerNames[i], got, want)
		}
	}
}

// A design space whose heave ratio reaches past the corners' prepares
// its manoeuvre and kerb cases for it: a setup at the heave ratio's bound
// (times its high-speed factor) is covered by the step the case chose
// (else every evaluation would prepare the case afresh, allocating).
func TestTransientCasesCoverTheHeaveRange(t *testing.T) {
	t.Parallel()
	v := heaveCar()
	v.LoadPaths = transientCar().LoadPaths
	e, err := NewEvaluator(v, demoCases()[:1], EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	base := heaveSetup(demoSetup(), 0.5)
	base.Heave[Rear].HighSpeedBump = 1.2
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, HeaveRatio: [2]*Range{{0.2, 2.5}, {0.2, 2.5}}, Base: base}
	ks := []Kerb{{Name: "kerb", Shape: KerbHalfSine, Side: KerbBoth, Height: 0.02, Length: 1, Speed: 40}}
	if err := e.SetTransientCases(nil, ks, TransientOptions{MaxRatio: d.MaxSlopeRatio()}); err != nil {
		t.Fatal(err)
	}
	s := base
	for ax := range s.Heave {
		s.Heave[ax].BumpRatio, s.Heave[ax].ReboundRatio = 2.5, 2.5
	}
	dampers := v.dampers(&s)
	if !e.transients[0].covers(&dampers) {
		t.Errorf("MaxSlopeRatio %g: the kerb case's step does not cover heave dampers at ratio 2.5 × 1.2", d.MaxSlopeRatio())
	}
}
