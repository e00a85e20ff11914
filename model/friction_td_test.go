package model

import (
	"math"
	"strings"
	"testing"
)

// TestQuarterCarWithFrictionTimeAgainstFrequencyDomain: the quarter-car
// limit (quarterCarVehicle: symmetric car, a = b, fully coherent tracks,
// so each corner is the two-mass quarter car) with linear dampers plus
// Coulomb friction in every damper, on an ISO 8608 track-like road. The time
// domain integrates f = c v + F sign(v) as it is; the frequency domain
// uses the friction's statistical linearisation c + F sqrt(2/π)/σ at the
// fixed point (Roberts & Spanos 1990, ch. 5). The linearisation is exact
// only for a Gaussian response, which a friction damper's is not quite;
// here friction is about 40 % of the equivalent slope and the error left
// is below the record's sampling error (measured: at most 2.1 statistical
// errors over the rows). Tolerance per standard deviation: 3 statistical
// errors (VerifyRow.StatError, Bendat & Piersol's 1/sqrt(B_e T), as
// TestTimeDomainAgreesWithFrequencyDomainForLinearDampers). Without
// friction in the frequency domain (the plain linear car) the damper
// velocity must differ by more than that, so the test sees the friction.
func TestQuarterCarWithFrictionTimeAgainstFrequencyDomain(t *testing.T) {
	t.Parallel()
	const sigmas = 3.0
	q := quarterCar{m: 260, mu: 38, k: 42e3, kt: 290e3}
	v := quarterCarVehicle(q, q, 0.85)
	rc := RoadCase{Name: "smooth track, full coherence", Speed: 55, Gd0: 2e-6, Coherence: Coherence{Kind: CoherenceFull}}
	a := AxleDamping{BumpRatio: 0.35, ReboundRatio: 0.35, Friction: 60}
	s := Setup{Axles: [2]AxleDamping{a, a}}
	rep, err := Verify(v, []RoadCase{rc}, s, VerifyOptions{Seed: 17, Time: TimeOptions{Duration: 120}})
	if err != nil {
		t.Fatal(err)
	}
	c := &rep.Cases[0]
	checked := 0
	for _, r := range c.Rows {
		if !strings.Contains(r.Metric, "_sd_") || r.Frequency == 0 {
			continue
		}
		checked++
		if lim := sigmas * r.StatError; math.Abs(r.Diff) > lim {
			t.Errorf("%s: frequency %.5g, time %.5g: differ by %.3g, more than %.3g", r.Metric, r.Frequency, r.Time, r.Diff, lim)
		}
		t.Logf("%-34s freq %.5g time %.5g rel %+.4f (%.2f stat. errors)", r.Metric, r.Frequency, r.Time, r.RelDiff, r.Diff/r.StatError)
	}
	if checked == 0 {
		t.Fatal("no standard deviations compared")
	}
	// The friction matters: the same car without friction in the
	// frequency domain is further from the time domain's travel.
	plain := Setup{Axles: [2]AxleDamping{{BumpRatio: 0.35, ReboundRatio: 0.35}, {BumpRatio: 0.35, ReboundRatio: 0.35}}}
	e, err := NewEvaluator(v, []RoadCase{rc}, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var res Result
	if err := e.Evaluate(plain, &res); err != nil {
		t.Fatal(err)
	}
	dv, ok := c.Row("damper_velocity_sd_m_per_s[FL]")
	if !ok {
		t.Fatal("no damper velocity row")
	}
	if d := math.Abs(res.Cases[0].DamperVelocitySD[0] - dv.Time); d <= sigmas*dv.StatError {
		t.Errorf("without friction the damper velocity sd %.5g is as close to the time domain's %.5g (%.2g): the test cannot see friction",
			res.Cases[0].DamperVelocitySD[0], dv.Time, d)
	}
	t.Logf("friction share of c_eq: %.2f; damper velocity sd %.4g m/s", 1-0.35*v.CriticalDamping()[0]/c.Frequency.EquivalentDamping[0], c.Frequency.DamperVelocitySD[0])
}
