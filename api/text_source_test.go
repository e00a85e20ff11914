package api

import "testing"

// Locate takes a field from the file with the longest prefix holding it,
// falls back to the nearest written enclosing field, and does not take
// "spec.vehicles" as a field under "spec.vehicle".
func TestTextSourcesLocate(t *testing.T) {
	var src TextSources
	src.Add("spec.yaml", "spec", TextPositions{"": {1, 1}, "vehicle": {3, 3}, "vehicle.sprung_mass_kg": {4, 19}, "road_cases[0]": {9, 5}})
	src.Add("car.yaml", "spec.vehicle", TextPositions{"": {2, 1}, "sprung_mass_kg": {5, 17}})
	src.Add("roads.yaml", "spec.road_cases", TextPositions{"": {1, 1}, "[1]": {6, 3}, "[1].speed_m_per_s": {7, 18}})
	src.Add("a.yaml", "setups[1]", TextPositions{"": {1, 1}})
	for _, c := range []struct{ field, want string }{
		{"spec.vehicle.sprung_mass_kg", "car.yaml:5:17"},
		{"spec.vehicle.corners[2].tyre_rate_n_per_m", "car.yaml:2:1"},
		{"spec.road_cases[1].speed_m_per_s", "roads.yaml:7:18"},
		{"spec.road_cases[1].weight", "roads.yaml:6:3"},
		{"spec.road_cases", "roads.yaml:1:1"},
		{"spec.vehicles", "spec.yaml:1:1"},
		{"spec.display_name", "spec.yaml:1:1"},
		{"setups[1].front.bump_ratio", "a.yaml:1:1"},
		{"setups[10].front.bump_ratio", ""},
		{"source", ""},
	} {
		got, ok := src.Locate(c.field)
		if got != c.want || ok != (c.want != "") {
			t.Errorf("Locate(%q) = %q, %v; want %q", c.field, got, ok, c.want)
		}
	}
}
