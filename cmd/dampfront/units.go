package main

import (
	"fmt"
	"strings"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/model/tradeunit"
)

// The printed tables show trade units, all of the one table of package
// tradeunit (its doc lists them); CSV and JSON outputs stay SI, with the
// unit in each column's name.

// fromMmPerS converts mm/s (a flag's unit) to m/s.
func fromMmPerS(v float64) float64 { return tradeunit.MillimetrePerSecond.SI(v) }

// pct converts a fraction to per cent.
func pct(x float64) float64 { return tradeunit.Percent.Of(x) }

// quantity says how one value is named and shown: in tables (label, trade
// unit, scale from SI, decimals) and in CSV/JSON (column, SI).
type quantity struct {
	label  string  // table header
	unit   string  // trade unit of the table
	scale  float64 // trade value = SI value x scale
	prec   int     // decimals in tables
	column string  // CSV/JSON column name, SI unit suffixed
}

// shown is a quantity of the trade-unit table as the CLI's tables show it.
func shown(q tradeunit.Quantity) quantity {
	return quantity{q.Label, q.Unit.Symbol, q.Unit.Scale, q.Prec, q.Column}
}

// newQuantity is a quantity of the CLI's own in a trade unit.
func newQuantity(label string, u tradeunit.Unit, prec int, column string) quantity {
	return quantity{label, u.Symbol, u.Scale, prec, column}
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
	return shown(tradeunit.Objective(api.ModelObjectiveKind(k)))
}

// hypervolumeQuantity is the hypervolume in the product of the
// objectives' trade units, "% × mm" for grip and platform, as the
// hypervolume chart (api/plot) shows it.
func hypervolumeQuantity(objs []*pb.Objective) quantity {
	u := tradeunit.Hypervolume(modelKinds(objs))
	return quantity{"hypervolume", u.Symbol, u.Scale, 4, "hypervolume"}
}

// modelKinds are the model's kinds of the objectives.
func modelKinds(objs []*pb.Objective) []model.ObjectiveKind {
	kinds := make([]model.ObjectiveKind, len(objs))
	for j, o := range objs {
		kinds[j] = api.ModelObjectiveKind(o.GetKind())
	}
	return kinds
}

// hypervolumeText is a hypervolume with its unit, four significant digits.
func hypervolumeText(hv float64, objs []*pb.Objective) string {
	q := hypervolumeQuantity(objs)
	return strings.TrimSpace(fmt.Sprintf("%.4g %s", q.trade(hv), q.unit))
}

// constraintQuantity is how a constraint's limit and metric are shown.
func constraintQuantity(k pb.ConstraintKind) quantity {
	return shown(tradeunit.Constraint(api.ModelConstraintKind(k)))
}

// geneQuantity is how a searched variable is shown: knees (names ending
// in _m_per_s) in mm/s, ratios and factors as they are.
func geneQuantity(name string) quantity { return shown(tradeunit.Gene(name)) }

// Fixed quantities of the metric and curve tables.
var (
	qLoadSDRel   = newQuantity("load sd", tradeunit.PercentStatic, 2, "relative_tyre_load_sd")
	qRideSD      = newQuantity("ride sd", tradeunit.Millimetre, 3, "ride_height_sd_m")
	qRideShift   = newQuantity("ride shift", tradeunit.Millimetre, 3, "ride_height_shift_m")
	qTravelSD    = newQuantity("travel sd", tradeunit.Millimetre, 3, "travel_sd_m")
	qDamperVelSD = newQuantity("damper vel sd", tradeunit.MillimetrePerSecond, 1, "damper_velocity_sd_m_per_s")
	qPitchSD     = newQuantity("pitch sd", tradeunit.Degree, 4, "pitch_sd_rad")
	qHeaveSD     = newQuantity("heave accel sd", tradeunit.Gravity, 4, "heave_accel_sd_m_per_s2")
	qProbability = newQuantity("probability", tradeunit.Percent, 3, "probability")
	qSlope       = newQuantity("slope", tradeunit.NewtonSecondPerMM, 2, "slope_n_s_per_m")
	qVelocity    = newQuantity("velocity", tradeunit.MillimetrePerSecond, 0, "velocity_m_per_s")
	qKnee        = newQuantity("knee", tradeunit.MillimetrePerSecond, 0, "knee_m_per_s")
	qForce       = newQuantity("force", tradeunit.Newton, 0, "force_n")

	// The hand method's per-corner table.
	qWheelRate    = newQuantity("wheel rate", tradeunit.NewtonPerMM, 1, "wheel_rate_n_per_m")
	qTyreRate     = newQuantity("tyre rate", tradeunit.NewtonPerMM, 1, "tyre_rate_n_per_m")
	qRideRate     = newQuantity("ride rate", tradeunit.NewtonPerMM, 1, "ride_rate_n_per_m")
	qSprungMass   = newQuantity("sprung mass", tradeunit.Kilogram, 1, "sprung_mass_kg")
	qMotionRatio  = newQuantity("damper motion ratio", tradeunit.None, 3, "damper_motion_ratio")
	qRideFreq     = newQuantity("ride frequency, no tyre", tradeunit.Hertz, 2, "ride_frequency_hz")
	qRideFreqTyre = newQuantity("ride frequency, tyre", tradeunit.Hertz, 2, "ride_frequency_with_tyre_hz")
	qCritWheel    = newQuantity("critical damping, wheel", tradeunit.NewtonSecondPerMM, 2, "critical_damping_wheel_n_s_per_m")
	qCritDamper   = newQuantity("critical damping, damper", tradeunit.NewtonSecondPerMM, 2, "critical_damping_damper_n_s_per_m")
)

// cornerShort are the corners' short names in table headers.
var cornerShort = map[pb.CornerPosition]string{
	pb.CornerPosition_CORNER_POSITION_FRONT_LEFT: "FL", pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT: "FR",
	pb.CornerPosition_CORNER_POSITION_REAR_LEFT: "RL", pb.CornerPosition_CORNER_POSITION_REAR_RIGHT: "RR",
}
