package model

import (
	"math"
	"testing"
)

// TestCaseObjectiveErrorPartials checks the first-order error of the
// per-case objectives against central differences of caseObjective (the
// definition of the derivative; step 1e-6 of each metric, truncation
// O(h²), so 1e-6 relative covers it with room): e = Σ |∂g/∂m_i| e_i for
// grip (metrics: the four tyre-load sds over their static loads) and for
// the platform objectives (ride-height sd and shift per axle, with a
// target shift).
func TestCaseObjectiveErrorPartials(t *testing.T) {
	t.Parallel()
	const tol = 1e-6
	m := CaseMetrics{
		StaticTyreLoad:  [4]float64{3600, 3600, 4300, 4300},
		TyreLoadSD:      [4]float64{310, 290, 420, 400},
		RideHeightSD:    [2]float64{0.0021, 0.0027},
		RideHeightShift: [2]float64{-0.0006, 0.0009},
	}
	for i := range m.TyreLoadSD {
		m.TyreLoadSDRel[i] = m.TyreLoadSD[i] / m.StaticTyreLoad[i]
	}
	vc := &VerifyCase{}
	errs := map[string]float64{}
	add := func(name string, e float64) {
		errs[name] = e
		vc.Rows = append(vc.Rows, VerifyRow{Metric: name, StatError: e})
	}
	for i := range 4 {
		add(cornerMetric("tyre_load_sd_n", i), 4+float64(i))
	}
	for ax := range 2 {
		add(axleMetric("ride_height_sd_m", ax), 3e-5*float64(ax+1))
		add(axleMetric("ride_height_shift_m", ax), 5e-5*float64(ax+2))
	}
	// each metric as a pointer into m, with its row's error
	type metric struct {
		p *float64
		e float64
	}
	var grip, ride []metric
	for i := range 4 {
		grip = append(grip, metric{&m.TyreLoadSDRel[i], errs[cornerMetric("tyre_load_sd_n", i)] / m.StaticTyreLoad[i]})
	}
	for ax := range 2 {
		ride = append(ride, metric{&m.RideHeightSD[ax], errs[axleMetric("ride_height_sd_m", ax)]},
			metric{&m.RideHeightShift[ax], errs[axleMetric("ride_height_shift_m", ax)]})
	}
	for _, tc := range []struct {
		o       Objective
		metrics []metric
	}{
		{Objective{Kind: ObjectiveGrip}, grip},
		{Objective{Kind: ObjectivePlatform, TargetShift: [2]float64{0.001, -0.0005}}, ride},
		{Objective{Kind: ObjectiveFrontPlatform, TargetShift: [2]float64{0.001, 0}}, ride[:2]},
		{Objective{Kind: ObjectiveRearPlatform}, ride[2:]},
	} {
		want := 0.0
		for _, x := range tc.metrics {
			h := 1e-6 * math.Abs(*x.p)
			v := *x.p
			*x.p = v + h
			up := caseObjective(&tc.o, &m)
			*x.p = v - h
			down := caseObjective(&tc.o, &m)
			*x.p = v
			want += math.Abs((up-down)/(2*h)) * x.e
		}
		got := caseObjectiveError(&tc.o, &m, vc)
		if math.Abs(got-want) > tol*want {
			t.Errorf("%s: error %.9g, from central differences %.9g", tc.o.Kind, got, want)
		}
	}
	if got := caseObjectiveError(&Objective{Kind: ObjectiveDownforce}, &m, vc); got != 0 {
		t.Errorf("downforce, which has no time-domain counterpart: error %g, want 0", got)
	}
}
