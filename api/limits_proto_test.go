package api

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"dampfront/model"
)

// protoLimits maps each physical field of the API ("Message.field") to
// the model's plausible range of it (model.PlausibleRanges).
var protoLimits = map[string]string{
	"Vehicle.sprung_mass_kg": "Vehicle.sprung_mass_kg", "Vehicle.pitch_inertia_kg_m2": "Vehicle.pitch_inertia_kg_m2",
	"Vehicle.roll_inertia_kg_m2": "Vehicle.roll_inertia_kg_m2", "Vehicle.cg_to_front_axle_m": "Vehicle.cg_to_axle_m",
	"Vehicle.cg_to_rear_axle_m": "Vehicle.cg_to_axle_m", "Vehicle.cg_lateral_m": "Vehicle.cg_lateral_m",
	"Vehicle.track_front_m": "Vehicle.track_m", "Vehicle.track_rear_m": "Vehicle.track_m",
	"Vehicle.front_rest_ride_height_m": "Vehicle.rest_ride_height_m", "Vehicle.rear_rest_ride_height_m": "Vehicle.rest_ride_height_m",
	"Corner.spring_rate_n_per_m": "Corner.spring_rate_n_per_m", "Corner.spring_motion_ratio": "Corner.motion_ratio",
	"Corner.wheel_rate_n_per_m": "Corner.wheel_rate_n_per_m", "Corner.damper_motion_ratio": "Corner.motion_ratio",
	"Corner.unsprung_mass_kg": "Corner.unsprung_mass_kg", "Corner.tyre_rate_n_per_m": "Corner.tyre_rate_n_per_m",
	"Corner.tyre_damping_n_s_per_m": "Corner.tyre_damping_n_s_per_m", "Corner.tyre_envelope_length_m": "Corner.tyre_envelope_length_m",
	"Corner.bump_stop_gap_m": "Corner.bump_stop_gap_m", "Corner.sprung_load_n": "Corner.sprung_load_n",
	"BumpStop.deflection_m": "BumpStop.deflection_m", "BumpStop.force_n": "BumpStop.force_n",
	"AntiRollBar.wheel_rate_n_per_m": "AntiRollBar.wheel_rate_n_per_m", "AntiRollBar.bar_rate_n_per_m": "AntiRollBar.bar_rate_n_per_m",
	"AntiRollBar.motion_ratio": "AntiRollBar.motion_ratio", "HeaveElement.motion_ratio": "HeaveElement.motion_ratio",
	"HeaveElement.spring_rate_n_per_m": "HeaveElement.spring_rate_n_per_m", "HeaveElement.packer_gap_m": "HeaveElement.packer_gap_m",
	"HeaveElement.packer_rate_n_per_m": "HeaveElement.packer_rate_n_per_m", "Aero.reference_speed_m_per_s": "Aero.reference_speed_m_per_s",
	"Aero.front_downforce_n": "Aero.downforce_n", "Aero.rear_downforce_n": "Aero.downforce_n",
	"Aero.front_stiffness_n_per_m": "Aero.stiffness_n_per_m", "Aero.rear_stiffness_n_per_m": "Aero.stiffness_n_per_m",
	"ReferencePoint.x_from_front_axle_m": "ReferencePoint.x_from_front_axle_m", "ReferencePoint.wheelbase_fraction": "ReferencePoint.wheelbase_fraction",
	"ReferencePoint.y_m": "ReferencePoint.y_m", "ReferencePoint.rest_height_m": "ReferencePoint.rest_height_m",
	"RoadCase.speed_m_per_s": "RoadCase.speed_m_per_s", "RoadCase.weight": "RoadCase.weight",
	"PowerLawSpectrum.gd0_m3": "RoadCase.gd0_m3", "PowerLawSpectrum.waviness": "RoadCase.waviness",
	"MeasuredSpectrum.n_cycles_per_m": "RoadCase.n_cycles_per_m", "MeasuredSpectrum.left_m3": "RoadCase.psd_m3",
	"MeasuredSpectrum.right_m3": "RoadCase.psd_m3", "MeasuredSpectrum.coherence": "RoadCase.coherence",
	"Coherence.n_cycles_per_m": "RoadCase.n_cycles_per_m", "Coherence.gamma": "RoadCase.coherence",
	"Grid.min_hz": "Grid.min_hz", "Grid.max_hz": "Grid.max_hz",
	"AxleDamping.bump_ratio": "AxleDamping.ratio", "AxleDamping.rebound_ratio": "AxleDamping.ratio",
	"AxleDamping.knee_bump_m_per_s": "AxleDamping.knee_m_per_s", "AxleDamping.knee_rebound_m_per_s": "AxleDamping.knee_m_per_s",
	"AxleDamping.high_speed_bump_factor": "AxleDamping.high_speed", "AxleDamping.high_speed_rebound_factor": "AxleDamping.high_speed",
	"Objective.front_target_shift_m": "Objective.target_shift_m", "Objective.rear_target_shift_m": "Objective.target_shift_m",
	"Adjustment.bump_softest_ratio": "Adjustment.ratio", "Adjustment.bump_stiffest_ratio": "Adjustment.ratio",
	"Adjustment.rebound_softest_ratio": "Adjustment.ratio", "Adjustment.rebound_stiffest_ratio": "Adjustment.ratio",
	"CurveSettings.max_velocity_m_per_s": "Curves.max_velocity_m_per_s",
	"AxleDamping.blow_off_bump_n":        "AxleDamping.blow_off_n", "AxleDamping.blow_off_rebound_n": "AxleDamping.blow_off_n",
	"AxleDamping.friction_n": "AxleDamping.friction_n", "AxleDamping.gas_force_n": "AxleDamping.gas_force_n",
	"DamperStage.velocity_m_per_s": "AxleDamping.knee_m_per_s", "DamperStage.factor": "AxleDamping.high_speed",
	"Adjuster.stiffest": "Adjustment.ratio AxleDamping.high_speed", "Adjuster.softest": "Adjustment.ratio AxleDamping.high_speed",
	"DynoTable.velocity_m_per_s": "Curves.max_velocity_m_per_s",
	"Constraint.limit":           "Constraint.probability Constraint.travel_m Constraint.jacking_m",

	"LoadPaths.cg_height_m": "LoadPaths.height_m", "LoadPaths.front_unsprung_cg_height_m": "LoadPaths.height_m",
	"LoadPaths.rear_unsprung_cg_height_m": "LoadPaths.height_m", "LoadPaths.front_roll_centre_height_m": "LoadPaths.roll_centre_height_m",
	"LoadPaths.rear_roll_centre_height_m": "LoadPaths.roll_centre_height_m", "LoadPaths.front_anti_brake": "LoadPaths.anti",
	"LoadPaths.rear_anti_brake": "LoadPaths.anti", "LoadPaths.front_anti_drive": "LoadPaths.anti", "LoadPaths.rear_anti_drive": "LoadPaths.anti",
	"Manoeuvre.speed_m_per_s": "RoadCase.speed_m_per_s", "Manoeuvre.start_s": "Manoeuvre.time_s", "Manoeuvre.ramp_s": "Manoeuvre.time_s",
	"Manoeuvre.duration_s": "Manoeuvre.time_s", "Manoeuvre.weight": "RoadCase.weight",
	"Kerb.height_m": "Kerb.height_m", "Kerb.length_m": "Kerb.length_m", "Kerb.ramp_m": "Kerb.length_m", "Kerb.speed_m_per_s": "RoadCase.speed_m_per_s",
	"Kerb.start_s": "Manoeuvre.time_s", "Kerb.duration_s": "Manoeuvre.time_s", "Kerb.weight": "RoadCase.weight",
	"JobSpec.load_fraction": "Transient.load_fraction",

	"Uncertainty.fuel_mass_kg": "Uncertainty.fuel_mass_kg", "Uncertainty.fuel_position_m": "Uncertainty.fuel_position_m",
	"Uncertainty.fuel_height_m": "LoadPaths.height_m", "Uncertainty.tyre_rate_scale": "Uncertainty.tyre_rate_scale",
	"Uncertainty.front_tyre_rate_scale": "Uncertainty.tyre_rate_scale", "Uncertainty.rear_tyre_rate_scale": "Uncertainty.tyre_rate_scale",
	"Uncertainty.downforce_scale": "Uncertainty.downforce_scale", "Uncertainty.balance_shift": "Uncertainty.balance_shift",
	"Uncertainty.aero_stiffness_scale": "Uncertainty.aero_stiffness_scale", "Uncertainty.k": "Uncertainty.k",
}

// TestProtoCommentsStateTheRanges: the comment of every physical field in
// the API's protos states the plausible range the model checks, so that
// the two cannot drift apart.
func TestProtoCommentsStateTheRanges(t *testing.T) {
	t.Parallel()
	ranges := model.PlausibleRanges()
	comments := protoFieldComments(t)
	for field, names := range protoLimits {
		c, ok := comments[field]
		if !ok {
			t.Errorf("%s: no such field in the protos", field)
			continue
		}
		for _, name := range strings.Fields(names) {
			l, ok := ranges[name]
			if !ok {
				t.Fatalf("%s: the model has no range %s", field, name)
			}
			if want := strings.TrimSuffix(l.String(), " "+l.Unit); !strings.Contains(c, want) {
				t.Errorf("%s: comment %q does not state %s", field, c, l)
			}
		}
	}
}

var (
	protoMessageLine = regexp.MustCompile(`^message (\w+) \{`)
	protoFieldLine   = regexp.MustCompile(`^\s+(?:repeated |optional )?[\w.]+ (\w+) = \d+;`)
)

// protoFieldComments returns the leading comment of every field of the
// protos, by "Message.field", lines joined by spaces.
func protoFieldComments(t *testing.T) map[string]string {
	t.Helper()
	files, err := filepath.Glob(filepath.Join("proto", "dampfront", "v1", "*.proto"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no protos: %v", err)
	}
	out := map[string]string{}
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		var msg string
		var comment []string
		for _, line := range strings.Split(string(b), "\n") {
			trimmed := strings.TrimSpace(line)
			switch m, fm := protoMessageLine.FindStringSubmatch(line), protoFieldLine.FindStringSubmatch(line); {
			case strings.HasPrefix(trimmed, "//"):
				comment = append(comment, strings.TrimSpace(strings.TrimPrefix(trimmed, "//")))
				continue
			case m != nil:
				msg = m[1]
			case fm != nil && msg != "":
				out[msg+"."+fm[1]] = strings.Join(comment, " ")
			}
			comment = nil
		}
	}
	return out
}
