package model

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"
)

// verifyLog writes a report's rows to the test log.
func verifyLog(t *testing.T, c *VerifyCase) {
	t.Helper()
	t.Logf("%s: step %.3g s, settle %.3g s, %g s recorded", c.Case, c.Time.Step, c.Time.Settle, c.Time.Duration)
	for _, r := range c.Rows {
		k := 0.0
		if r.StatError > 0 {
			k = r.Diff / r.StatError
		}
		t.Logf("  %-36s freq %12.5g  time %12.5g  rel %+8.4f  stat.err %9.3g (%+6.2f)", r.Metric, r.Frequency, r.Time, r.RelDiff, r.StatError, k)
	}
}

func TestTimeDomainAgreesWithFrequencyDomainForLinearDampers(t *testing.T) {
	t.Parallel()
	// With linear dampers, no bump stops and the tyres on the road the
	// two models are the same linear system (the time domain uses
	// newSystem's matrices), so their standard deviations may differ only
	// by the sampling error of a finite record, which VerifyRow.StatError
	// derives from the frequency-domain spectra (Bendat & Piersol's
	// 1/sqrt(B_e T), see Verify), plus the RK4 error (~1e-4, see
	// TestRK4IsFourthOrder). Tolerance: 3 StatError, a bound for a
	// Gaussian record; the synthesised road scatters less. The equivalent
	// damping E[F v]/E[v²] of a linear damper is its slope to rounding.
	const sigmas, rounding = 3.0, 1e-9
	asym := asymmetricCar()
	tests := []struct {
		name string
		v    Vehicle
		rc   RoadCase
		z    float64
	}{
		{"demo car, fast track", demoCar(), demoCases()[0], 0.6},
		{"demo car, bumpy street", demoCar(), demoCases()[1], 0.6},
		{"demo car, heavy damping", demoCar(), demoCases()[1], 1.4},
		{"asymmetric car, fast track", asym, demoCases()[0], 0.45},
		{"demo car, measured spectrum with unequal tracks", demoCar(), RoadCase{Name: "measured", Speed: 45, Measured: &MeasuredSpectrum{
			N: []float64{0.01, 0.1, 1, 10}, Left: []float64{2e-4, 2e-6, 2e-8, 2e-10}, Right: []float64{3e-4, 3e-6, 2.5e-8, 2e-10},
			Coherence: []float64{0.95, 0.7, 0.2, 0}}}, 0.7},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			rep, err := Verify(tc.v, []RoadCase{tc.rc}, tdLinearSetup(tc.z), VerifyOptions{Seed: 11})
			if err != nil {
				t.Fatal(err)
			}
			c := &rep.Cases[0]
			worst, worstK := 0.0, 0.0
			for _, r := range c.Rows {
				switch {
				case strings.Contains(r.Metric, "_sd_"):
					if math.Abs(r.Diff) > sigmas*r.StatError {
						t.Errorf("%s: frequency %g, time %g: differ by %.2f statistical errors (%g)", r.Metric, r.Frequency, r.Time, r.Diff/r.StatError, r.StatError)
					}
					worst = math.Max(worst, math.Abs(r.RelDiff))
					worstK = math.Max(worstK, math.Abs(r.Diff/r.StatError))
				case strings.HasPrefix(r.Metric, "equivalent_damping"):
					if math.Abs(r.RelDiff) > rounding {
						t.Errorf("%s: %g against the slope %g", r.Metric, r.Time, r.Frequency)
					}
				case strings.Contains(r.Metric, "_shift_"):
					// Zero for a symmetric damper; the time domain's mean
					// of a zero-mean response is within its sampling error.
					if r.Frequency != 0 || math.Abs(r.Time) > r.StatError {
						t.Errorf("%s: frequency %g, time %g, want 0 and within %g", r.Metric, r.Frequency, r.Time, r.StatError)
					}
				case strings.HasPrefix(r.Metric, "mean_damper_force"):
					// c·mean(v): the sample mean of the velocity of a
					// periodic response is zero up to the integration
					// error, below 1e-4 of the force's standard deviation.
					i := 0
					for !strings.HasSuffix(r.Metric, "["+CornerNames[i]+"]") {
						i++
					}
					sdF := c.Frequency.EquivalentDamping[i] * c.Frequency.DamperVelocitySD[i] / tc.v.Corners[i].DamperMotionRatio
					if r.Frequency != 0 || math.Abs(r.Time) > 1e-4*sdF {
						t.Errorf("%s: frequency %g, time %g, want 0 and within %g", r.Metric, r.Frequency, r.Time, 1e-4*sdF)
					}
				}
			}
			t.Logf("%s: largest relative difference of a standard deviation %.4f, %.2f statistical errors", tc.name, worst, worstK)
			if testing.Verbose() {
				verifyLog(t, c)
			}
		})
	}
}

func TestJackingAgreesWithLinearisation(t *testing.T) {
	t.Parallel()
	// An asymmetric bilinear damper pushes (bump > rebound) or pulls
	// (rebound > bump) on average, E[F] = ½(c_b - c_r) E|v|, which moves
	// the ride height (K x̄ = -Dᵀ F̄). Statistical linearisation takes
	// E|v| = sqrt(2/π) σ of a Gaussian velocity; the true velocity is
	// skewed by the asymmetry, so the two agree only approximately.
	// Tolerance 10% on the mean ride-height shift of each axle, same sign:
	// a common-practice figure for Gaussian closure at moderate
	// nonlinearity (no single source); the run's E|v|/σ is logged to show
	// the non-Gaussianity behind the difference.
	const tolerance = 0.10
	tests := []struct {
		name  string
		rc    RoadCase
		b, r  float64
		raise bool // the car rises (bump-dominant)
	}{
		{"rebound 3x bump, fast track", demoCases()[0], 0.3, 0.9, false},
		{"rebound 3x bump, bumpy street", demoCases()[1], 0.3, 0.9, false},
		{"bump 2x rebound, fast track", demoCases()[0], 0.8, 0.4, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			a := AxleDamping{BumpRatio: tc.b, ReboundRatio: tc.r}
			rep, err := Verify(demoCar(), []RoadCase{tc.rc}, Setup{Axles: [2]AxleDamping{a, a}}, VerifyOptions{Seed: 12})
			if err != nil {
				t.Fatal(err)
			}
			c := &rep.Cases[0]
			for ax := 0; ax < 2; ax++ {
				f, tm := c.Frequency.RideHeightShift[ax], c.Time.RideHeightShift[ax]
				if (f > 0) != tc.raise || (tm > 0) != tc.raise || math.Abs(tm/f-1) > tolerance {
					t.Errorf("%s ride-height shift: frequency domain %.4g m, time domain %.4g m (%+.1f%%), want the same sign (raise %v) within %.0f%%",
						AxleNames[ax], f, tm, 100*(tm/f-1), tc.raise, 100*tolerance)
				}
				t.Logf("%s ride-height shift: frequency %.4g mm, time %.4g mm (%+.1f%%); E|v|/σ = %.3f (Gaussian 0.798)",
					AxleNames[ax], 1e3*f, 1e3*tm, 100*(tm/f-1), c.Time.VelocityAbsRatio[2*ax])
			}
		})
	}
}

func TestLinearisationErrorOfADigressiveSetup(t *testing.T) {
	t.Parallel()
	// The figure the user asks for, not a pass/fail: how far statistical
	// linearisation is from the nonlinear car for a strongly asymmetric,
	// digressive setup (tdDigressiveSetup), on both demo cases; the rows
	// are logged with -v. What is checked is a law: for a piecewise-linear
	// damper through the origin F(v)/v lies between its smallest and
	// largest slope, so E[F v]/E[v²] (time domain) and E[F'(v)] (the
	// linearisation's c_eq) must both lie in that range.
	v := demoCar()
	s := tdDigressiveSetup()
	rep, err := Verify(v, demoCases(), s, VerifyOptions{Seed: 13})
	if err != nil {
		t.Fatal(err)
	}
	d := v.wheelDampers(&s)
	for ci := range rep.Cases {
		c := &rep.Cases[ci]
		for i := 0; i < 4; i++ {
			lo := math.Min(math.Min(d[i].cb, d[i].cb*d[i].rb), math.Min(d[i].cr, d[i].cr*d[i].rr))
			hi := math.Max(math.Max(d[i].cb, d[i].cb*d[i].rb), math.Max(d[i].cr, d[i].cr*d[i].rr))
			for name, ceq := range map[string]float64{"time": c.Time.EquivalentDamping[i], "frequency": c.Frequency.EquivalentDamping[i]} {
				if ceq < lo || ceq > hi {
					t.Errorf("%s %s: %s-domain c_eq %g outside the slopes [%g, %g]", c.Case, CornerNames[i], name, ceq, lo, hi)
				}
			}
		}
		var parts []string
		for _, m := range []string{"tyre_load_sd_n[FL]", "ride_height_sd_m[front]", "ride_height_sd_m[rear]", "travel_sd_m[FL]",
			"damper_velocity_sd_m_per_s[FL]", "equivalent_damping_n_s_per_m[FL]", "ride_height_shift_m[front]", "ride_height_shift_m[rear]"} {
			if r, ok := c.Row(m); ok {
				parts = append(parts, fmt.Sprintf("%s %+.1f%%", m, 100*r.RelDiff))
			}
		}
		t.Logf("linearisation error (time vs frequency), %s: %s", c.Case, strings.Join(parts, ", "))
		if testing.Verbose() {
			verifyLog(t, c)
		}
	}
}

func TestVerifyIsSeededAndReproducible(t *testing.T) {
	t.Parallel()
	// The seed is stored, the same seed gives the same numbers bit for
	// bit, another seed another road; every row has its own name.
	v := demoCar()
	cases := demoCases()
	s := demoSetup()
	opt := VerifyOptions{Seed: 5, Time: TimeOptions{Duration: 5}}
	a, err := Verify(v, cases, s, opt)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Verify(v, cases, s, opt)
	if err != nil {
		t.Fatal(err)
	}
	opt.Seed = 6
	c, err := Verify(v, cases, s, opt)
	if err != nil {
		t.Fatal(err)
	}
	if a.Seed != 5 || c.Seed != 6 || len(a.Cases) != 2 || a.Cases[1].Case != cases[1].Name {
		t.Fatalf("seeds %d %d, %d cases", a.Seed, c.Seed, len(a.Cases))
	}
	seen := map[string]bool{}
	for k, r := range a.Cases[0].Rows {
		if seen[r.Metric] {
			t.Errorf("row %q twice", r.Metric)
		}
		seen[r.Metric] = true
		if r != b.Cases[0].Rows[k] {
			t.Errorf("row %q differs between two runs with the same seed: %+v, %+v", r.Metric, r, b.Cases[0].Rows[k])
		}
	}
	if r, ok := a.Cases[0].Row("tyre_load_sd_n[FL]"); !ok || r.Time == c.Cases[0].Rows[0].Time {
		t.Errorf("another seed gave the same tyre load %v (found %v)", r.Time, ok)
	}
	if _, ok := a.Cases[0].Row("no_such_metric"); ok {
		t.Error("found a metric that does not exist")
	}
}

func TestVerifyRejectsBadInput(t *testing.T) {
	t.Parallel()
	v := demoCar()
	bad := demoCar()
	bad.SprungMass = -1
	tests := []struct {
		name  string
		v     Vehicle
		s     Setup
		opt   VerifyOptions
		field string
	}{
		{"bad vehicle", bad, demoSetup(), VerifyOptions{}, "vehicle.sprung_mass_kg"},
		{"bad setup", v, Setup{}, VerifyOptions{}, "setup.front.bump_ratio"},
		{"bad time options", v, demoSetup(), VerifyOptions{Time: TimeOptions{Duration: -3}}, "time.duration_s"},
		{"step beyond stability", v, demoSetup(), VerifyOptions{Time: TimeOptions{Duration: 1, Step: 0.05}}, "time.step_s"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := Verify(tc.v, demoCases(), tc.s, tc.opt)
			synthWantField(t, err, tc.field)
		})
	}
}

// BenchmarkVerifyPoint is the time to verify one point of a front: the
// demo car and setup on both demo cases at the default record length
// (120 s per case), frequency and time domain, on one core. A front of
// 20 points takes 20 times as long ("s/20-points").
func BenchmarkVerifyPoint(b *testing.B) {
	v := demoCar()
	cases := demoCases()
	s := demoSetup()
	b.ReportAllocs()
	start := time.Now()
	for i := 0; i < b.N; i++ {
		if _, err := Verify(v, cases, s, VerifyOptions{Seed: uint64(i)}); err != nil {
			b.Fatal(err)
		}
	}
	per := time.Since(start).Seconds() / float64(b.N)
	b.ReportMetric(per, "s/point")
	b.ReportMetric(20*per, "s/20-points")
}
