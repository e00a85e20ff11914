package model

import "fmt"

// Adjustment is the adjuster range a damper must cover, as damping ratios
// at the wheel (-): the softest and stiffest clicks in bump and rebound.
// A zero range leaves that band out.
type Adjustment struct {
	BumpSoftest, BumpStiffest       float64
	ReboundSoftest, ReboundStiffest float64
}

// Validate checks that every ratio is finite and not negative and that
// each stiffest click is at least its softest.
func (adj Adjustment) Validate() error {
	var p problems
	for name, r := range map[string]float64{"bump_softest": adj.BumpSoftest, "bump_stiffest": adj.BumpStiffest,
		"rebound_softest": adj.ReboundSoftest, "rebound_stiffest": adj.ReboundStiffest} {
		p.in(name, r, "Adjustment.ratio")
	}
	if adj.BumpStiffest < adj.BumpSoftest {
		p.add("bump_stiffest", "must be >= bump_softest (%g), got %g", adj.BumpSoftest, adj.BumpStiffest)
	}
	if adj.ReboundStiffest < adj.ReboundSoftest {
		p.add("rebound_stiffest", "must be >= rebound_softest (%g), got %g", adj.ReboundSoftest, adj.ReboundStiffest)
	}
	return p.err()
}

// ValidateCurveRange checks the tabulation of DamperCurves: vmax (m/s)
// finite and > 0, points in [3, 10001].
func ValidateCurveRange(vmax float64, points int) error {
	var p problems
	p.in("max_velocity_m_per_s", vmax, "Curves.max_velocity_m_per_s")
	if points < 3 || points > 10001 {
		p.add("points", "must be in [3, 10001], got %d", points)
	}
	return p.err()
}

// DamperCurve is the force-velocity table of one corner's damper at the
// component (damper velocity and force, not wheel), velocity positive in
// bump, force positive resisting bump (rebound forces are negative).
type DamperCurve struct {
	Corner   int       // FL, FR, RL, RR
	Velocity []float64 // damper velocity (m/s), from -vmax to +vmax
	Force    []float64 // baseline force (N)
	Softest  []float64 // force at the softest setting (N); nil without an adjustment
	Stiffest []float64 // force at the stiffest setting (N); nil without an adjustment

	BumpSlope, ReboundSlope float64 // low-speed slopes at the damper (N s/m)
	KneeBump, KneeRebound   float64 // knee velocities at the damper (m/s), 0 = none
	HighSpeedBump           float64 // high-speed factor in bump (-)
	HighSpeedRebound        float64 // high-speed factor in rebound (-)

	// The rest of the hardware at the damper (see AxleDamping): further
	// knees, blow-off forces (N), Coulomb friction (N, inside Force) and
	// the gas force (N, not inside Force: the forces are damping forces,
	// the gas force taken off as on a dyno report).
	StagesBump, StagesRebound   []Stage
	BlowOffBump, BlowOffRebound float64
	Friction, GasForce          float64
}

// activeStages is the given part of a stage list (nil when empty).
func activeStages(st *[MaxStages]Stage) []Stage {
	var out []Stage
	for _, s := range st {
		if s.Velocity == 0 {
			break
		}
		out = append(out, s)
	}
	return out
}

// DamperCurves returns the curves at the component of every corner for a
// setup: low-speed slopes c_damper = ζ c_crit / MR² (c_crit at the wheel,
// tyre ignored), knees and high-speed factors as set, tabulated at
// points velocities from -vmax to vmax (m/s, damper). The adjustment
// band, when given, scales the low-speed slopes to its damping ratios and
// keeps the knees and factors.
func DamperCurves(v *Vehicle, s *Setup, adj Adjustment, vmax float64, points int) ([]DamperCurve, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.merge("setup.", s.Validate())
	p.merge("", ValidateCurveRange(vmax, points))
	p.merge("adjustment.", adj.Validate())
	if err := p.err(); err != nil {
		return nil, err
	}
	band := adj.band()
	cc := v.CriticalDamping()
	out := make([]DamperCurve, 4)
	for i := range out {
		mr := v.Corners[i].DamperMotionRatio
		out[i] = componentCurve(&s.Axles[i/2], cc[i], mr*mr, adj, band, vmax, points)
		out[i].Corner = i
	}
	return out, nil
}

// componentCurve tabulates one damper's curve at the component: setting
// a with its ratios taken of the critical damping cc (at the wheel, or
// the heave element's mean wheel travel) and referred through mr2 = MR²
// (slope ζ·cc/mr2 at the damper, in that order of operations, which the
// stored fronts' bytes hold), the adjuster band when band is set.
func componentCurve(a *AxleDamping, cc, mr2 float64, adj Adjustment, band bool, vmax float64, points int) DamperCurve {
	dc := DamperCurve{
		BumpSlope: a.BumpRatio * cc / mr2, ReboundSlope: a.ReboundRatio * cc / mr2,
		KneeBump: a.KneeBump, KneeRebound: a.KneeRebound,
		HighSpeedBump: factorOr1(a.HighSpeedBump), HighSpeedRebound: factorOr1(a.HighSpeedRebound),
		StagesBump: activeStages(&a.StagesBump), StagesRebound: activeStages(&a.StagesRebound),
		BlowOffBump: a.BlowOffBump, BlowOffRebound: a.BlowOffRebound, Friction: a.Friction, GasForce: a.GasForce,
		Velocity: make([]float64, points), Force: make([]float64, points),
	}
	law := func(zb, zr, vel float64) float64 {
		d := a.axleDamper(zb*cc/mr2, zr*cc/mr2, 1)
		return d.force(vel)
	}
	if band {
		dc.Softest, dc.Stiffest = make([]float64, points), make([]float64, points)
	}
	for k := range dc.Velocity {
		vel := -vmax + 2*vmax*float64(k)/float64(points-1)
		dc.Velocity[k] = vel
		dc.Force[k] = law(a.BumpRatio, a.ReboundRatio, vel)
		if band {
			dc.Softest[k] = law(adj.BumpSoftest, adj.ReboundSoftest, vel)
			dc.Stiffest[k] = law(adj.BumpStiffest, adj.ReboundStiffest, vel)
		}
	}
	return dc
}

// HeaveCurve is one axle's heave damper curve at the component (the
// element: element velocity and force), signs as DamperCurve's; its
// Corner field is unused (0) and there is no adjuster band.
type HeaveCurve struct {
	Axle int // Front, Rear
	DamperCurve
}

// HeaveDamperCurves returns the curve at the element of every axle whose
// heave damper the setup sets (nil for a car or setup without one): slopes
// c_element = ζ_heave c_crit,heave / MR3² (Vehicle.HeaveCriticalDamping,
// at the mean wheel travel, referred to the element through its motion
// ratio MR3 as a corner damper through its own), knees, factors and the
// rest of the hardware as DamperCurves, at points velocities from -vmax
// to vmax (m/s, element).
func HeaveDamperCurves(v *Vehicle, s *Setup, vmax float64, points int) ([]HeaveCurve, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.merge("setup.", s.Validate())
	p.merge("setup.", v.CheckSetup(s))
	p.merge("", ValidateCurveRange(vmax, points))
	if err := p.err(); err != nil {
		return nil, err
	}
	cc := v.HeaveCriticalDamping()
	var out []HeaveCurve
	for ax := range s.Heave {
		if !s.Heave[ax].given() || !v.Heave[ax].has() {
			continue
		}
		mr := v.Heave[ax].MotionRatio
		out = append(out, HeaveCurve{Axle: ax, DamperCurve: componentCurve(&s.Heave[ax], cc[ax], mr*mr, Adjustment{}, false, vmax, points)})
	}
	return out, nil
}

// String names the axle of a heave curve.
func (c *HeaveCurve) String() string {
	return fmt.Sprintf("%s heave damper: bump %.0f N s/m, rebound %.0f N s/m", AxleNames[c.Axle], c.BumpSlope, c.ReboundSlope)
}

// String names the corner of a curve.
func (c *DamperCurve) String() string {
	return fmt.Sprintf("%s damper: bump %.0f N s/m, rebound %.0f N s/m", CornerNames[c.Corner], c.BumpSlope, c.ReboundSlope)
}
