package model

import (
	"math"
	"strings"
	"testing"
)

// handCar is a car with equal corners on a centred CG: sprung corner mass
// M/4 at every corner.
func handCar() Vehicle {
	c := Corner{WheelRate: 30e3, DamperMotionRatio: 0.8, UnsprungMass: 40, TyreRate: 200e3}
	return Vehicle{Name: "hand car", SprungMass: 1200, PitchInertia: 1500, RollInertia: 400,
		CGToFrontAxle: 1.3, CGToRearAxle: 1.3, TrackFront: 1.6, TrackRear: 1.6,
		Corners: [4]Corner{c, c, c, c}, AntiRoll: [2]AntiRollBar{{WheelRate: 20e3}, {WheelRate: 10e3}}}
}

// Ride rate and ride frequency (Gillespie 1992, Fundamentals of Vehicle
// Dynamics, SAE, ch. 6: RR = K_s K_t/(K_s + K_t), f_n = 0.159 sqrt(RR/M))
// and critical damping c_c = 2 sqrt(k m) (closed form of the single
// degree of freedom oscillator; at the damper / MR², common practice).
// Worked by hand: 30 kN/m with 200 kN/m in series is 26086.957 N/m; with
// 300 kg, 1.59155 and 1.48406 Hz; c_c = 2 sqrt(9e6) = 6000 N s/m, 9375 at
// MR 0.8. Tolerance relative 1e-4: the hand figures are rounded to 5-6
// digits.
func TestHandMethodClosedForms(t *testing.T) {
	t.Parallel()
	const tol = 1e-4
	v := handCar()
	r, err := HandMethod(&v, DefaultHandTargets())
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range r.Corners {
		for _, x := range []struct {
			name      string
			got, want float64
		}{
			{"sprung corner mass (kg)", c.SprungMass, 300},
			{"ride rate (N/m)", c.RideRate, 26086.957},
			{"ride frequency, no tyre (Hz)", c.RideFrequencyHz, 1.59155},
			{"ride frequency, tyre in series (Hz)", c.RideFrequencyTyreHz, 1.48406},
			{"critical damping at the wheel (N s/m)", c.CriticalWheel, 6000},
			{"critical damping at the damper (N s/m)", c.CriticalDamper, 9375},
			{"bump slope 0.7 x 9375 (N s/m)", c.Bump.Slope, 6562.5},
			{"rebound slope 0.8 x 9375 (N s/m)", c.Rebound.Slope, 7500},
			{"bump knee force at 50 mm/s (N)", c.Bump.KneeForce, 328.125},
			{"rebound high-speed slope 0.3 x 7500 (N s/m)", c.Rebound.HighSpeedSlope, 2250},
			{"bump band, softest 0.5 x 9375 (N s/m)", c.Bump.SoftestSlope, 4687.5},
			{"rebound band, stiffest 1.2 x 9375 at 50 mm/s (N)", c.Rebound.StiffestKneeForce, 562.5},
		} {
			if e := relErr(x.got, x.want); e > tol {
				t.Errorf("corner %d %s: %.8g, worked by hand %.8g", i, x.name, x.got, x.want)
			}
		}
	}
	// Heave alone on equal corners: C/(2 sqrt(K M)) with C = 4 c, K = 4 k,
	// M = 4 m is the corner's ratio, the mean of 0.7 and 0.8.
	if e := relErr(r.Modes[ModeHeave].HandRatio, 0.75); e > 1e-12 {
		t.Errorf("hand heave ratio %.12g, want the corner ratio 0.75", r.Modes[ModeHeave].HandRatio)
	}
	// With tyres the modal ratio falls: the suspension takes
	// 200/230 of the body's heave.
	h := r.Modes[ModeHeave]
	if e := relErr(h.TyreShare, 200.0/230); e > 1e-12 || !(h.Modal.DampingRatio < h.HandRatio) {
		t.Errorf("heave: tyre share %.6f (want %.6f), modal ratio %.3f, hand %.3f", h.TyreShare, 200.0/230, h.Modal.DampingRatio, h.HandRatio)
	}
}

// The hand method's slopes and forces are the damper curves' (the table
// a job reports) for the same targets on the demo car: slope, force at
// the knee and at twice the knee (on the high-speed slope), and the
// adjuster band. Tolerance relative 1e-12: the same products in another
// order.
func TestHandMethodAgreesWithDamperCurves(t *testing.T) {
	t.Parallel()
	v := demoCar()
	tg := DefaultHandTargets()
	tg.Setup = demoSetup()
	tg.Adjustment = Adjustment{BumpSoftest: 0.3, BumpStiffest: 1.0, ReboundSoftest: 0.5, ReboundStiffest: 1.4}
	r, err := HandMethod(&v, tg)
	if err != nil {
		t.Fatal(err)
	}
	curves, err := DamperCurves(&v, &tg.Setup, tg.Adjustment, 0.12, 13) // every 20 mm/s
	if err != nil {
		t.Fatal(err)
	}
	at := func(xs, fs []float64, x float64) float64 {
		for k := range xs {
			if math.Abs(xs[k]-x) < 1e-12 {
				return fs[k]
			}
		}
		t.Fatalf("no table point at %g m/s", x)
		return 0
	}
	for i, c := range r.Corners {
		dc := curves[i]
		b, rb := c.Bump, c.Rebound
		checks := []struct {
			name      string
			got, want float64
		}{
			{"bump slope", b.Slope, dc.BumpSlope},
			{"rebound slope", rb.Slope, dc.ReboundSlope},
			{"bump force at 40 mm/s (below the knee)", b.Slope * 0.04, at(dc.Velocity, dc.Force, 0.04)},
			{"bump force at 100 mm/s", b.KneeForce + b.HighSpeedSlope*(0.1-b.Knee), at(dc.Velocity, dc.Force, 0.1)},
			{"rebound force at -120 mm/s", -(rb.KneeForce + rb.HighSpeedSlope*(0.12-rb.Knee)), at(dc.Velocity, dc.Force, -0.12)},
			{"stiffest bump at 40 mm/s", b.StiffestSlope * 0.04, at(dc.Velocity, dc.Stiffest, 0.04)},
			{"softest rebound at -40 mm/s", -rb.SoftestSlope * 0.04, at(dc.Velocity, dc.Softest, -0.04)},
		}
		for _, x := range checks {
			if e := relErr(x.got, x.want); e > 1e-12 {
				t.Errorf("%s %s: hand %.12g, curve %.12g", CornerNames[i], x.name, x.got, x.want)
			}
		}
	}
}

// Bad targets are refused naming the field.
func TestHandMethodRefusesBadTargets(t *testing.T) {
	t.Parallel()
	v := handCar()
	tg := DefaultHandTargets()
	tg.Setup.Axles[Rear].BumpRatio = -1
	tg.Adjustment.ReboundStiffest = 0.1
	_, err := HandMethod(&v, tg)
	for _, f := range []string{"targets.setup.rear.bump_ratio", "targets.adjustment.rebound_stiffest"} {
		if err == nil || !strings.Contains(err.Error(), f) {
			t.Errorf("error %v does not name %s", err, f)
		}
	}
}

// On the demo car the hand and modal figures, logged for the README.
func TestHandMethodDemoFigures(t *testing.T) {
	t.Parallel()
	v := demoCar()
	r, err := HandMethod(&v, DefaultHandTargets())
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range r.Corners[:3:3] {
		t.Logf("%s: c_crit %.0f/%.0f N s/m wheel/damper, ride %.2f/%.2f Hz", CornerNames[c.Corner], c.CriticalWheel, c.CriticalDamper, c.RideFrequencyHz, c.RideFrequencyTyreHz)
	}
	for _, m := range r.Modes {
		t.Logf("%s: hand %.2f Hz ζ %.2f; car %.2f Hz ζ %.2f; %s", m.Name, m.HandFrequencyHz, m.HandRatio, m.Modal.UndampedFrequencyHz, m.Modal.DampingRatio, m.Reason)
		if m.Modal.DampingRatio >= m.HandRatio {
			t.Errorf("%s: the car's ratio %.3f is not below the tyre-less hand figure %.3f", m.Name, m.Modal.DampingRatio, m.HandRatio)
		}
	}
}

// A road case's hand figures (HandModesAt at its slopes) are the hand
// method's: at the mean target slopes they equal HandMethod's, and the
// tyre-less ratio ζ = C/(2 sqrt(K J)) (single degree of freedom closed
// form) scales with the slopes, so twice the slopes give twice the
// ratio. Tolerance relative 1e-12: the same sums in another order.
func TestHandModesAtSlopes(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	v := handCar()
	r, err := HandMethod(&v, DefaultHandTargets())
	if err != nil {
		t.Fatal(err)
	}
	var c, c2 [4]float64
	for i, hc := range r.Corners {
		mr2 := hc.DamperMotionRatio * hc.DamperMotionRatio
		c[i] = (hc.Bump.Slope + hc.Rebound.Slope) / 2 * mr2 // at the wheel
		c2[i] = 2 * c[i]
	}
	for _, x := range []struct {
		slopes [4]float64
		scale  float64
	}{{c, 1}, {c2, 2}} {
		modal, err := ModesAt(&v, 0, x.slopes)
		if err != nil {
			t.Fatal(err)
		}
		got, err := HandModesAt(&v, 0, x.slopes, modal)
		if err != nil {
			t.Fatal(err)
		}
		for j := range got {
			if e := relErr(got[j].HandRatio, x.scale*r.Modes[j].HandRatio); e > tol {
				t.Errorf("%s at %g x the target slopes: hand ratio %.12g, want %.12g", got[j].Name, x.scale, got[j].HandRatio, x.scale*r.Modes[j].HandRatio)
			}
			if got[j].Modal.DampingRatio != modal[j].DampingRatio || got[j].Reason == "" {
				t.Errorf("%s: the car's mode is not the one given, or no reason: %+v", got[j].Name, got[j])
			}
		}
	}
}
