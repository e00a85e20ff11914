package model

import (
	"fmt"
	"math"
)

// Gravity is standard gravity (m/s²), ISO 80000-3.
const Gravity = 9.80665

// Corner indices.
const (
	FL = iota // front left
	FR        // front right
	RL        // rear left
	RR        // rear right
)

// Axle indices.
const (
	Front = 0
	Rear  = 1
)

// CornerNames are short labels of the corners, in index order.
var CornerNames = [4]string{"FL", "FR", "RL", "RR"}

// AxleNames are labels of the axles, in index order.
var AxleNames = [2]string{"front", "rear"}

// Vehicle is the linear four-post description of a car. All fields are SI.
type Vehicle struct {
	Name string

	SprungMass   float64 // sprung mass (kg)
	PitchInertia float64 // sprung pitch inertia about the sprung CG (kg m²)
	RollInertia  float64 // sprung roll inertia about the sprung CG (kg m²)

	CGToFrontAxle float64 // a: sprung CG to front axle, horizontal (m)
	CGToRearAxle  float64 // b: sprung CG to rear axle, horizontal (m)
	CGLateral     float64 // lateral offset of the sprung CG from the centre line, left positive (m)

	TrackFront float64 // front track (m)
	TrackRear  float64 // rear track (m)

	Corners  [4]Corner      // FL, FR, RL, RR
	AntiRoll [2]AntiRollBar // front, rear
	Aero     Aero           // optional aero map (see Aero)
	// Heave is each axle's heave (third) spring and damper, front and
	// rear; the zero value is none (see HeaveElement).
	Heave [2]HeaveElement

	// RestRideHeight is the ride height of the car at rest, front and
	// rear, at each axle's centre line (m): the body's reference (floor,
	// plank) above the ground. Needed by a ride-height aero map; 0 = not
	// given, and ride heights are then reported as changes from rest.
	RestRideHeight [2]float64

	// ReferencePoints are points of the underside (splitter, plank) whose
	// height and ground-contact probability each case reports (see
	// ReferencePoint); at most MaxReferencePoints.
	ReferencePoints []ReferencePoint

	// LoadPaths carries the heights and link geometry the manoeuvre
	// cases need (see LoadPaths); the ride model does not use it.
	LoadPaths LoadPaths
}

// Corner is one wheel station.
type Corner struct {
	// SpringRate is the spring's rate at the spring (N/m); with
	// SpringMotionRatio it gives the wheel rate k·MR². Leave 0 and set
	// WheelRate to give the wheel rate directly.
	SpringRate        float64
	SpringMotionRatio float64 // spring travel per wheel travel (-), in (0, 2]
	WheelRate         float64 // wheel rate (N/m), used when SpringRate is 0

	DamperMotionRatio float64 // damper travel per wheel travel (-), in (0, 2]

	UnsprungMass float64 // unsprung mass (kg)
	TyreRate     float64 // tyre vertical stiffness (N/m)
	TyreDamping  float64 // tyre vertical damping (N s/m), small; needs TyreEnvelopeLength > 0

	// TyreEnvelopeLength (m) sets a first-order low-pass on the road the
	// tyre follows, G(n) = 1/(1 + i n ℓ) with n in cycles/m: the contact
	// patch does not follow wavelengths much shorter than ℓ. 0 turns it
	// off. It keeps the tyre-force variance finite when TyreDamping > 0 (on
	// an ISO 8608 road with waviness 2 the term ct·ẇ has a white spectrum).
	TyreEnvelopeLength float64

	// BumpStopGap is the wheel travel in bump from the car at rest to
	// bump-stop contact (m); 0 means not given, and no contact probability
	// is reported for the corner. At speed the downforce uses part of it
	// (see OperatingPoint).
	BumpStopGap float64
	// BumpStop is the bump stop's force curve past BumpStopGap (see
	// BumpStop), used by the time-domain models; the zero value has no
	// force (the travel past the gap is counted only).
	BumpStop BumpStop

	// SprungLoad optionally gives the static sprung load on this corner (N)
	// for a car whose corner weights do not follow from the CG position; 0
	// derives it from the CG. Give all four or none.
	SprungLoad float64
}

// AntiRollBar is one axle's bar. Its wheel rate k_bar is what each wheel of
// the axle sees in addition to its own wheel rate when the two wheels move
// in opposite directions (pure roll); in parallel travel the bar does
// nothing. The energy stored is ½ (k_bar/2)(s_L - s_R)².
type AntiRollBar struct {
	WheelRate float64 // bar wheel rate (N/m); used when BarRate is 0
	// BarRate is the bar's rate at its link (N/m) and MotionRatio the link
	// travel per wheel travel, giving k_bar = BarRate·MotionRatio².
	BarRate     float64
	MotionRatio float64
}

// WheelRateOf returns the corner's wheel rate (N/m).
func (c Corner) WheelRateOf() float64 {
	if c.SpringRate != 0 {
		return c.SpringRate * c.SpringMotionRatio * c.SpringMotionRatio
	}
	return c.WheelRate
}

// WheelRateOf returns the bar's wheel rate (N/m).
func (b AntiRollBar) WheelRateOf() float64 {
	if b.BarRate != 0 {
		return b.BarRate * b.MotionRatio * b.MotionRatio
	}
	return b.WheelRate
}

// Wheelbase is a + b (m).
func (v *Vehicle) Wheelbase() float64 { return v.CGToFrontAxle + v.CGToRearAxle }

// cornerPosition returns (x_i, y_i) of corner i relative to the sprung CG (m).
func (v *Vehicle) cornerPosition(i int) (x, y float64) {
	switch i {
	case FL:
		return v.CGToFrontAxle, v.TrackFront/2 - v.CGLateral
	case FR:
		return v.CGToFrontAxle, -v.TrackFront/2 - v.CGLateral
	case RL:
		return -v.CGToRearAxle, v.TrackRear/2 - v.CGLateral
	default:
		return -v.CGToRearAxle, -v.TrackRear/2 - v.CGLateral
	}
}

// SprungCornerLoads returns the static sprung load per corner (N): given
// per corner, or from the CG by statics (lever rule along and across).
func (v *Vehicle) SprungCornerLoads() [4]float64 {
	var out [4]float64
	if v.Corners[0].SprungLoad != 0 {
		for i := range out {
			out[i] = v.Corners[i].SprungLoad
		}
		return out
	}
	w := v.SprungMass * Gravity
	l := v.Wheelbase()
	axle := [2]float64{w * v.CGToRearAxle / l, w * v.CGToFrontAxle / l}
	track := [2]float64{v.TrackFront, v.TrackRear}
	for ax := 0; ax < 2; ax++ {
		left := (track[ax]/2 + v.CGLateral) / track[ax]
		out[2*ax] = axle[ax] * left
		out[2*ax+1] = axle[ax] * (1 - left)
	}
	return out
}

// restTyreLoads returns the static vertical load on each tyre at rest
// (N): sprung corner load and unsprung weight.
func (v *Vehicle) restTyreLoads() [4]float64 {
	out := v.SprungCornerLoads()
	for i := range out {
		out[i] += v.Corners[i].UnsprungMass * Gravity
	}
	return out
}

// CriticalDamping returns c_crit = 2 sqrt(k_w m_s) at the wheel per corner
// (N s/m), m_s the sprung corner mass; the tyre is ignored (common
// practice, no single source).
func (v *Vehicle) CriticalDamping() [4]float64 {
	loads := v.SprungCornerLoads()
	var out [4]float64
	for i := range out {
		out[i] = 2 * math.Sqrt(v.Corners[i].WheelRateOf()*loads[i]/Gravity)
	}
	return out
}

// symmetric reports whether the car is left-right symmetric, so that the
// in-phase and anti-phase subsystems decouple.
func (v *Vehicle) symmetric() bool {
	if v.CGLateral != 0 {
		return false
	}
	loads := v.SprungCornerLoads()
	for ax := 0; ax < 2; ax++ {
		l, r := v.Corners[2*ax], v.Corners[2*ax+1]
		if l.WheelRateOf() != r.WheelRateOf() || l.DamperMotionRatio != r.DamperMotionRatio ||
			l.UnsprungMass != r.UnsprungMass || l.TyreRate != r.TyreRate ||
			l.TyreDamping != r.TyreDamping || l.TyreEnvelopeLength != r.TyreEnvelopeLength ||
			loads[2*ax] != loads[2*ax+1] {
			return false
		}
	}
	return true
}

// Validate checks the vehicle and returns a *ValidationError naming every
// bad field, or nil. Every value must lie in its plausible range (see
// Limit and PlausibleRanges).
func (v *Vehicle) Validate() error {
	var p problems
	p.text("name", v.Name)
	p.in("sprung_mass_kg", v.SprungMass, "Vehicle.sprung_mass_kg")
	p.in("pitch_inertia_kg_m2", v.PitchInertia, "Vehicle.pitch_inertia_kg_m2")
	p.in("roll_inertia_kg_m2", v.RollInertia, "Vehicle.roll_inertia_kg_m2")
	p.in("cg_to_front_axle_m", v.CGToFrontAxle, "Vehicle.cg_to_axle_m")
	p.in("cg_to_rear_axle_m", v.CGToRearAxle, "Vehicle.cg_to_axle_m")
	p.in("track_front_m", v.TrackFront, "Vehicle.track_m")
	p.in("track_rear_m", v.TrackRear, "Vehicle.track_m")
	p.in("cg_lateral_m", v.CGLateral, "Vehicle.cg_lateral_m")
	if minTrack := math.Min(v.TrackFront, v.TrackRear); minTrack > 0 && math.Abs(v.CGLateral) >= minTrack/2 {
		p.add("cg_lateral_m", "must lie between the wheels (|offset| < %g m), got %g", minTrack/2, v.CGLateral)
	}
	given := 0
	for i, c := range v.Corners {
		f := fmt.Sprintf("corners[%d].", i)
		switch {
		case c.SpringRate != 0 && c.WheelRate != 0:
			p.add(f+"wheel_rate_n_per_m", "give one of wheel rate or spring rate (with spring_motion_ratio), not both: got wheel rate %s N/m and spring rate %s N/m", num(c.WheelRate), num(c.SpringRate))
		case c.SpringRate != 0 || c.WheelRate == 0:
			p.in(f+"spring_rate_n_per_m", c.SpringRate, "Corner.spring_rate_n_per_m")
			p.in(f+"spring_motion_ratio", c.SpringMotionRatio, "Corner.motion_ratio")
		default:
			p.in(f+"wheel_rate_n_per_m", c.WheelRate, "Corner.wheel_rate_n_per_m")
		}
		p.in(f+"damper_motion_ratio", c.DamperMotionRatio, "Corner.motion_ratio")
		p.in(f+"unsprung_mass_kg", c.UnsprungMass, "Corner.unsprung_mass_kg")
		p.in(f+"tyre_rate_n_per_m", c.TyreRate, "Corner.tyre_rate_n_per_m")
		p.in(f+"tyre_damping_n_s_per_m", c.TyreDamping, "Corner.tyre_damping_n_s_per_m")
		p.in(f+"tyre_envelope_length_m", c.TyreEnvelopeLength, "Corner.tyre_envelope_length_m")
		if c.TyreDamping > 0 && c.TyreEnvelopeLength == 0 {
			p.add(f+"tyre_envelope_length_m", "must be > 0 when tyre damping is set: without it the tyre-force variance on an ISO 8608 road is infinite")
		}
		p.in(f+"bump_stop_gap_m", c.BumpStopGap, "Corner.bump_stop_gap_m")
		c.BumpStop.validate(&p, f+"bump_stop.", c.BumpStopGap)
		p.inOrZero(f+"sprung_load_n", c.SprungLoad, "Corner.sprung_load_n")
		if c.SprungLoad != 0 {
			given++
		}
	}
	for ax := 0; ax < 2; ax++ {
		if v.Corners[2*ax].TyreEnvelopeLength != v.Corners[2*ax+1].TyreEnvelopeLength {
			p.add(fmt.Sprintf("corners[%d].tyre_envelope_length_m", 2*ax+1), "must equal the left tyre's on the same axle (%g m)", v.Corners[2*ax].TyreEnvelopeLength)
		}
	}
	if given != 0 && given != 4 {
		p.add("corners.sprung_load_n", "give the sprung load of all four corners or of none, got %d of 4", given)
	}
	for ax, b := range v.AntiRoll {
		f := fmt.Sprintf("anti_roll[%d].", ax)
		switch {
		case b.BarRate != 0 && b.WheelRate != 0:
			p.add(f+"wheel_rate_n_per_m", "give one of the bar's wheel rate or its bar rate (with motion_ratio), not both: got wheel rate %s N/m and bar rate %s N/m", num(b.WheelRate), num(b.BarRate))
		case b.BarRate != 0:
			p.in(f+"bar_rate_n_per_m", b.BarRate, "AntiRollBar.bar_rate_n_per_m")
			p.in(f+"motion_ratio", b.MotionRatio, "AntiRollBar.motion_ratio")
		default:
			p.in(f+"wheel_rate_n_per_m", b.WheelRate, "AntiRollBar.wheel_rate_n_per_m")
		}
	}
	for ax := 0; ax < 2; ax++ {
		p.inOrZero(fmt.Sprintf("rest_ride_height_m[%d]", ax), v.RestRideHeight[ax], "Vehicle.rest_ride_height_m")
	}
	v.Aero.validate(&p, "aero.", v.RestRideHeight)
	for ax := range v.Heave {
		v.Heave[ax].validate(&p, fmt.Sprintf("heave[%d].", ax))
	}
	v.validateReferencePoints(&p)
	v.LoadPaths.validate(&p, "load_paths.")
	return p.err()
}
