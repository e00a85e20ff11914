package main

import (
	"fmt"
	"math"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// Every conversion from the SI values of the API to the trade units of the
// printed tables is in this file, and only here. CSV and JSON outputs stay
// SI, with the unit in each column's name.
//
//	length, ride height, travel   m     -> mm       x 1000
//	velocity (damper, knee)       m/s   -> mm/s     x 1000
//	damper slope                  N s/m -> N s/mm   / 1000
//	rate (spring, wheel, tyre)    N/m   -> N/mm     / 1000
//	relative load, probability    -     -> %        x 100
//	angle                         rad   -> deg      x 180/pi
//	acceleration                  m/s^2 -> g        / 9.80665
//	force                         N     -> N        (unchanged)
const (
	mmPerM     = 1000.0
	percent    = 100.0
	degPerRad  = 180 / math.Pi
	gravitySI  = 9.80665 // standard acceleration of gravity, m/s^2 (3rd CGPM, 1901)
	nsPerMmSI  = 1000.0  // N s/m per N s/mm
	nPerMmSI   = 1000.0  // N/m per N/mm
	mmPerSPerM = 1000.0  // mm/s per m/s
)

// fromMmPerS converts mm/s (a flag's unit) to m/s.
func fromMmPerS(v float64) float64 { return v / mmPerSPerM }

// pct converts a fraction to per cent.
func pct(x float64) float64 { return x * percent }

// quantity says how one value is named and shown: in tables (label, trade
// unit, scale from SI, decimals) and in CSV/JSON (column, SI).
type quantity struct {
	label  string  // table header
	unit   string  // trade unit of the table
	scale  float64 // trade value = SI value x scale
	prec   int     // decimals in tables
	column string  // CSV/JSON column name, SI unit suffixed
}

// trade returns the table value of an SI value.
func (q quantity) trade(si float64) float64 { return si * q.scale }

// header is the table column header, "label unit".
func (q quantity) header() string {
	if q.unit == "" {
		return q.label
	}
	return q.label + " " + q.unit
}

// objectiveQuantity is how an objective is shown.
func objectiveQuantity(k pb.ObjectiveKind) quantity {
	switch k {
	case pb.ObjectiveKind_OBJECTIVE_KIND_GRIP:
		return quantity{"grip", "% static", percent, 2, "grip_rel"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM:
		return quantity{"platform", "mm", mmPerM, 3, "platform_m"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_FRONT_PLATFORM:
		return quantity{"front platform", "mm", mmPerM, 3, "front_platform_m"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_REAR_PLATFORM:
		return quantity{"rear platform", "mm", mmPerM, 3, "rear_platform_m"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_PITCH:
		return quantity{"pitch", "deg", degPerRad, 4, "pitch_rad"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_ROLL:
		return quantity{"roll", "deg", degPerRad, 4, "roll_rad"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_HEAVE_ACCEL:
		return quantity{"heave accel", "g", 1 / gravitySI, 4, "heave_accel_m_per_s2"}
	}
	name := strings.ToLower(strings.TrimPrefix(k.String(), "OBJECTIVE_KIND_"))
	return quantity{name, "", 1, 4, name}
}

// hypervolumeQuantity is the hypervolume in the product of the
// objectives' trade units, "% × mm" for grip and platform, as the
// hypervolume chart (api/plot) shows it.
func hypervolumeQuantity(objs []*pb.Objective) quantity {
	q := quantity{"hypervolume", "", 1, 4, "hypervolume"}
	units := make([]string, len(objs))
	for j, o := range objs {
		oq := objectiveQuantity(o.GetKind())
		q.scale *= oq.scale
		units[j] = strings.TrimSuffix(oq.unit, " static")
	}
	q.unit = strings.Join(units, " × ")
	return q
}

// hypervolumeText is a hypervolume with its unit, four significant digits.
func hypervolumeText(hv float64, objs []*pb.Objective) string {
	q := hypervolumeQuantity(objs)
	return strings.TrimSpace(fmt.Sprintf("%.4g %s", q.trade(hv), q.unit))
}

// constraintQuantity is how a constraint's limit and metric are shown.
func constraintQuantity(k pb.ConstraintKind) quantity {
	switch k {
	case pb.ConstraintKind_CONSTRAINT_KIND_LIFT_OFF:
		return quantity{"lift-off probability", "%", percent, 3, "lift_off_probability"}
	case pb.ConstraintKind_CONSTRAINT_KIND_BUMP_STOP:
		return quantity{"bump-stop probability", "%", percent, 3, "bump_stop_probability"}
	case pb.ConstraintKind_CONSTRAINT_KIND_TRAVEL:
		return quantity{"travel sd", "mm", mmPerM, 2, "travel_sd_m"}
	case pb.ConstraintKind_CONSTRAINT_KIND_JACKING:
		return quantity{"ride-height shift", "mm", mmPerM, 2, "ride_height_shift_m"}
	case pb.ConstraintKind_CONSTRAINT_KIND_MODAL_RATIO:
		return quantity{"modal ratio", "-", 1, 3, "modal_damping_ratio"}
	}
	name := strings.ToLower(strings.TrimPrefix(k.String(), "CONSTRAINT_KIND_"))
	return quantity{name, "", 1, 4, name}
}

// geneQuantity is how a searched variable is shown: knees (names ending
// in _m_per_s) in mm/s, ratios and factors as they are.
func geneQuantity(name string) quantity {
	label := strings.ReplaceAll(name, "_", " ")
	if strings.HasSuffix(name, "_m_per_s") {
		return quantity{strings.TrimSuffix(label, " m per s"), "mm/s", mmPerSPerM, 1, name}
	}
	return quantity{label, "", 1, 3, name}
}

// Fixed quantities of the metric and curve tables.
var (
	qLoadSDRel   = quantity{"load sd", "% static", percent, 2, "relative_tyre_load_sd"}
	qRideSD      = quantity{"ride sd", "mm", mmPerM, 3, "ride_height_sd_m"}
	qRideShift   = quantity{"ride shift", "mm", mmPerM, 3, "ride_height_shift_m"}
	qTravelSD    = quantity{"travel sd", "mm", mmPerM, 3, "travel_sd_m"}
	qDamperVelSD = quantity{"damper vel sd", "mm/s", mmPerSPerM, 1, "damper_velocity_sd_m_per_s"}
	qPitchSD     = quantity{"pitch sd", "deg", degPerRad, 4, "pitch_sd_rad"}
	qHeaveSD     = quantity{"heave accel sd", "g", 1 / gravitySI, 4, "heave_accel_sd_m_per_s2"}
	qProbability = quantity{"probability", "%", percent, 3, "probability"}
	qSlope       = quantity{"slope", "N s/mm", 1 / nsPerMmSI, 2, "slope_n_s_per_m"}
	qVelocity    = quantity{"velocity", "mm/s", mmPerSPerM, 0, "velocity_m_per_s"}
	qKnee        = quantity{"knee", "mm/s", mmPerSPerM, 0, "knee_m_per_s"}
	qForce       = quantity{"force", "N", 1, 0, "force_n"}

	// The hand method's per-corner table.
	qWheelRate    = quantity{"wheel rate", "N/mm", 1 / nPerMmSI, 1, "wheel_rate_n_per_m"}
	qTyreRate     = quantity{"tyre rate", "N/mm", 1 / nPerMmSI, 1, "tyre_rate_n_per_m"}
	qRideRate     = quantity{"ride rate", "N/mm", 1 / nPerMmSI, 1, "ride_rate_n_per_m"}
	qSprungMass   = quantity{"sprung mass", "kg", 1, 1, "sprung_mass_kg"}
	qMotionRatio  = quantity{"damper motion ratio", "", 1, 3, "damper_motion_ratio"}
	qRideFreq     = quantity{"ride frequency, no tyre", "Hz", 1, 2, "ride_frequency_hz"}
	qRideFreqTyre = quantity{"ride frequency, tyre", "Hz", 1, 2, "ride_frequency_with_tyre_hz"}
	qCritWheel    = quantity{"critical damping, wheel", "N s/mm", 1 / nsPerMmSI, 2, "critical_damping_wheel_n_s_per_m"}
	qCritDamper   = quantity{"critical damping, damper", "N s/mm", 1 / nsPerMmSI, 2, "critical_damping_damper_n_s_per_m"}
	qBranchSlope  = quantity{"slope", "N s/mm", 1 / nsPerMmSI, 2, "slope_n_s_per_m"}
)

// cornerShort are the corners' short names in table headers.
var cornerShort = map[pb.CornerPosition]string{
	pb.CornerPosition_CORNER_POSITION_FRONT_LEFT: "FL", pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT: "FR",
	pb.CornerPosition_CORNER_POSITION_REAR_LEFT: "RL", pb.CornerPosition_CORNER_POSITION_REAR_RIGHT: "RR",
}
