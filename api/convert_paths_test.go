package api

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestProtoPath translates the model's validation paths (as model's
// Validate methods write them) and checks that each result is a field
// path of JobSpec.
func TestProtoPath(t *testing.T) {
	t.Parallel()
	md := (&pb.JobSpec{}).ProtoReflect().Descriptor()
	for _, c := range []struct{ model, want string }{
		{"vehicle.sprung_mass_kg", "vehicle.sprung_mass_kg"},
		{"vehicle.corners[2].tyre_rate_n_per_m", "vehicle.corners[2].tyre_rate_n_per_m"},
		{"vehicle.corners.sprung_load_n", "vehicle.corners"},
		{"vehicle.anti_roll[0].bar_rate_n_per_m", "vehicle.front_anti_roll_bar.bar_rate_n_per_m"},
		{"vehicle.anti_roll[1].motion_ratio", "vehicle.rear_anti_roll_bar.motion_ratio"},
		{"vehicle.aero.downforce_n[1]", "vehicle.aero.rear_downforce_n"},
		{"vehicle.aero.stiffness_n_per_m[0]", "vehicle.aero.front_stiffness_n_per_m"},
		{"vehicle.aero.reference_speed_m_per_s", "vehicle.aero.reference_speed_m_per_s"},
		{"road_cases[1].gd0_m3", "road_cases[1].power_law.gd0_m3"},
		{"road_cases[1].waviness", "road_cases[1].power_law.waviness"},
		{"road_cases[0].iso_class", "road_cases[0].iso_class"},
		{"road_cases[0].measured.left_m3[3]", "road_cases[0].measured.left_m3[3]"},
		{"road_cases[0].coherence.gamma[1]", "road_cases[0].coherence.gamma[1]"},
		{"grid.points", "grid.points"},
		{"design.ratios.rear_rebound.min", "design_space.ratios.rear_rebound.min"},
		{"design.knee_m_per_s[1].max", "design_space.rear_knee_m_per_s.max"},
		{"design.high_speed[0].min", "design_space.front_high_speed_factor.min"},
		{"design_space.base.rear.high_speed_rebound", "design_space.base.rear.high_speed_rebound_factor"},
		{"design_space.base.front.knee_bump_m_per_s", "design_space.base.front.knee_bump_m_per_s"},
		{"objectives[2].target_shift_m[1]", "objectives[2].rear_target_shift_m"},
		{"constraints[0].limit", "constraints[0].limit"},
		{"adjustment.rebound_stiffest", "adjustment.rebound_stiffest_ratio"},
	} {
		got := protoPath(c.model)
		if got != c.want {
			t.Errorf("protoPath(%q) = %q, want %q", c.model, got, c.want)
		}
		if err := resolvePath(md, got); err != nil {
			t.Errorf("%q is not a JobSpec field path: %v", got, err)
		}
	}
}
