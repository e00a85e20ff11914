package model

import (
	"fmt"
	"math"
)

// The hand method: the first damper estimate a race engineer works out
// with a calculator, before any road or search. Per corner
//
//	c_crit,wheel  = 2 sqrt(k_w m_s)        (tyre ignored)
//	c_crit,damper = c_crit,wheel / MR²
//	c_damper      = ζ_target c_crit,damper (bump and rebound)
//	F_knee        = c_damper v_knee
//	c_high        = r c_damper             (above the knee)
//
// with k_w the wheel rate, m_s the sprung corner mass and MR the damper
// motion ratio (common practice, no single source). The ride rate puts
// the tyre in series with the wheel rate (Gillespie 1992, Fundamentals of
// Vehicle Dynamics, SAE, ch. 6):
//
//	k_ride = k_w k_t / (k_w + k_t),   f = sqrt(k / m_s) / (2π)
//
// with k = k_w (no tyre) or k_ride (tyre in series). Per axle, the heave
// ride rate puts a heave (third) spring in parallel with the two corner
// springs (Gillespie 1992, ride rate):
//
//	k_heave = 2 k_w + k3 MR3²,   f_heave = sqrt(k_heave / m_axle) / (2π)
//
// while the roll rate is the corner springs' and the bar's alone (the
// third spring does not stroke in roll).

// HandTargets are what the hand method needs besides the car: the target
// ratios, knees and high-speed factors (a Setup), the adjuster band as
// ratios, and the speed of the modal figures (which sets the aero
// stiffness; 0 is the car standing).
type HandTargets struct {
	Setup      Setup
	Adjustment Adjustment
	Speed      float64 // m/s
}

// Common-practice defaults of the hand method (no single source; the
// figures race engineers start from for a car on slicks, from memory).
const (
	HandBumpRatio       = 0.7  // target bump ratio at the wheel (-)
	HandReboundRatio    = 0.8  // target rebound ratio at the wheel (-)
	HandSoftestRatio    = 0.5  // adjuster band, softest click (-)
	HandStiffestRatio   = 1.2  // adjuster band, stiffest click (-)
	HandKnee            = 0.05 // knee velocity at the damper (m/s)
	HandHighSpeedFactor = 0.3  // high-speed slope over low-speed slope (-)
)

// DefaultHandTargets are the common-practice targets, alike on both axles.
func DefaultHandTargets() HandTargets {
	ax := AxleDamping{BumpRatio: HandBumpRatio, ReboundRatio: HandReboundRatio,
		KneeBump: HandKnee, KneeRebound: HandKnee,
		HighSpeedBump: HandHighSpeedFactor, HighSpeedRebound: HandHighSpeedFactor}
	return HandTargets{
		Setup: Setup{Axles: [2]AxleDamping{ax, ax}},
		Adjustment: Adjustment{BumpSoftest: HandSoftestRatio, BumpStiffest: HandStiffestRatio,
			ReboundSoftest: HandSoftestRatio, ReboundStiffest: HandStiffestRatio},
	}
}

// HandCorner is the hand method at one corner.
type HandCorner struct {
	Corner int
	// WheelRate, RideRate and TyreRate (N/m); SprungMass the sprung
	// corner mass (kg); DamperMotionRatio (-).
	WheelRate, RideRate, TyreRate, SprungMass, DamperMotionRatio float64
	// RideFrequencyHz is sqrt(k_w/m_s)/(2π), the tyre ignored;
	// RideFrequencyTyreHz uses the ride rate (tyre in series).
	RideFrequencyHz, RideFrequencyTyreHz float64
	// CriticalWheel and CriticalDamper are c_crit at the wheel and at
	// the damper (N s/m).
	CriticalWheel, CriticalDamper float64
	Bump, Rebound                 HandBranch
}

// HandBranch is one direction of one corner's damper at the component.
type HandBranch struct {
	Ratio          float64 // target ratio at the wheel (-)
	Slope          float64 // low-speed slope at the damper (N s/m)
	Knee           float64 // knee velocity at the damper (m/s); 0 = none
	KneeForce      float64 // force at the knee (N); at the top of the table without a knee: 0
	HighSpeedSlope float64 // slope above the knee (N s/m)
	// SoftestSlope and StiffestSlope are the adjuster band's low-speed
	// slopes (N s/m), SoftestKneeForce and StiffestKneeForce its forces
	// at the knee (N); all 0 without a band.
	SoftestSlope, StiffestSlope         float64
	SoftestKneeForce, StiffestKneeForce float64
}

// HandMode sets a body mode of the hand method beside the full car's.
type HandMode struct {
	Name string // heave, pitch or roll
	// HandFrequencyHz and HandRatio are the mode alone on the wheel rates
	// (and bars, in roll), tyres rigid, dampers at the mean target slope:
	// f = sqrt(K/J)/(2π), ζ = C/(2 sqrt(K J)), J the mass or inertia.
	HandFrequencyHz, HandRatio float64
	// TyreShare is the part of the body's motion the suspension takes
	// with the tyres in series, K_tyre/(K_susp + K_tyre) (-), and
	// TyreRatio the hand ratio it predicts, HandRatio·TyreShare^1.5 (the
	// damper strokes TyreShare of the motion on a rate TyreShare as stiff).
	TyreShare, TyreRatio float64
	Modal                Mode   // the same mode of the full car, tyres and wheels
	Reason               string // why the two differ, one line
}

// HandAxle is the hand method's heave figures of one axle.
type HandAxle struct {
	Axle int
	// HeaveRate is the axle's rate in heave at the wheels, corner springs
	// and heave spring (N/m); HeaveSpringRate the heave spring's share,
	// k3 MR3² (N/m; 0 without one); SprungMass the axle's sprung mass (kg).
	HeaveRate, HeaveSpringRate, SprungMass float64
	// HeaveFrequencyHz is sqrt(HeaveRate/SprungMass)/(2π), tyres rigid.
	HeaveFrequencyHz float64
	// HeaveMotionRatio is the heave element's motion ratio (-), 0 = none;
	// CriticalHeave and CriticalElement the axle's heave critical damping
	// on the mean wheel travel and at the element (N s/m, see
	// Vehicle.HeaveCriticalDamping).
	HeaveMotionRatio, CriticalHeave, CriticalElement float64
	// Bump and Rebound are the heave damper at the element from the
	// targets' Setup.Heave; zero without a heave damper target.
	Bump, Rebound HandBranch
}

// HandReport is the hand method for a car.
type HandReport struct {
	Targets HandTargets
	Corners [4]HandCorner
	Axles   [2]HandAxle
	Modes   [3]HandMode // heave, pitch, roll
}

// HandMethod works the hand method out for a car and targets.
func HandMethod(v *Vehicle, t HandTargets) (*HandReport, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.merge("targets.setup.", t.Setup.Validate())
	p.merge("targets.adjustment.", t.Adjustment.Validate())
	p.merge("targets.setup.", v.CheckSetup(&t.Setup))
	p.nonNegative("targets.speed_m_per_s", t.Speed)
	if err := p.err(); err != nil {
		return nil, err
	}
	r := &HandReport{Targets: t}
	cc := v.CriticalDamping()
	loads := v.SprungCornerLoads()
	band := t.Adjustment.band()
	for i := range r.Corners {
		c := v.Corners[i]
		a := t.Setup.Axles[i/2]
		kw, kt, ms := c.WheelRateOf(), c.TyreRate, loads[i]/Gravity
		kr := kw * kt / (kw + kt)
		mr2 := c.DamperMotionRatio * c.DamperMotionRatio
		hc := HandCorner{Corner: i, WheelRate: kw, RideRate: kr, TyreRate: kt, SprungMass: ms, DamperMotionRatio: c.DamperMotionRatio,
			RideFrequencyHz: math.Sqrt(kw/ms) / (2 * math.Pi), RideFrequencyTyreHz: math.Sqrt(kr/ms) / (2 * math.Pi),
			CriticalWheel: cc[i], CriticalDamper: cc[i] / mr2}
		hc.Bump, hc.Rebound = handBranches(a, t.Adjustment, hc.CriticalDamper, band)
		r.Corners[i] = hc
	}
	r.Axles = handAxles(v, &t)
	d := v.dampers(&t.Setup)
	var c [4]float64
	var heave [2]float64
	for i := range c {
		c[i] = (d[i].cb + d[i].cr) / 2
	}
	for ax := range heave {
		heave[ax] = (d[dampHeave+ax].cb + d[dampHeave+ax].cr) / 2
	}
	modal, err := ModesAtHeave(v, t.Speed, c, heave)
	if err != nil {
		return nil, err
	}
	if r.Modes, err = HandModesAtHeave(v, t.Speed, c, heave, modal); err != nil {
		return nil, err
	}
	return r, nil
}

// handBranches works out a damper's bump and rebound at the component
// from the target ratios a of the critical damping cc there (N s/m) and
// the adjuster band (when band).
func handBranches(a AxleDamping, adj Adjustment, cc float64, band bool) (bump, rebound HandBranch) {
	branch := func(ratio, knee, factor, soft, stiff float64) HandBranch {
		b := HandBranch{Ratio: ratio, Slope: ratio * cc, Knee: knee}
		b.KneeForce = b.Slope * knee
		b.HighSpeedSlope = factorOr1(factor) * b.Slope
		if band {
			b.SoftestSlope, b.StiffestSlope = soft*cc, stiff*cc
			b.SoftestKneeForce, b.StiffestKneeForce = b.SoftestSlope*knee, b.StiffestSlope*knee
		}
		return b
	}
	bump = branch(a.BumpRatio, a.KneeBump, a.HighSpeedBump, adj.BumpSoftest, adj.BumpStiffest)
	rebound = branch(a.ReboundRatio, a.KneeRebound, a.HighSpeedRebound, adj.ReboundSoftest, adj.ReboundStiffest)
	return bump, rebound
}

// handAxles works out each axle's heave rate, ride frequency and heave
// damper (see HandAxle).
func handAxles(v *Vehicle, t *HandTargets) [2]HandAxle {
	k, m, cc := v.AxleHeaveRate(), v.AxleSprungMass(), v.HeaveCriticalDamping()
	var out [2]HandAxle
	for ax := range out {
		h := v.Heave[ax]
		ha := HandAxle{Axle: ax, HeaveRate: k[ax], HeaveSpringRate: h.WheelRateOf(), SprungMass: m[ax],
			HeaveFrequencyHz: math.Sqrt(k[ax]/m[ax]) / (2 * math.Pi), HeaveMotionRatio: h.MotionRatio, CriticalHeave: cc[ax]}
		if h.has() {
			ha.CriticalElement = cc[ax] / (h.MotionRatio * h.MotionRatio)
			if a := t.Setup.Heave[ax]; a.given() {
				ha.Bump, ha.Rebound = handBranches(a, t.Adjustment, ha.CriticalElement, t.Adjustment.band())
			}
		}
		out[ax] = ha
	}
	return out
}

// HandModesAt works heave, pitch and roll out by hand at a speed with
// linear dampers of slopes c at the wheel (N s/m per corner, as ModesAt
// takes them), beside modal, the full car's modes at the same speed and
// slopes (ModesAt's result): a road case's modes at its equivalent slopes
// get their hand figures at the same slopes, so that what is left between
// the two is the tyres, the aero and the coupling (HandMode.Reason).
func HandModesAt(v *Vehicle, speed float64, c [4]float64, modal []Mode) ([3]HandMode, error) {
	return HandModesAtHeave(v, speed, c, [2]float64{}, modal)
}

// HandModesAtHeave is HandModesAt with heave dampers of slopes heave (N
// s/m on each axle's mean wheel travel, as ModesAtHeave takes them).
func HandModesAtHeave(v *Vehicle, speed float64, c [4]float64, heave [2]float64, modal []Mode) ([3]HandMode, error) {
	if len(modal) < 3 {
		panic("model: HandModesAt needs the heave, pitch and roll modes of ModesAt")
	}
	var p problems
	p.merge("vehicle.", v.Validate())
	if err := p.err(); err != nil {
		return [3]HandMode{}, err
	}
	op, err := v.operatingPoint(speed)
	if err != nil {
		return [3]HandMode{}, err
	}
	return handModes(v, c, heave, &op, modal), nil
}

// handModes works out heave, pitch and roll alone (tyres rigid) and with
// the tyres in series, beside the full car's modes, dampers of slopes c
// at the wheel and heave dampers of slopes heave on the axles' mean wheel
// travel.
func handModes(v *Vehicle, wheel [4]float64, heave [2]float64, op *OperatingPoint, modal []Mode) [3]HandMode {
	inertia := [3]float64{v.SprungMass, v.PitchInertia, v.RollInertia}
	var susp, tyre, damp [3]float64
	for i := 0; i < 4; i++ {
		x, y := v.cornerPosition(i)
		lever := [3]float64{1, x * x, y * y}
		kw, kt, c := v.Corners[i].WheelRateOf(), v.Corners[i].TyreRate, wheel[i]
		for j := range lever {
			susp[j] += kw * lever[j]
			tyre[j] += kt * lever[j]
			damp[j] += c * lever[j]
		}
	}
	track := [2]float64{v.TrackFront, v.TrackRear}
	axleX := [2]float64{v.CGToFrontAxle, -v.CGToRearAxle}
	for ax := 0; ax < 2; ax++ {
		// Energy ½ (k_bar/2)(s_L - s_R)² with s_L - s_R = t φ in roll.
		susp[ModeRoll] += v.AntiRoll[ax].WheelRateOf() * track[ax] * track[ax] / 2
		// Heave element: the axle's mean travel is z in heave, x_a θ in
		// pitch, nothing in roll.
		k3, c3 := v.Heave[ax].WheelRateOf(), heave[ax]
		susp[ModeHeave] += k3
		susp[ModePitch] += k3 * axleX[ax] * axleX[ax]
		damp[ModeHeave] += c3
		damp[ModePitch] += c3 * axleX[ax] * axleX[ax]
	}
	// The aero stiffness at the operating point, a negative spring the
	// hand figures leave out: on heave, and at the axles' levers on pitch.
	var aero [3]float64
	lever := [2]float64{v.CGToFrontAxle, -v.CGToRearAxle}
	for a := 0; a < 2; a++ {
		for b := 0; b < 2; b++ {
			aero[ModeHeave] += op.AeroStiffness[a][b]
			aero[ModePitch] += op.AeroStiffness[a][b] * lever[a] * lever[b]
		}
	}
	speed := op.Speed
	var out [3]HandMode
	for j := range out {
		k, c, m := susp[j], damp[j], inertia[j]
		share := tyre[j] / (susp[j] + tyre[j])
		hm := HandMode{Name: ModeNames[j], HandFrequencyHz: math.Sqrt(k/m) / (2 * math.Pi), HandRatio: c / (2 * math.Sqrt(k*m)),
			TyreShare: share, Modal: modal[j]}
		hm.TyreRatio = hm.HandRatio * math.Pow(share, 1.5)
		hm.Reason = handReason(&hm, aero[j]/susp[j], speed)
		out[j] = hm
	}
	return out
}

// handReason says in one line why the full car's modal ratio differs from
// the hand figure.
func handReason(h *HandMode, aero, speed float64) string {
	why := fmt.Sprintf("the tyres in series leave the dampers %.0f%% of the body's motion (hand ratio x share^1.5 = %.2f)", 100*h.TyreShare, h.TyreRatio)
	if aero != 0 {
		why += fmt.Sprintf("; the aero at %g m/s takes %.0f%% off the suspension's stiffness here (not in the hand figure)", speed, 100*aero)
	}
	rest := h.Modal.DampingRatio - h.TyreRatio
	if math.Abs(rest) > 0.1*h.Modal.DampingRatio {
		why += fmt.Sprintf("; coupling with the other modes, the wheels and the aero moves it %+.2f more", rest)
	}
	return why
}

// band reports whether the adjustment gives a band in both directions.
func (a Adjustment) band() bool { return a.BumpStiffest > 0 && a.ReboundStiffest > 0 }
