package model

import "fmt"

// The forces a damper specification names: the curve of DamperCurves
// read at a few damper velocities, the figures a damper dyno is set to
// check.

// The test velocities of a specification are BandVelocities, the speeds
// the out-of-band check uses too: 25, 50, 100, 150, 200, 250 and 300
// mm/s. Common dyno practice (no single source; from memory): two points
// in the low-speed range, where platform and balance are set (the
// common-practice knee of 50 mm/s among them), then steps of 50 mm/s
// through the high-speed range a track's bumps and kerbs reach (the
// demo's damper velocity sd is about 10-30 mm/s, so 300 mm/s is past
// three sd on its roughest case).

// DamperForceTolerance is the band a built damper's force may lie in
// around the specified one, ±10 % of it (common practice for a damper
// checked on a dyno, no single source; from memory).
const DamperForceTolerance = 0.10

// TestForces are one corner's damper forces at the test velocities,
// at the component, velocity and force as magnitudes (bump at +v,
// rebound at -v; the curves give rebound forces negative).
type TestForces struct {
	Corner   int
	Velocity []float64 // damper velocity (m/s), > 0
	// Bump and Rebound are the setting's forces (N); Min and Max the
	// tolerance band, force × (1 ∓ DamperForceTolerance).
	Bump, Rebound TestBranch
}

// TestBranch is one direction's forces at the test velocities (N).
type TestBranch struct {
	Force, Min, Max []float64
	// Softest and Stiffest are the adjuster band's forces; nil without
	// an adjustment.
	Softest, Stiffest []float64
}

// DamperTestForces reads each corner's damper curve (DamperCurves, the
// same law and adjuster band) at the damper velocities given (m/s, each
// > 0, at most 5 m/s), in bump and in rebound.
func DamperTestForces(v *Vehicle, s *Setup, adj Adjustment, velocities []float64) ([]TestForces, error) {
	br, err := readTestForces(velocities, 4, func(vel float64) ([]DamperCurve, error) {
		return DamperCurves(v, s, adj, vel, 3)
	})
	if err != nil {
		return nil, err
	}
	out := make([]TestForces, len(br))
	for i, b := range br {
		out[i] = TestForces{Corner: i, Velocity: append([]float64(nil), velocities...), Bump: b[0], Rebound: b[1]}
	}
	return out, nil
}

// HeaveTestForces are one axle's heave damper forces at the test
// velocities, at the element, as TestForces (no adjuster band).
type HeaveTestForces struct {
	Axle          int
	Velocity      []float64 // element velocity (m/s), > 0
	Bump, Rebound TestBranch
}

// HeaveDamperTestForces reads each heave damper's curve
// (HeaveDamperCurves) at the element velocities given, as
// DamperTestForces does the corners'; nil for a car without heave dampers.
func HeaveDamperTestForces(v *Vehicle, s *Setup, velocities []float64) ([]HeaveTestForces, error) {
	if err := checkTestVelocities(velocities); err != nil {
		return nil, err
	}
	curves, err := HeaveDamperCurves(v, s, 1, 3)
	if err != nil || len(curves) == 0 {
		return nil, err
	}
	br, err := readTestForces(velocities, len(curves), func(vel float64) ([]DamperCurve, error) {
		hc, err := HeaveDamperCurves(v, s, vel, 3)
		out := make([]DamperCurve, len(hc))
		for i := range hc {
			out[i] = hc[i].DamperCurve
		}
		return out, err
	})
	if err != nil {
		return nil, err
	}
	out := make([]HeaveTestForces, len(br))
	for i, b := range br {
		out[i] = HeaveTestForces{Axle: curves[i].Axle, Velocity: append([]float64(nil), velocities...), Bump: b[0], Rebound: b[1]}
	}
	return out, nil
}

// readTestForces checks the velocities and reads n curves (three points
// each from -vel to +vel, as curves returns them) at each: per curve, the
// bump and the rebound branch.
func readTestForces(velocities []float64, n int, curves func(vel float64) ([]DamperCurve, error)) ([][2]TestBranch, error) {
	if err := checkTestVelocities(velocities); err != nil {
		return nil, err
	}
	out := make([][2]TestBranch, n)
	for _, vel := range velocities {
		// Three points from -vel to +vel: the table's ends are ±vel
		// exactly (-vel + 2 vel).
		cs, err := curves(vel)
		if err != nil {
			return nil, err
		}
		for i := range out {
			c := &cs[i]
			out[i][0].add(c.Force[2], c.Softest, c.Stiffest, 2)
			out[i][1].add(-c.Force[0], c.Softest, c.Stiffest, 0)
		}
	}
	return out, nil
}

// checkTestVelocities checks that there is at least one test velocity and
// each is in the curves' range, naming the bad one.
func checkTestVelocities(velocities []float64) error {
	var p problems
	if len(velocities) == 0 {
		p.add("velocities", "give at least one test velocity")
	}
	for k, vel := range velocities {
		p.in(fmt.Sprintf("velocities[%d]", k), vel, "Curves.max_velocity_m_per_s")
	}
	return p.err()
}

// add appends one velocity's force, band and adjuster forces (at index k
// of the curve's tables, sign taken off).
func (b *TestBranch) add(f float64, softest, stiffest []float64, k int) {
	b.Force = append(b.Force, f)
	b.Min = append(b.Min, f*(1-DamperForceTolerance))
	b.Max = append(b.Max, f*(1+DamperForceTolerance))
	if softest != nil {
		sign := 1.0
		if k == 0 {
			sign = -1
		}
		b.Softest = append(b.Softest, sign*softest[k])
		b.Stiffest = append(b.Stiffest, sign*stiffest[k])
	}
}
