package model

import "fmt"

// AxleDamping is the damper setting of one axle (both sides alike).
//
// The force-velocity law at the damper is piecewise linear in the damper
// velocity v (bump positive): slope c below the knee velocity, slope
// factor·c above it, separately in bump and rebound. The low-speed slopes
// follow from the damping ratios at the wheel (see the package doc):
// c_wheel = ζ·c_crit and c_damper = c_wheel/MR².
type AxleDamping struct {
	BumpRatio    float64 // ζ_bump: bump low-speed slope over critical (-)
	ReboundRatio float64 // ζ_rebound: rebound low-speed slope over critical (-)

	// KneeBump and KneeRebound are the knee velocities at the damper
	// (m/s); 0 means no knee: the low-speed slope holds at every velocity.
	KneeBump    float64
	KneeRebound float64

	// HighSpeedBump and HighSpeedRebound are the high-speed slope over the
	// low-speed slope (-), used above the knee; 1 is a linear damper, < 1
	// digressive. 0 means 1.
	HighSpeedBump    float64
	HighSpeedRebound float64

	// The rest of the damper's hardware (see hardware.go); the zero
	// values give the one-knee curve above.

	// StagesBump and StagesRebound are further knees above the first, in
	// increasing velocity (a multi-stage digressive or progressive curve).
	StagesBump, StagesRebound [MaxStages]Stage
	// BlowOffBump and BlowOffRebound are blow-off forces at the damper
	// (N), 0 = none: the first knee sits where the low-speed force reaches
	// them, instead of at KneeBump/KneeRebound.
	BlowOffBump, BlowOffRebound float64
	// Friction is the Coulomb friction force at the damper (N), both
	// directions.
	Friction float64
	// GasForce is the gas force at the damper (N), extending it; part of
	// the rest figures, not of the dynamics (see hardware.go).
	GasForce float64
}

// Setup is the damper setting of the car.
type Setup struct {
	Axles [2]AxleDamping // front, rear
	// Heave is each axle's heave damper, front and rear, its ratios taken
	// of the axle's heave critical damping (Vehicle.HeaveCriticalDamping)
	// and its knees, forces and hardware at the element; the zero value is
	// none. Only an axle with a heave element (Vehicle.Heave) may have one.
	Heave [2]AxleDamping
}

// SameSumTwin returns s with each axle's bump and rebound ratios both set
// to their mean: the same sum per axle, so under statistical
// linearisation with equal knees and high-speed factors every RMS metric
// of a road case is the same as s's, and only the mean damper force (the
// jacking shift) and the time-domain cases (manoeuvres, kerbs) tell the
// two apart. The heave dampers are left as they are.
func (s Setup) SameSumTwin() Setup {
	for ax := range s.Axles {
		a := &s.Axles[ax]
		m := (a.BumpRatio + a.ReboundRatio) / 2
		a.BumpRatio, a.ReboundRatio = m, m
	}
	return s
}

// given reports whether a heave damper setting is given (any field set).
func (a *AxleDamping) given() bool { return *a != AxleDamping{} }

func factorOr1(r float64) float64 {
	if r == 0 {
		return 1
	}
	return r
}

// Validate checks the setup and names every bad field: damping ratios,
// knees and high-speed factors in their plausible ranges (see Limit).
func (s *Setup) Validate() error {
	var p problems
	for ax := range s.Axles {
		s.Axles[ax].validate(&p, AxleNames[ax]+".")
	}
	for ax := range s.Heave {
		if s.Heave[ax].given() {
			s.Heave[ax].validate(&p, fmt.Sprintf("heave[%d].", ax))
		}
	}
	return p.err()
}

// validate checks one damper setting, its fields named under prefix f.
func (a *AxleDamping) validate(p *problems, f string) {
	p.in(f+"bump_ratio", a.BumpRatio, "AxleDamping.ratio")
	p.in(f+"rebound_ratio", a.ReboundRatio, "AxleDamping.ratio")
	p.inOrZero(f+"knee_bump_m_per_s", a.KneeBump, "AxleDamping.knee_m_per_s")
	p.inOrZero(f+"knee_rebound_m_per_s", a.KneeRebound, "AxleDamping.knee_m_per_s")
	p.inOrZero(f+"high_speed_bump", a.HighSpeedBump, "AxleDamping.high_speed")
	p.inOrZero(f+"high_speed_rebound", a.HighSpeedRebound, "AxleDamping.high_speed")
	a.checkHardware(p, f)
}

// wheelDampers converts the setup to per-corner dampers at the wheel.
func (v *Vehicle) wheelDampers(s *Setup) [4]wheelDamper {
	cc := v.CriticalDamping()
	var out [4]wheelDamper
	for i := range out {
		a := &s.Axles[i/2]
		out[i] = a.axleDamper(a.BumpRatio*cc[i], a.ReboundRatio*cc[i], v.Corners[i].DamperMotionRatio)
	}
	return out
}

func (a AxleDamping) String() string {
	return fmt.Sprintf("bump %.3f rebound %.3f", a.BumpRatio, a.ReboundRatio)
}

// The plausible ranges of the setup's values, looked up once for ok.
var (
	ratioLimit     = limit("AxleDamping.ratio")
	kneeLimit      = limit("AxleDamping.knee_m_per_s")
	highSpeedLimit = limit("AxleDamping.high_speed")
)

// ok is a cheap allocation-free form of Validate for the hot path.
func (s *Setup) ok() bool {
	for i := range s.Axles {
		if !s.Axles[i].ok() {
			return false
		}
		if h := &s.Heave[i]; h.given() && !h.ok() {
			return false
		}
	}
	return true
}

// ok is the allocation-free check of one damper setting.
func (a *AxleDamping) ok() bool {
	if !a.hardwareOK() {
		return false
	}
	if !ratioLimit.Contains(a.BumpRatio) || !ratioLimit.Contains(a.ReboundRatio) {
		return false
	}
	for _, v := range [...]float64{a.KneeBump, a.KneeRebound} {
		if v != 0 && !kneeLimit.Contains(v) {
			return false
		}
	}
	for _, v := range [...]float64{a.HighSpeedBump, a.HighSpeedRebound} {
		if v != 0 && !highSpeedLimit.Contains(v) {
			return false
		}
	}
	return true
}
