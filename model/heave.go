package model

import (
	"fmt"
	"math"
)

// HeaveElement is one axle's heave (third) spring and damper: an element
// between the body and the axle's two wheels that strokes with the axle's
// mean wheel travel u = (s_L + s_R)/2 through its own motion ratio MR3
// (element travel = MR3·u), so it works in heave and pitch and not in
// roll. A spring of rate k3 at the element stores ½ k3 MR3² u² =
// ½ (k3 MR3²/4)(s_L + s_R)²: it adds k3 MR3²/4 to each entry of the
// axle's 2×2 block of the travel stiffness (both wheels coupled), and in
// pure heave (s_L = s_R) the axle's rate at the wheels is
// 2 k_w + k3 MR3² (Gillespie 1992, Fundamentals of Vehicle Dynamics, SAE,
// ch. 6, ride rate, the third spring in parallel with the corner springs).
//
// Its damper is set in Setup.Heave as a ratio of the axle's heave
// critical damping (Vehicle.HeaveCriticalDamping) and referred to the
// mean wheel travel the way a corner damper is referred to its wheel:
// slope c_u = c_element·MR3², velocity at the element MR3·u̇.
//
// The packer is the element's bump stop: contact once the element has
// stroked PackerGap from the car at rest. At speed the downforce uses part
// of the gap (OperatingPoint.PackerGap), and the contact probability is
// the Gaussian tail of the element travel from there.
type HeaveElement struct {
	// MotionRatio is element travel per mean wheel travel of the axle
	// (-); 0 means no heave element on the axle (and every other field
	// must be 0).
	MotionRatio float64
	// SpringRate is the heave spring's rate at the element (N/m); 0 is a
	// heave damper without a spring.
	SpringRate float64
	// PackerGap is the element travel in bump from the car at rest to
	// packer contact (m); 0 means no packer.
	PackerGap float64
	// PackerRate is the packer's rate at the element once in contact
	// (N/m), used by the time-domain check; 0 counts the contact only.
	PackerRate float64
}

// has reports whether the axle has a heave element.
func (h *HeaveElement) has() bool { return h.MotionRatio > 0 }

// WheelRateOf is the heave spring's rate referred to the axle's mean
// wheel travel, k3·MR3² (N/m).
func (h *HeaveElement) WheelRateOf() float64 { return h.SpringRate * h.MotionRatio * h.MotionRatio }

func (h *HeaveElement) validate(p *problems, prefix string) {
	if h.MotionRatio == 0 {
		if h.SpringRate != 0 || h.PackerGap != 0 || h.PackerRate != 0 {
			p.add(prefix+"motion_ratio", "must be given (> 0) for a heave spring or packer; leave the heave element empty for an axle without one")
		}
		return
	}
	p.in(prefix+"motion_ratio", h.MotionRatio, "HeaveElement.motion_ratio")
	p.in(prefix+"spring_rate_n_per_m", h.SpringRate, "HeaveElement.spring_rate_n_per_m")
	p.in(prefix+"packer_gap_m", h.PackerGap, "HeaveElement.packer_gap_m")
	p.inOrZero(prefix+"packer_rate_n_per_m", h.PackerRate, "HeaveElement.packer_rate_n_per_m")
	if h.PackerRate != 0 && h.PackerGap == 0 {
		p.add(prefix+"packer_gap_m", "must be > 0 when a packer rate is given")
	}
}

// hasHeave reports whether any axle has a heave element.
func (v *Vehicle) hasHeave() bool { return v.Heave[Front].has() || v.Heave[Rear].has() }

// AxleHeaveRate is each axle's rate in heave at the wheels (N/m): force
// per metre of mean wheel travel with both wheels moving together,
// k_w,L + k_w,R + k3 MR3² (the bar does nothing in parallel travel;
// Gillespie 1992, ride rate).
func (v *Vehicle) AxleHeaveRate() [2]float64 {
	var out [2]float64
	for ax := range out {
		out[ax] = v.Corners[2*ax].WheelRateOf() + v.Corners[2*ax+1].WheelRateOf() + v.Heave[ax].WheelRateOf()
	}
	return out
}

// AxleSprungMass is each axle's sprung mass, its two corners' sprung
// loads over g (kg).
func (v *Vehicle) AxleSprungMass() [2]float64 {
	loads := v.SprungCornerLoads()
	return [2]float64{(loads[FL] + loads[FR]) / Gravity, (loads[RL] + loads[RR]) / Gravity}
}

// HeaveCriticalDamping is each axle's heave critical damping referred to
// its mean wheel travel (N s/m),
//
//	c_crit,heave = 2 sqrt(k_heave m_axle)
//
// with k_heave the axle's heave rate at the wheels (AxleHeaveRate: corner
// springs and heave spring) and m_axle its sprung mass: the critical
// damping 2 sqrt(k m) of the axle's sprung mass bouncing on its heave
// rate alone, tyre ignored (the single-degree-of-freedom definition, e.g.
// Thomson & Dahleh, Theory of Vibration with Applications, 5th ed. 1998,
// §2.3; applied to the axle as the corner's c_crit is, common practice).
// The heave damper's slope at the mean wheel travel is
// ζ_heave·c_crit,heave, and at the element c_crit,heave·ζ_heave/MR3².
// The corner dampers keep their own reference (CriticalDamping).
func (v *Vehicle) HeaveCriticalDamping() [2]float64 {
	k, m := v.AxleHeaveRate(), v.AxleSprungMass()
	return [2]float64{2 * math.Sqrt(k[Front]*m[Front]), 2 * math.Sqrt(k[Rear]*m[Rear])}
}

// heaveDampers converts the setup's heave dampers to dampers on each
// axle's mean wheel travel (zero slopes where the setup gives none).
func (v *Vehicle) heaveDampers(s *Setup) [2]wheelDamper {
	cc := v.HeaveCriticalDamping()
	var out [2]wheelDamper
	for ax := range out {
		if a := &s.Heave[ax]; a.given() && v.Heave[ax].has() {
			out[ax] = a.axleDamper(a.BumpRatio*cc[ax], a.ReboundRatio*cc[ax], v.Heave[ax].MotionRatio)
		}
	}
	return out
}

// dampers are the corner dampers (indices 0..3) and the heave dampers
// (nCorner+axle) of a setup, each referred to its coordinate (the
// wheel's travel, the axle's mean wheel travel).
func (v *Vehicle) dampers(s *Setup) [nDamp]wheelDamper {
	var out [nDamp]wheelDamper
	w := v.wheelDampers(s)
	copy(out[:4], w[:])
	h := v.heaveDampers(s)
	copy(out[4:], h[:])
	return out
}

// CheckSetup reports a setup that does not fit the car: a heave damper
// on an axle without a heave element, each named as Setup.Validate names
// its fields.
func (v *Vehicle) CheckSetup(s *Setup) error {
	var p problems
	for ax := range s.Heave {
		if s.Heave[ax].given() && !v.Heave[ax].has() {
			p.add(fmt.Sprintf("heave[%d]", ax), "a heave damper is set on the %s axle, but the vehicle has no heave element there (vehicle.heave[%d].motion_ratio)", AxleNames[ax], ax)
		}
	}
	return p.err()
}

// heaveGeometry returns, per axle, the heave element's motion ratio when
// the axle has one (0 otherwise).
func (v *Vehicle) heaveRatios() [2]float64 {
	return [2]float64{v.Heave[Front].MotionRatio, v.Heave[Rear].MotionRatio}
}
