package model

import (
	"fmt"
	"maps"
	"math"
	"strconv"
)

// Limit is the plausible range of one physical input, in SI. A value
// outside it is refused by Validate with the field named: the linear
// algebra on a value far out of scale (a sprung mass of 5e-324 kg, a motion
// ratio of 1e-300) gives NaN and infinite forces, and a value mildly out of
// scale is far more often a unit slip than a real car.
//
// The ranges are wide enough for any real car from a light single-seater
// to a heavy GT or prototype. They are common practice, not from a
// published source: each bound is a generous margin around the figures
// engineers quote for such cars.
type Limit struct {
	Min, Max float64
	// OpenMin excludes Min: (Min, Max] instead of [Min, Max].
	OpenMin bool
	// Unit is the SI unit, "" for a dimensionless value.
	Unit string
	// Slips are units a value is often typed in by mistake; a value out of
	// range that would be in range read in one of them gets a hint.
	Slips []UnitSlip
}

// UnitSlip is a unit mistaken for the field's SI unit: one of it is ToSI
// of the SI unit (1 N/mm = 1000 N/m).
type UnitSlip struct {
	Unit string
	ToSI float64
}

// The unit slips the hints know.
var (
	slipNPerMm  = []UnitSlip{{"N/mm", 1e3}}
	slipMm      = []UnitSlip{{"mm", 1e-3}}
	slipKmPerH  = []UnitSlip{{"km/h", 1 / 3.6}}
	slipMmPerS  = []UnitSlip{{"mm/s", 1e-3}}
	slipPercent = []UnitSlip{{"%", 1e-2}}
)

// String is the range as the error messages and the API's comments state
// it: "[50, 5000] kg", "(0, 1]".
func (l Limit) String() string {
	open := "["
	if l.OpenMin {
		open = "("
	}
	s := open + num(l.Min) + ", " + num(l.Max) + "]"
	if l.Unit != "" {
		s += " " + l.Unit
	}
	return s
}

// num formats a bound in the shortest form that reads back exactly.
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Contains reports whether v is finite and in the range.
func (l Limit) Contains(v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) || v > l.Max {
		return false
	}
	if l.OpenMin {
		return v > l.Min
	}
	return v >= l.Min
}

// hint says which slipped unit would put v in range, or "".
func (l Limit) hint(v float64) string {
	for _, s := range l.Slips {
		if si := v * s.ToSI; l.Contains(si) {
			return fmt.Sprintf(": this looks like a value in %s; %s %s is %s %s", s.Unit, num(v), s.Unit, num(si), l.Unit)
		}
	}
	return ""
}

// plausible holds the limits, by the model type and the API field name
// the value has (a per-axle pair is one entry). The keys are what the
// API's comments are checked against.
var plausible = map[string]Limit{
	"Vehicle.sprung_mass_kg":      {Min: 50, Max: 5000, Unit: "kg"},
	"Vehicle.pitch_inertia_kg_m2": {Min: 10, Max: 20000, Unit: "kg m^2"},
	"Vehicle.roll_inertia_kg_m2":  {Min: 5, Max: 5000, Unit: "kg m^2"},
	"Vehicle.cg_to_axle_m":        {Min: 0.2, Max: 5, Unit: "m", Slips: slipMm},
	"Vehicle.cg_lateral_m":        {Min: -0.5, Max: 0.5, Unit: "m", Slips: slipMm},
	"Vehicle.rest_ride_height_m":  {Min: 0.005, Max: 0.5, Unit: "m", Slips: slipMm},
	"Vehicle.track_m":             {Min: 0.5, Max: 3, Unit: "m", Slips: slipMm},

	"Corner.spring_rate_n_per_m":    {Min: 1e3, Max: 1e7, Unit: "N/m", Slips: slipNPerMm},
	"Corner.wheel_rate_n_per_m":     {Min: 1e3, Max: 1e7, Unit: "N/m", Slips: slipNPerMm},
	"Corner.motion_ratio":           {Min: 0.1, Max: 2},
	"Corner.unsprung_mass_kg":       {Min: 3, Max: 250, Unit: "kg"},
	"Corner.tyre_rate_n_per_m":      {Min: 2e4, Max: 5e6, Unit: "N/m", Slips: slipNPerMm},
	"Corner.tyre_damping_n_s_per_m": {Min: 0, Max: 1e4, Unit: "N s/m"},
	"Corner.tyre_envelope_length_m": {Min: 0, Max: 1, Unit: "m", Slips: slipMm},
	"Corner.bump_stop_gap_m":        {Min: 0, Max: 0.3, Unit: "m", Slips: slipMm},
	"Corner.sprung_load_n":          {Min: 100, Max: 5e4, Unit: "N"},

	"HeaveElement.spring_rate_n_per_m": {Min: 0, Max: 1e7, Unit: "N/m", Slips: slipNPerMm},
	"HeaveElement.motion_ratio":        {Min: 0.1, Max: 2},
	"HeaveElement.packer_gap_m":        {Min: 0, Max: 0.3, Unit: "m", Slips: slipMm},
	"HeaveElement.packer_rate_n_per_m": {Min: 1e3, Max: 1e8, Unit: "N/m", Slips: slipNPerMm},

	"AntiRollBar.wheel_rate_n_per_m": {Min: 0, Max: 1e7, Unit: "N/m", Slips: slipNPerMm},
	"AntiRollBar.bar_rate_n_per_m":   {Min: 1e3, Max: 1e8, Unit: "N/m", Slips: slipNPerMm},
	"AntiRollBar.motion_ratio":       {Min: 0.05, Max: 2},

	"Aero.reference_speed_m_per_s": {Min: 10, Max: 120, Unit: "m/s", Slips: slipKmPerH},
	"Aero.downforce_n":             {Min: 0, Max: 1e5, Unit: "N"},
	"Aero.stiffness_n_per_m":       {Min: -5e6, Max: 5e6, Unit: "N/m"},

	"ReferencePoint.x_from_front_axle_m": {Min: -3, Max: 8, Unit: "m", Slips: slipMm},
	"ReferencePoint.wheelbase_fraction":  {Min: -1, Max: 2},
	"ReferencePoint.y_m":                 {Min: -1.5, Max: 1.5, Unit: "m", Slips: slipMm},
	"ReferencePoint.rest_height_m":       {Min: 0, Max: 0.5, OpenMin: true, Unit: "m", Slips: slipMm},

	"RoadCase.speed_m_per_s":          {Min: 1, Max: 120, Unit: "m/s", Slips: slipKmPerH},
	"RoadCase.weight":                 {Min: 0, Max: 1000},
	"RoadCase.gd0_m3":                 {Min: 1e-10, Max: 1, Unit: "m^3"},
	"RoadCase.waviness":               {Min: 0.5, Max: 4},
	"RoadCase.n_cycles_per_m":         {Min: 0, Max: 1e4, OpenMin: true, Unit: "cycles/m"},
	"RoadCase.psd_m3":                 {Min: 1e-24, Max: 1e3, Unit: "m^3"},
	"RoadCase.coherence":              {Min: -1, Max: 1},
	"Grid.min_hz":                     {Min: 1e-3, Max: 10, Unit: "Hz"},
	"Grid.max_hz":                     {Min: 1, Max: 1e5, Unit: "Hz"},
	"AxleDamping.ratio":               {Min: 0.01, Max: 5},
	"AxleDamping.knee_m_per_s":        {Min: 1e-3, Max: 1, Unit: "m/s", Slips: slipMmPerS},
	"AxleDamping.high_speed":          {Min: 0.05, Max: 10},
	"AxleDamping.blow_off_n":          {Min: 0, Max: 2e4, Unit: "N"},
	"AxleDamping.friction_n":          {Min: 0, Max: 2000, Unit: "N"},
	"AxleDamping.gas_force_n":         {Min: 0, Max: 1e4, Unit: "N"},
	"Objective.target_shift_m":        {Min: -0.1, Max: 0.1, Unit: "m", Slips: slipMm},
	"Constraint.probability":          {Min: 0, Max: 1, OpenMin: true, Slips: slipPercent},
	"Constraint.travel_m":             {Min: 0, Max: 0.2, OpenMin: true, Unit: "m", Slips: slipMm},
	"Constraint.jacking_m":            {Min: 0, Max: 0.1, OpenMin: true, Unit: "m", Slips: slipMm},
	"Constraint.modal_ratio":          {Min: 0, Max: 5, OpenMin: true},
	"Curves.max_velocity_m_per_s":     {Min: 0, Max: 5, OpenMin: true, Unit: "m/s", Slips: slipMmPerS},
	"Adjustment.ratio":                {Min: 0, Max: 5},
	"BumpStop.deflection_m":           {Min: 0, Max: 0.3, OpenMin: true, Unit: "m", Slips: slipMm},
	"BumpStop.force_n":                {Min: 0, Max: 1e6, Unit: "N"},
	"EvaluatorOptions.warn_threshold": {Min: 0, Max: 1},

	"LoadPaths.height_m":             {Min: 0.02, Max: 1.5, Unit: "m", Slips: slipMm},
	"LoadPaths.roll_centre_height_m": {Min: -0.3, Max: 0.8, Unit: "m", Slips: slipMm},
	"LoadPaths.anti":                 {Min: -0.5, Max: 1.5, Slips: slipPercent},
	// A downforce car peaks near 5-6 g in braking and cornering; 8 g
	// (78.4532 m/s²) leaves a margin (common practice, no single source).
	// The API gives these in g and states the range as [-8, 8] g.
	"Manoeuvre.acceleration_m_per_s2": {Min: -8 * Gravity, Max: 8 * Gravity, Unit: "m/s^2"},
	"Manoeuvre.time_s":                {Min: 0, Max: 60, Unit: "s"},
	"Kerb.height_m":                   {Min: 0.002, Max: 0.2, Unit: "m", Slips: slipMm},
	"Kerb.length_m":                   {Min: 0.05, Max: 20, Unit: "m", Slips: slipMm},
	"Transient.load_fraction":         {Min: 0, Max: 1, OpenMin: true},
	"Constraint.time_s":               {Min: 0, Max: 60, OpenMin: true, Unit: "s"},

	// The uncertainty ranges (common practice, no source): a race car's
	// fuel load is tens of kilograms up to about 120 kg, its tank within a
	// metre of the CG; hot and cold tyres, pressures and wear move the
	// tyre rate by some ±20 %; wing settings and air density the
	// downforce by ±20 % and the balance by a few per cent. The ranges
	// leave a margin; a value beyond is more likely a slip.
	"Uncertainty.fuel_mass_kg":         {Min: -300, Max: 300, Unit: "kg"},
	"Uncertainty.fuel_position_m":      {Min: -3, Max: 3, Unit: "m", Slips: slipMm},
	"Uncertainty.tyre_rate_scale":      {Min: 0.5, Max: 1.5, Slips: slipPercent},
	"Uncertainty.downforce_scale":      {Min: 0.5, Max: 1.5, Slips: slipPercent},
	"Uncertainty.balance_shift":        {Min: -0.2, Max: 0.2, Slips: slipPercent},
	"Uncertainty.aero_stiffness_scale": {Min: 0, Max: 3, Slips: slipPercent},
	"Uncertainty.k":                    {Min: 0, Max: 5},
}

// PlausibleRanges returns the limits of every physical input, by the
// model type and the API field name it has ("Corner.damper_motion_ratio"
// is "Corner.motion_ratio": one limit serves both ratios). It is a copy.
func PlausibleRanges() map[string]Limit { return maps.Clone(plausible) }

// limit returns the named limit; a missing name is a programming error.
func limit(name string) Limit {
	l, ok := plausible[name]
	if !ok {
		panic("model: no plausible range named " + name)
	}
	return l
}

// in requires v in the named plausible range.
func (p *problems) in(field string, v float64, name string) {
	l := limit(name)
	if !p.finite(field, v) || l.Contains(v) {
		return
	}
	p.add(field, "must be in %s, got %s%s", l, num(v), l.hint(v))
}

// inOrZero is in for a field where 0 means "not given".
func (p *problems) inOrZero(field string, v float64, name string) {
	if v != 0 {
		p.in(field, v, name)
	}
}
