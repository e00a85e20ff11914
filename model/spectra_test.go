package model

import (
	"math"
	"testing"
)

// The spectra a plot shows must integrate to the variances the metrics
// report: Simpson in ln f on the same grid plus the analytic tails. Here
// only the grid part is recomputed by an independent trapezoid rule, so
// the check is that grid integral <= variance and within the tail share
// (under 2 % of the variance on the demo car, see grid_test.go) plus the
// trapezoid-vs-Simpson difference.
func TestSpectraIntegrateToMetrics(t *testing.T) {
	t.Parallel()
	e, err := NewEvaluator(demoCar(), demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sp, m, err := e.Spectra(demoSetup(), 1)
	if err != nil {
		t.Fatal(err)
	}
	trap := func(y []float64) float64 {
		s := 0.0
		for k := 1; k < len(y); k++ {
			s += (y[k] + y[k-1]) / 2 * (sp.FrequencyHz[k] - sp.FrequencyHz[k-1])
		}
		return s
	}
	checks := []struct {
		name string
		psd  []float64
		sd   float64
	}{
		{"FL tyre load", sp.TyreLoad[FL], m.TyreLoadSD[FL]},
		{"front ride height", sp.RideHeight[Front], m.RideHeightSD[Front]},
		{"pitch", sp.Pitch, m.PitchSD},
		{"RR travel", sp.Travel[RR], m.TravelSD[RR]},
	}
	for _, c := range checks {
		got := trap(c.psd)
		want := c.sd * c.sd
		if math.Abs(got-want) > 0.03*want {
			t.Errorf("%s: trapezoid of the spectrum %g, metric variance %g (more than 3%% apart)", c.name, got, want)
		}
	}
	if _, _, err := e.Spectra(demoSetup(), 5); err == nil {
		t.Error("out-of-range case index accepted")
	}
}
