package study

import "testing"

func TestSettingsPath(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ in, want string }{
		{"Settings.PopulationSize", "search.population_size"},
		{"Settings.ReferencePoint[1]", "search.reference_point[1]"},
		{"Settings.MutationEta", "search.mutation_eta"},
		{"Problem.Bounds[2]", "design_space"},
	} {
		if got := settingsPath(c.in); got != c.want {
			t.Errorf("settingsPath(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
