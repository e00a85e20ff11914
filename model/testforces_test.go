package model

import (
	"math"
	"strings"
	"testing"
)

// The forces at the test velocities are the piecewise-linear curve's
// closed form (textbook statics of a two-slope damper):
//
//	F(v) = c v                     below the knee v_k
//	F(v) = c (v_k + r (v - v_k))   above it
//
// On the hand car (handCar) the damper's critical damping is 9375 N s/m,
// worked by hand in TestHandMethodClosedForms: bump 0.7 -> c = 6562.5,
// rebound 0.8 -> 7500 N s/m, knee 50 mm/s, r = 0.3; the adjuster band's
// ratios 0.5 and 1.2 scale c alike. The ±10 % band is the common-practice
// tolerance (no source). Tolerance relative 1e-12: the same products in
// another order.
func TestDamperTestForcesClosedForm(t *testing.T) {
	t.Parallel()
	const tol, ccrit, knee, r = 1e-12, 9375.0, 0.05, 0.3
	v := handCar()
	tg := DefaultHandTargets()
	got, err := DamperTestForces(&v, &tg.Setup, tg.Adjustment, BandVelocities)
	if err != nil {
		t.Fatal(err)
	}
	closed := func(ratio, vel float64) float64 {
		c := ratio * ccrit
		if vel <= knee {
			return c * vel
		}
		return c * (knee + r*(vel-knee))
	}
	for i, tf := range got {
		for k, vel := range tf.Velocity {
			for _, x := range []struct {
				name      string
				got, want float64
			}{
				{"bump", tf.Bump.Force[k], closed(0.7, vel)},
				{"rebound", tf.Rebound.Force[k], closed(0.8, vel)},
				{"bump -10 %", tf.Bump.Min[k], 0.9 * closed(0.7, vel)},
				{"rebound +10 %", tf.Rebound.Max[k], 1.1 * closed(0.8, vel)},
				{"bump softest", tf.Bump.Softest[k], closed(0.5, vel)},
				{"rebound stiffest", tf.Rebound.Stiffest[k], closed(1.2, vel)},
			} {
				if e := relErr(x.got, x.want); e > tol {
					t.Errorf("corner %d %s at %g mm/s: %.12g N, closed form %.12g N", i, x.name, 1e3*vel, x.got, x.want)
				}
			}
		}
	}
	// Worked by hand: bump at 300 mm/s, 6562.5 (0.05 + 0.3 x 0.25) =
	// 820.3125 N; rebound at 25 mm/s 187.5 N.
	if e := relErr(got[FL].Bump.Force[6], 820.3125); e > tol {
		t.Errorf("bump at 300 mm/s %.10g N, worked by hand 820.3125 N", got[FL].Bump.Force[6])
	}
	if e := relErr(got[FL].Rebound.Force[0], 187.5); e > tol {
		t.Errorf("rebound at 25 mm/s %.10g N, worked by hand 187.5 N", got[FL].Rebound.Force[0])
	}
}

// The forces at the test velocities are the hand method's for the same
// ratios on the demo car: its force at the knee (50 mm/s, a test
// velocity) and the slope above. Tolerance relative 1e-12 as above.
func TestDamperTestForcesAgreeWithHandMethod(t *testing.T) {
	t.Parallel()
	v := demoCar()
	tg := DefaultHandTargets()
	tg.Setup = demoSetup()
	r, err := HandMethod(&v, tg)
	if err != nil {
		t.Fatal(err)
	}
	got, err := DamperTestForces(&v, &tg.Setup, tg.Adjustment, []float64{0.05, 0.2})
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range r.Corners {
		for _, x := range []struct {
			name      string
			got, want float64
		}{
			{"bump at 50 mm/s", got[i].Bump.Force[0], c.Bump.Slope * 0.05},
			{"rebound at 200 mm/s", got[i].Rebound.Force[1], c.Rebound.KneeForce + c.Rebound.HighSpeedSlope*(0.2-c.Rebound.Knee)},
			{"stiffest bump at 50 mm/s", got[i].Bump.Stiffest[0], c.Bump.StiffestSlope * 0.05},
		} {
			if e := relErr(x.got, x.want); e > 1e-12 || math.IsNaN(x.got) {
				t.Errorf("%s %s: %.12g N, hand method %.12g N", CornerNames[i], x.name, x.got, x.want)
			}
		}
	}
}

// Test velocities out of range are refused naming the field.
func TestDamperTestForcesRefusesBadVelocities(t *testing.T) {
	t.Parallel()
	v := handCar()
	s := DefaultHandTargets().Setup
	_, err := DamperTestForces(&v, &s, Adjustment{}, []float64{0.05, 0, 9})
	for _, f := range []string{"velocities[1]", "velocities[2]"} {
		if err == nil || !strings.Contains(err.Error(), f) {
			t.Errorf("error %v does not name %s", err, f)
		}
	}
	if _, err := DamperTestForces(&v, &s, Adjustment{}, nil); err == nil || !strings.Contains(err.Error(), "velocities") {
		t.Errorf("no velocities: error %v", err)
	}
}
