package model

import "testing"

// Every mode gets a name, light or heavy damping: seven modes for seven
// degrees of freedom (a property of the eigenproblem: 14 roots of the
// state matrix, in 7 conjugate or real pairs).
func TestModalAnalysisNamesSevenModes(t *testing.T) {
	t.Parallel()
	v := demoCar()
	for _, z := range []float64{0.2, 0.7, 1.1, 1.3, 1.6} {
		s := Setup{Axles: [2]AxleDamping{{BumpRatio: z, ReboundRatio: z}, {BumpRatio: z, ReboundRatio: z}}}
		modes, err := ModalAnalysis(&v, &s, 40)
		if err != nil {
			t.Fatal(err)
		}
		if len(modes) != 7 {
			t.Errorf("ζ=%g: %d modes, want 7: %+v", z, len(modes), modes)
		}
		seen := map[string]bool{}
		for _, m := range modes {
			if seen[m.Name] {
				t.Errorf("ζ=%g: mode %q twice", z, m.Name)
			}
			seen[m.Name] = true
			if !(m.FrequencyHz > 0) || !(m.DampingRatio > 0) {
				t.Errorf("ζ=%g: %+v", z, m)
			}
		}
	}
}
