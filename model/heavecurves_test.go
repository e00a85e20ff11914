package model

import (
	"math"
	"strings"
	"testing"
)

// TestHeaveDamperTestForcesClosedForm checks the heave dampers' forces at
// the element against the two-slope damper law in closed form (textbook
// statics of a piecewise-linear damper): F = c·v below the knee vk and
// F = c·(vk + r(v − vk)) above it, in each direction. The slope c is
// computed here by hand from the definition in model/heave.go
// (HeaveCriticalDamping, Thomson & Dahleh 1998 §2.3: c_crit,heave =
// 2 sqrt(k_heave m_axle), k_heave = k_w,L + k_w,R + k3 MR3², m_axle the
// axle's sprung loads over g) times the heave ratio, referred to the
// element through MR3² (c_element = ζ c_crit,heave / MR3²; knees are
// given at the element). Tolerance 1e-9 relative: the same products in
// another order, rounding only. The tolerance band is ±10 %
// (DamperForceTolerance, common practice, no source).
func TestHeaveDamperTestForcesClosedForm(t *testing.T) {
	t.Parallel()
	const tol = 1e-9
	v := heaveCar()
	s := demoSetup()
	s.Heave[Front] = AxleDamping{BumpRatio: 0.8, ReboundRatio: 1.1, KneeBump: 0.05, KneeRebound: 0.08, HighSpeedBump: 0.4, HighSpeedRebound: 0.5}
	s.Heave[Rear] = AxleDamping{BumpRatio: 0.6, ReboundRatio: 0.9}
	got, err := HeaveDamperTestForces(&v, &s, BandVelocities)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[0].Axle != Front || got[1].Axle != Rear {
		t.Fatalf("got %d heave tables, want front and rear", len(got))
	}
	loads := v.SprungCornerLoads()
	for ax := range got {
		h := v.Heave[ax]
		k := v.Corners[2*ax].WheelRateOf() + v.Corners[2*ax+1].WheelRateOf() + h.SpringRate*h.MotionRatio*h.MotionRatio
		m := (loads[2*ax] + loads[2*ax+1]) / Gravity
		c1 := 2 * math.Sqrt(k*m) / (h.MotionRatio * h.MotionRatio)
		a := s.Heave[ax]
		for j, vel := range BandVelocities {
			for _, x := range []struct {
				name           string
				br             TestBranch
				ratio, knee, r float64
			}{
				{"bump", got[ax].Bump, a.BumpRatio, a.KneeBump, factorOr1(a.HighSpeedBump)},
				{"rebound", got[ax].Rebound, a.ReboundRatio, a.KneeRebound, factorOr1(a.HighSpeedRebound)},
			} {
				c := x.ratio * c1
				want := c * vel
				if x.knee > 0 && vel > x.knee {
					want = c * (x.knee + x.r*(vel-x.knee))
				}
				if e := relErr(x.br.Force[j], want); e > tol {
					t.Errorf("%s %s at %g m/s: force %g, want %g (rel %g)", AxleNames[ax], x.name, vel, x.br.Force[j], want, e)
				}
				if e := relErr(x.br.Max[j], want*(1+DamperForceTolerance)); e > tol {
					t.Errorf("%s %s at %g m/s: max %g, want %g", AxleNames[ax], x.name, vel, x.br.Max[j], want*1.1)
				}
				if e := relErr(x.br.Min[j], want*(1-DamperForceTolerance)); e > tol {
					t.Errorf("%s %s at %g m/s: min %g, want %g", AxleNames[ax], x.name, vel, x.br.Min[j], want*0.9)
				}
				if x.br.Softest != nil {
					t.Errorf("%s %s: adjuster band given, want none for a heave damper", AxleNames[ax], x.name)
				}
			}
		}
	}
}

// TestHeaveDamperCurvesAbsent checks that a car without heave dampers
// gets no heave tables (bad test velocities still refused), and that a
// heave damper set on an axle without a heave element is refused, naming
// the field.
func TestHeaveDamperCurvesAbsent(t *testing.T) {
	t.Parallel()
	v, s := demoCar(), demoSetup()
	got, err := HeaveDamperTestForces(&v, &s, BandVelocities)
	if err != nil || got != nil {
		t.Fatalf("road car: got %v, %v; want nil, nil", got, err)
	}
	if _, err := HeaveDamperTestForces(&v, &s, []float64{0.1, -1}); err == nil || !strings.Contains(err.Error(), "velocities[1]") {
		t.Fatalf("bad velocity: err %v, want one naming velocities[1]", err)
	}
	s.Heave[Front] = AxleDamping{BumpRatio: 0.5, ReboundRatio: 0.5}
	if _, err := HeaveDamperCurves(&v, &s, 0.3, 11); err == nil || !strings.Contains(err.Error(), "heave[0]") {
		t.Fatalf("heave damper without element: err %v, want one naming heave[0]", err)
	}
}
