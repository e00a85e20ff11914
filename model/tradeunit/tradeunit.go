// Package tradeunit is the one table of the trade units in which dampfront
// shows its SI values to engineers: the command line's tables, the job
// page and the charts all take their units, scales, decimals and names
// from here. Values stay SI everywhere else (the model, the API, CSV and
// JSON outputs, with the unit in each column's name); a value is
// converted only where it is shown, with Unit.Of:
//
//	relative tyre load, grip    -      -> % of static     x 100
//	probability, time fraction  -      -> %               x 100
//	length, ride height, travel m      -> mm              x 1000
//	velocity (damper, knee)     m/s    -> mm/s            x 1000
//	damper slope                N s/m  -> N s/mm          / 1000
//	angle (pitch, roll)         rad    -> deg             x 180/π
//	acceleration                m/s²   -> g               / 9.80665
//	force                       N      -> N
//	ride-height PSD             m²/Hz  -> mm²/Hz          x 10⁶
package tradeunit

import (
	"math"
	"strconv"
	"strings"

	"dampfront/model"
)

// Unit is a trade unit and its scale from SI.
type Unit struct {
	Symbol string // as a table writes it: "mm", "% static"; "" when dimensionless
	// Axis is how a chart's axis writes it when that differs from Symbol
	// ("% of static load"); "" means Symbol.
	Axis  string
	Scale float64 // trade value = SI value × Scale
}

// Of converts an SI value to the unit.
func (u Unit) Of(si float64) float64 { return si * u.Scale }

// SI converts a value in the unit (a flag's, say) to SI.
func (u Unit) SI(v float64) float64 { return v / u.Scale }

// AxisSymbol is the unit as a chart's axis writes it.
func (u Unit) AxisSymbol() string {
	if u.Axis != "" {
		return u.Axis
	}
	return u.Symbol
}

// The trade units. The scales are constant expressions, so each is the
// double nearest its exact value.
var (
	None                = Unit{Scale: 1}
	Percent             = Unit{Symbol: "%", Scale: 100}
	PercentStatic       = Unit{Symbol: "% static", Axis: "% of static load", Scale: 100}
	Millimetre          = Unit{Symbol: "mm", Scale: 1000}
	MillimetrePerSecond = Unit{Symbol: "mm/s", Scale: 1000}
	NewtonSecondPerMM   = Unit{Symbol: "N s/mm", Scale: 1 / 1000.0}
	Degree              = Unit{Symbol: "deg", Scale: 180 / math.Pi}
	Gravity             = Unit{Symbol: "g", Scale: 1 / model.Gravity}
	Newton              = Unit{Symbol: "N", Scale: 1}
	NewtonPerMM         = Unit{Symbol: "N/mm", Scale: 1 / 1000.0}
	Hertz               = Unit{Symbol: "Hz", Scale: 1}
	Kilogram            = Unit{Symbol: "kg", Scale: 1}
	Millisecond         = Unit{Symbol: "ms", Scale: 1000}
	// Dimensionless is a ratio shown as it is, with "-" for its unit.
	Dimensionless = Unit{Symbol: "-", Scale: 1}
	// MillimetreSquaredPerHertz is a ride-height PSD's unit (m²/Hz in SI).
	MillimetreSquaredPerHertz = Unit{Symbol: "mm²/Hz", Scale: 1000 * 1000}
)

// Quantity says how one value is named and shown.
type Quantity struct {
	Label  string // in a table's header, lower case: "grip", "front platform"
	Title  string // on a chart's axis: "Grip: tyre load variation"
	Unit   Unit
	Prec   int    // decimals in a table
	Column string // CSV/JSON column, SI, its unit in the name
}

// Objective is how an objective is shown. A kind the table does not know
// is shown in SI under its name.
func Objective(k model.ObjectiveKind) Quantity {
	return lookup(objectives, k)
}

// objectives is the table of Objective.
var objectives = map[model.ObjectiveKind]Quantity{
	model.ObjectiveGrip:          {"grip", "Grip: tyre load variation", PercentStatic, 2, "grip_rel"},
	model.ObjectivePlatform:      {"platform", "Platform: ride-height variation", Millimetre, 3, "platform_m"},
	model.ObjectiveFrontPlatform: {"front platform", "Front platform: ride-height variation", Millimetre, 3, "front_platform_m"},
	model.ObjectiveRearPlatform:  {"rear platform", "Rear platform: ride-height variation", Millimetre, 3, "rear_platform_m"},
	model.ObjectivePitch:         {"pitch", "Pitch variation", Degree, 4, "pitch_rad"},
	model.ObjectiveRoll:          {"roll", "Roll variation", Degree, 4, "roll_rad"},
	model.ObjectiveHeaveAccel:    {"heave accel", "Heave acceleration", Gravity, 4, "heave_accel_m_per_s2"},
	model.ObjectiveDownforce:     {"downforce", "Downforce variation", Newton, 1, "downforce_n"},
	model.ObjectiveBalance:       {"balance", "Aero balance variation", Percent, 3, "balance"},

	model.ObjectiveDriverResponse:   {"driver response", "Driver response: attitude off quasi-static", Percent, 2, "driver_response"},
	model.ObjectiveTransientBalance: {"transient balance", "Transient balance: LLTD deviation", Percent, 2, "transient_balance"},
	model.ObjectiveKerbLoadLoss:     {"kerb load loss", "Kerb load loss", Millisecond, 1, "kerb_load_loss_s"},
}

// lookup is k's row of table, or for a kind the table does not know its
// name in SI.
func lookup[K interface {
	comparable
	String() string
}](table map[K]Quantity, k K) Quantity {
	if q, ok := table[k]; ok {
		return q
	}
	name := k.String()
	label := strings.ReplaceAll(name, "_", " ")
	return Quantity{label, capitalise(label), Unit{Symbol: "SI", Scale: 1}, 4, name}
}

// Hypervolume is the unit of a hypervolume of objectives of these kinds:
// the product of their units ("% × mm" for grip and platform, grip in
// plain per cent) and of their scales.
func Hypervolume(kinds []model.ObjectiveKind) Unit {
	u := Unit{Scale: 1}
	symbols := make([]string, len(kinds))
	for j, k := range kinds {
		q := Objective(k)
		u.Scale *= q.Unit.Scale
		symbols[j] = q.Unit.Symbol
		if q.Unit == PercentStatic {
			symbols[j] = Percent.Symbol
		}
	}
	u.Symbol = strings.Join(symbols, " × ")
	return u
}

// Constraint is how a constraint's limit and metric are shown.
func Constraint(k model.ConstraintKind) Quantity {
	return lookup(constraints, k)
}

// constraints is the table of Constraint.
var constraints = map[model.ConstraintKind]Quantity{
	model.ConstraintLiftOff:      {"lift-off probability", "Lift-off probability", Percent, 3, "lift_off_probability"},
	model.ConstraintBumpStop:     {"bump-stop probability", "Bump-stop probability", Percent, 3, "bump_stop_probability"},
	model.ConstraintTravel:       {"travel sd", "Travel sd", Millimetre, 2, "travel_sd_m"},
	model.ConstraintJacking:      {"ride-height shift", "Ride-height shift", Millimetre, 2, "ride_height_shift_m"},
	model.ConstraintModalRatio:   {"modal ratio", "Modal ratio", Dimensionless, 3, "modal_damping_ratio"},
	model.ConstraintFloorContact: {"floor-contact probability", "Floor-contact probability", Percent, 3, "floor_contact_probability"},
	model.ConstraintUnloadedTime: {"unloaded time", "Time unloaded", Millisecond, 1, "unloaded_time_s"},
	model.ConstraintStopTime:     {"stop time", "Bump-stop contact time", Millisecond, 1, "stop_time_s"},
}

// Gene is how a searched variable of the design space is shown, by its
// name: knees (names ending in _m_per_s) in mm/s with one decimal,
// damping ratios and factors as they are with three.
func Gene(name string) Quantity {
	label := strings.ReplaceAll(name, "_", " ")
	if strings.HasSuffix(name, "_m_per_s") {
		label = strings.TrimSuffix(label, " m per s")
		return Quantity{label, capitalise(label), MillimetrePerSecond, 1, name}
	}
	return Quantity{label, capitalise(label), None, 3, name}
}

// capitalise returns s with its first letter upper case (ASCII).
func capitalise(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// The aero platform of a road case (model.CaseMetrics, the API's
// AeroMetrics and ReferencePointMetrics), as the command line's eval
// table and the job page show it.
var (
	BalanceAtSpeed  = Quantity{"balance at speed", "Aero balance at speed (front share)", Percent, 2, "balance_at_speed"}
	DownforceSD     = Quantity{"downforce sd", "Downforce sd", Newton, 1, "downforce_sd_n"}
	DownforceShift  = Quantity{"downforce shift", "Downforce shift from jacking", Newton, 1, "downforce_shift_n"}
	BalanceSD       = Quantity{"balance sd", "Aero balance sd", Percent, 3, "balance_sd"}
	BalanceShift    = Quantity{"balance shift", "Aero balance shift from jacking", Percent, 3, "balance_shift"}
	PointHeight     = Quantity{"height at speed", "Height at speed", Millimetre, 2, "height_at_speed_m"}
	PointShift      = Quantity{"shift", "Height shift from jacking", Millimetre, 3, "height_shift_m"}
	PointSD         = Quantity{"sd", "Height sd", Millimetre, 3, "height_sd_m"}
	GroundContact   = Quantity{"ground contact", "Ground-contact probability", Percent, 4, "contact_probability"}
	RideHeightSpeed = Quantity{"ride height at speed", "Ride height at speed", Millimetre, 1, "ride_height_m"}
	Downforce       = Quantity{"downforce", "Downforce", Newton, 0, "downforce_n"}
)

// ProbabilityText writes a probability that spans decades (a
// ground-contact probability: 1e-12 and 0.03 both matter) in per cent with
// three significant digits, which fixed decimals would hide.
func ProbabilityText(p float64) string {
	return strconv.FormatFloat(Percent.Of(p), 'g', 3, 64)
}
