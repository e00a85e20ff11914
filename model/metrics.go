package model

import (
	"errors"
	"fmt"
	"math"
)

// CaseMetrics are the ride metrics of one setup on one road case. Standard
// deviations are of the dynamic part about the mean; shifts are the mean
// changes from the operating point at speed (AtSpeed) caused by
// asymmetric dampers ("jacking").
type CaseMetrics struct {
	Case string // road case name

	// AtSpeed is the car's operating point at the case's speed: ride
	// heights, pitch, compression and bump-stop gaps left under
	// downforce. The probabilities below start from it.
	AtSpeed OperatingPoint

	TyreLoadSD         [4]float64 // dynamic tyre load standard deviation (N)
	StaticTyreLoad     [4]float64 // static tyre load at the operating point, weight and downforce (N)
	TyreLoadSDRel      [4]float64 // TyreLoadSD / StaticTyreLoad (-)
	LiftOffProbability [4]float64 // P(dynamic load < -static load), Gaussian (-)

	RideHeightSD [2]float64 // ride height relative to the road, front, rear (m)
	PitchSD      float64    // pitch relative to the road (rad)
	RollSD       float64    // roll relative to the road (rad)
	HeaveAccelSD float64    // heave acceleration of the sprung CG (m/s²)

	TravelSD            [4]float64 // suspension travel at the wheel (m)
	BumpStopProbability [4]float64 // P(travel > bump-stop gap left at speed), Gaussian, incl. mean shift; 0 when no gap given (-)

	DamperVelocitySD  [4]float64 // damper velocity at the damper (m/s)
	EquivalentDamping [4]float64 // c_eq at the wheel at the fixed point (N s/m)
	MeanDamperForce   [4]float64 // mean damper force at the damper, + pushes apart (N)
	// ModalDampingRatio is the modal damping ratio of each undamped mode
	// (ModeNames order) with the dampers at their equivalent slopes (-).
	ModalDampingRatio [nDOF]float64

	// Heave elements, per axle (0 where the axle has none): the element's
	// travel and velocity standard deviations at the element, the heave
	// damper's c_eq on the axle's mean wheel travel, and the packer
	// contact probability P(element travel > packer gap left at speed),
	// Gaussian, incl. the mean shift (0 when no packer gap is given).
	HeaveTravelSD          [2]float64 // (m)
	HeaveVelocitySD        [2]float64 // (m/s)
	HeaveEquivalentDamping [2]float64 // (N s/m)
	PackerProbability      [2]float64 // (-)

	RideHeightShift [2]float64 // mean ride-height change, front, rear, + up (m)
	PitchShift      float64    // mean pitch change, + nose up (rad)
	TravelShift     [4]float64 // mean travel change, + bump (m)

	// The platform as the aero sees it (see ReferencePoint and
	// newPlatformRows): the covariance of the front and rear ride heights
	// relative to the road (m²); the total downforce's standard deviation
	// and mean change from jacking (N), from the aero map linearised at
	// the operating point, dD = -1ᵀ K_a dh; the aero balance's (front
	// share of the downforce) standard deviation and mean change from
	// jacking (-), 0 without downforce.
	RideHeightCovariance float64
	DownforceSD          float64
	DownforceShift       float64
	BalanceSD            float64
	BalanceShift         float64

	// Points holds the figures of the vehicle's reference points, the
	// first NumPoints of them (ReferencePoints gives them as a slice).
	Points    [MaxReferencePoints]PointMetrics
	NumPoints int

	Iterations int      // fixed-point iterations of the linearisation
	Warnings   Warnings // validity flags
}

// Warnings flags where the linear model's assumptions are stretched.
type Warnings uint32

const (
	// WarnLiftOff: some tyre's lift-off probability exceeds the threshold.
	WarnLiftOff Warnings = 1 << iota
	// WarnBumpStop: some corner's bump-stop contact probability exceeds
	// the threshold.
	WarnBumpStop
	// WarnFloorContact: some reference point's ground-contact probability
	// exceeds the threshold.
	WarnFloorContact
	// WarnPacker: some axle's packer contact probability exceeds the
	// threshold.
	WarnPacker
)

// Strings returns readable warnings for a case's flags.
func (m *CaseMetrics) WarningStrings(threshold float64) []string {
	var out []string
	for i := 0; i < 4; i++ {
		if m.Warnings&WarnLiftOff != 0 && m.LiftOffProbability[i] > threshold {
			out = append(out, fmt.Sprintf("%s: %s tyre lift-off probability %.1f%% exceeds %.1f%%: the linear model does not hold; run the time-domain check",
				m.Case, CornerNames[i], 100*m.LiftOffProbability[i], 100*threshold))
		}
	}
	for i := 0; i < 4; i++ {
		if m.Warnings&WarnBumpStop != 0 && m.BumpStopProbability[i] > threshold {
			out = append(out, fmt.Sprintf("%s: %s bump-stop contact probability %.1f%% exceeds %.1f%%: the linear model does not hold; run the time-domain check",
				m.Case, CornerNames[i], 100*m.BumpStopProbability[i], 100*threshold))
		}
	}
	for ax := 0; ax < 2; ax++ {
		if m.Warnings&WarnPacker != 0 && m.PackerProbability[ax] > threshold {
			out = append(out, fmt.Sprintf("%s: %s heave packer contact probability %.1f%% exceeds %.1f%%: the linear model does not hold; run the time-domain check",
				m.Case, AxleNames[ax], 100*m.PackerProbability[ax], 100*threshold))
		}
	}
	for _, p := range m.ReferencePoints() {
		if m.Warnings&WarnFloorContact != 0 && p.ContactProbability > threshold {
			out = append(out, fmt.Sprintf("%s: reference point %q ground-contact probability %.1f%% exceeds %.1f%%: the linear model does not hold",
				m.Case, p.Name, 100*p.ContactProbability, 100*threshold))
		}
	}
	return out
}

// ErrNonFinite is wrapped by the error returned when an evaluation gives
// a NaN or infinite metric: a result that must not be reported or stored.
var ErrNonFinite = errors.New("model: evaluation gave a non-finite value")

// checkFinite returns an error wrapping ErrNonFinite that names the first
// NaN or infinite metric of m, or nil.
func (m *CaseMetrics) checkFinite() error {
	// Fast path, allocation-free: a NaN or an infinity makes the sum of
	// the values' products with 0 NaN; finite values give 0.
	sum := m.PitchSD*0 + m.RollSD*0 + m.HeaveAccelSD*0 + m.PitchShift*0
	for _, a := range [...]*[4]float64{&m.TyreLoadSD, &m.StaticTyreLoad, &m.TyreLoadSDRel, &m.LiftOffProbability,
		&m.TravelSD, &m.BumpStopProbability, &m.DamperVelocitySD, &m.EquivalentDamping, &m.MeanDamperForce, &m.TravelShift} {
		for _, v := range a {
			sum += v * 0
		}
	}
	sum += m.RideHeightSD[0]*0 + m.RideHeightSD[1]*0 + m.RideHeightShift[0]*0 + m.RideHeightShift[1]*0
	for _, a := range [...]*[2]float64{&m.HeaveTravelSD, &m.HeaveVelocitySD, &m.HeaveEquivalentDamping, &m.PackerProbability} {
		sum += a[0]*0 + a[1]*0
	}
	sum += m.RideHeightCovariance*0 + m.DownforceSD*0 + m.DownforceShift*0 + m.BalanceSD*0 + m.BalanceShift*0
	for _, p := range m.ReferencePoints() {
		sum += p.HeightAtSpeed*0 + p.Shift*0 + p.SD*0 + p.ContactProbability*0
	}
	if sum == 0 {
		return nil
	}
	for _, f := range [...]struct {
		name string
		v    []float64
	}{
		{"tyre_load_sd_n", m.TyreLoadSD[:]}, {"static_tyre_load_n", m.StaticTyreLoad[:]},
		{"tyre_load_sd_rel", m.TyreLoadSDRel[:]}, {"lift_off_probability", m.LiftOffProbability[:]},
		{"ride_height_sd_m", m.RideHeightSD[:]}, {"pitch_sd_rad", []float64{m.PitchSD}},
		{"roll_sd_rad", []float64{m.RollSD}}, {"heave_accel_sd_m_per_s2", []float64{m.HeaveAccelSD}},
		{"travel_sd_m", m.TravelSD[:]}, {"bump_stop_probability", m.BumpStopProbability[:]},
		{"damper_velocity_sd_m_per_s", m.DamperVelocitySD[:]}, {"equivalent_damping_n_s_per_m", m.EquivalentDamping[:]},
		{"mean_damper_force_n", m.MeanDamperForce[:]}, {"ride_height_shift_m", m.RideHeightShift[:]},
		{"pitch_shift_rad", []float64{m.PitchShift}}, {"travel_shift_m", m.TravelShift[:]},
		{"heave_travel_sd_m", m.HeaveTravelSD[:]}, {"heave_velocity_sd_m_per_s", m.HeaveVelocitySD[:]},
		{"heave_equivalent_damping_n_s_per_m", m.HeaveEquivalentDamping[:]}, {"packer_probability", m.PackerProbability[:]},
		{"ride_height_covariance_m2", []float64{m.RideHeightCovariance}},
		{"downforce_sd_n", []float64{m.DownforceSD}}, {"downforce_shift_n", []float64{m.DownforceShift}},
		{"balance_sd", []float64{m.BalanceSD}}, {"balance_shift", []float64{m.BalanceShift}},
		{"reference_points.height_at_speed_m", pointValues(m, func(p *PointMetrics) float64 { return p.HeightAtSpeed })},
		{"reference_points.shift_m", pointValues(m, func(p *PointMetrics) float64 { return p.Shift })},
		{"reference_points.sd_m", pointValues(m, func(p *PointMetrics) float64 { return p.SD })},
		{"reference_points.contact_probability", pointValues(m, func(p *PointMetrics) float64 { return p.ContactProbability })},
	} {
		for i, v := range f.v {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%w: road case %q: %s[%d] is %v; check the inputs for values out of scale", ErrNonFinite, m.Case, f.name, i, v)
			}
		}
	}
	return nil
}

// pointValues lists one figure of every reference point of m.
func pointValues(m *CaseMetrics, f func(*PointMetrics) float64) []float64 {
	out := make([]float64, m.NumPoints)
	for i := range out {
		out[i] = f(&m.Points[i])
	}
	return out
}

// Result is the evaluation of one setup over all road cases.
type Result struct {
	Setup Setup
	Cases []CaseMetrics
	// Transients are the metrics of the manoeuvre and kerb cases, in the
	// evaluator's order (see Evaluator.SetTransientCases).
	Transients []TransientMetrics
}
