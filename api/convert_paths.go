package api

import (
	"regexp"
	"strconv"

	"dampfront/model"
)

// The model names the fields of its validation errors in the API's
// lower_snake_case, but its structs are not shaped quite like the
// messages: per-axle pairs are arrays there ("anti_roll[0]") and named
// fields here ("front_anti_roll_bar"), the power-law spectrum is a
// sub-message here, and a few names carry a unit suffix only here. These
// rules translate one into the other; they are the only place that knows
// both shapes. Each matches at the start of a path or after a dot, so the
// same rules serve a whole spec ("vehicle.anti_roll[1].motion_ratio") and
// one part validated alone ("anti_roll[1].motion_ratio").
var pathRules = []struct {
	re   *regexp.Regexp
	repl string
}{
	// Vehicle: per-axle anti-roll bars and aero figures.
	{regexp.MustCompile(`(^|\.)anti_roll\[0\]`), "${1}front_anti_roll_bar"},
	{regexp.MustCompile(`(^|\.)anti_roll\[1\]`), "${1}rear_anti_roll_bar"},
	{regexp.MustCompile(`(^|\.)downforce_n\[0\]`), "${1}front_downforce_n"},
	{regexp.MustCompile(`(^|\.)downforce_n\[1\]`), "${1}rear_downforce_n"},
	{regexp.MustCompile(`(^|\.)stiffness_n_per_m\[0\]`), "${1}front_stiffness_n_per_m"},
	{regexp.MustCompile(`(^|\.)stiffness_n_per_m\[1\]`), "${1}rear_stiffness_n_per_m"},
	{regexp.MustCompile(`(^|\.)rest_ride_height_m\[0\]`), "${1}front_rest_ride_height_m"},
	{regexp.MustCompile(`(^|\.)rest_ride_height_m\[1\]`), "${1}rear_rest_ride_height_m"},
	// Vehicle and setup: per-axle heave elements and heave dampers.
	{regexp.MustCompile(`(^|\.)heave\[0\]`), "${1}front_heave"},
	{regexp.MustCompile(`(^|\.)heave\[1\]`), "${1}rear_heave"},
	{regexp.MustCompile(`(^|\.)heave_ratio\[0\]`), "${1}front_heave_ratio"},
	{regexp.MustCompile(`(^|\.)heave_ratio\[1\]`), "${1}rear_heave_ratio"},
	// Load paths: per-axle pairs.
	{regexp.MustCompile(`(^|\.)(roll_centre_height_m|anti_brake|anti_drive|unsprung_cg_height_m)\[0\]`), "${1}front_${2}"},
	{regexp.MustCompile(`(^|\.)(roll_centre_height_m|anti_brake|anti_drive|unsprung_cg_height_m)\[1\]`), "${1}rear_${2}"},
	// Manoeuvres: accelerations are given in g.
	{gPath, "${1}${2}_g"},
	// "give all four sprung loads or none" concerns the corner list.
	{regexp.MustCompile(`(^|\.)corners\.sprung_load_n$`), "${1}corners"},
	// Road case: the power law is a sub-message of the spectrum oneof.
	{regexp.MustCompile(`(^|\.)gd0_m3$`), "${1}power_law.gd0_m3"},
	{regexp.MustCompile(`(^|\.)waviness$`), "${1}power_law.waviness"},
	// Design space: per-axle ranges.
	{regexp.MustCompile(`(^|\.)design\.`), "${1}design_space."},
	{regexp.MustCompile(`(^|\.)knee_m_per_s\[0\]`), "${1}front_knee_m_per_s"},
	{regexp.MustCompile(`(^|\.)knee_m_per_s\[1\]`), "${1}rear_knee_m_per_s"},
	{regexp.MustCompile(`(^|\.)high_speed\[0\]`), "${1}front_high_speed_factor"},
	{regexp.MustCompile(`(^|\.)high_speed\[1\]`), "${1}rear_high_speed_factor"},
	// Objectives: per-axle target shifts.
	{regexp.MustCompile(`(^|\.)target_shift_m\[0\]`), "${1}front_target_shift_m"},
	{regexp.MustCompile(`(^|\.)target_shift_m\[1\]`), "${1}rear_target_shift_m"},
	// Setup: high-speed factors carry "_factor".
	{regexp.MustCompile(`(^|\.)high_speed_(bump|rebound)$`), "${1}high_speed_${2}_factor"},
	// Adjustment: the clicks are damping ratios.
	{regexp.MustCompile(`(^|\.)(bump|rebound)_(softest|stiffest)$`), "${1}${2}_${3}_ratio"},
}

// protoPath translates a model field path to the path of the same field
// in the API's messages, relative to the same parent.
func protoPath(modelPath string) string {
	p := modelPath
	for _, r := range pathRules {
		p = r.re.ReplaceAllString(p, r.repl)
	}
	return p
}

// gPath matches the model's accelerations that the messages give in g
// (Manoeuvre.longitudinal_g, lateral_g, the table's ax_g and ay_g).
var gPath = regexp.MustCompile(`(^|\.)(longitudinal|lateral|ax|ay)_m_per_s2$`)

// The numbers a model's reason quotes in m/s²: its range ("must be in
// [-78.4532, 78.4532] m/s^2") and the value given ("got 98.0665").
var (
	siAccelRange = regexp.MustCompile(`\[([^,\]]+), ([^\]]+)\] m/s\^2`)
	siAccelGot   = regexp.MustCompile(`got (\S+)`)
)

// protoProblem is a model problem as the API states it: the path of the
// same field in the messages, and for a field given in g the reason's
// range and value in g too, as the user wrote them.
func protoProblem(q model.FieldError) model.FieldError {
	out := model.FieldError{Field: protoPath(q.Field), Reason: q.Reason}
	if !gPath.MatchString(q.Field) {
		return out
	}
	toG := func(si string) string {
		v, err := strconv.ParseFloat(si, 64)
		if err != nil {
			return si
		}
		// 10 significant figures drop the last bits that g and back leave.
		return strconv.FormatFloat(v/model.Gravity, 'g', 10, 64)
	}
	out.Reason = siAccelRange.ReplaceAllStringFunc(out.Reason, func(m string) string {
		sub := siAccelRange.FindStringSubmatch(m)
		return "[" + toG(sub[1]) + ", " + toG(sub[2]) + "] g"
	})
	out.Reason = siAccelGot.ReplaceAllStringFunc(out.Reason, func(m string) string {
		return "got " + toG(siAccelGot.FindStringSubmatch(m)[1])
	})
	return out
}
