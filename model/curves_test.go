package model

import (
	"math"
	"testing"
)

// Damper curves at the component. Common practice, no single source:
// c_damper = c_wheel / MR² with c_wheel = ζ · 2 sqrt(k_wheel m_corner).
func TestDamperCurvesAtComponent(t *testing.T) {
	t.Parallel()
	v := demoCar()
	s := demoSetup()
	curves, err := DamperCurves(&v, &s, Adjustment{BumpSoftest: 0.3, BumpStiffest: 1.2, ReboundSoftest: 0.4, ReboundStiffest: 1.5}, 0.3, 61)
	if err != nil {
		t.Fatal(err)
	}
	// Hand computation for FL: sprung corner mass m = 1150·1.272/2.65/2 kg,
	// wheel rate k = 160e3·0.8² N/m, MR = 0.8.
	m := 1150 * 1.272 / 2.65 / 2
	k := 160e3 * 0.64
	ccrit := 2 * math.Sqrt(k*m)
	wantBump := 0.55 * ccrit / 0.64
	fl := curves[FL]
	// Tolerance: the only difference is the order of floating-point
	// operations, a few ulps.
	if math.Abs(fl.BumpSlope-wantBump) > 1e-9*wantBump {
		t.Errorf("FL bump slope %g, want %g N s/m", fl.BumpSlope, wantBump)
	}
	for k, vel := range fl.Velocity {
		var want float64
		switch {
		case vel >= 0 && vel <= 0.05:
			want = wantBump * vel
		case vel > 0.05:
			want = wantBump * (0.05 + 0.45*(vel-0.05))
		case vel < 0 && -vel <= 0.06:
			want = 0.85 * ccrit / 0.64 * vel
		default:
			want = -0.85 * ccrit / 0.64 * (0.06 + 0.55*(-vel-0.06))
		}
		if math.Abs(fl.Force[k]-want) > 1e-9*math.Max(1, math.Abs(want)) {
			t.Errorf("v=%g: force %g, want %g", vel, fl.Force[k], want)
		}
		if vel > 0 && !(fl.Softest[k] < fl.Force[k] && fl.Force[k] < fl.Stiffest[k]) {
			t.Errorf("v=%g: baseline %g outside the band [%g, %g]", vel, fl.Force[k], fl.Softest[k], fl.Stiffest[k])
		}
	}
	if _, err := DamperCurves(&v, &s, Adjustment{BumpSoftest: 1, BumpStiffest: 0.5}, -1, 2); err == nil {
		t.Error("bad arguments accepted")
	} else {
		assertFields(t, err, []string{"max_velocity_m_per_s", "points", "adjustment.bump_stiffest"})
	}
}
