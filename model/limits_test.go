package model

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// TestPlausibleRanges: values far out of scale, which the linear algebra
// turns into NaN and infinite forces, and values that look like a unit
// slip are refused with the field named, the range stated and, for a
// slip, a hint. The ranges are common practice (see Limit), so the cases
// are either absurd (1e-300, 5e-324, 1e6) or a figure typed in the trade
// unit (150 N/mm, 250 km/h, 1600 mm).
func TestPlausibleRanges(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name   string
		mutate func(v *Vehicle, rc []RoadCase, s *Setup, c []Constraint)
		field  string
		reason string // a part of the reason
	}{
		{"damper MR 1e-300", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.Corners[0].DamperMotionRatio = 1e-300 },
			"vehicle.corners[0].damper_motion_ratio", "must be in [0.1, 2], got 1e-300"},
		{"sprung mass 5e-324 kg", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.SprungMass = 5e-324 },
			"vehicle.sprung_mass_kg", "must be in [50, 5000] kg"},
		{"speed 1e-300 m/s", func(_ *Vehicle, rc []RoadCase, _ *Setup, _ []Constraint) { rc[0].Speed = 1e-300 },
			"road_cases[0].speed_m_per_s", "must be in [1, 120] m/s"},
		{"spring MR 1e6", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.Corners[2].SpringMotionRatio = 1e6 },
			"vehicle.corners[2].spring_motion_ratio", "must be in [0.1, 2]"},
		{"bump ratio 1e6", func(_ *Vehicle, _ []RoadCase, s *Setup, _ []Constraint) { s.Axles[Rear].BumpRatio = 1e6 },
			"setup.rear.bump_ratio", "must be in [0.01, 5]"},
		{"lift-off limit 5 (a probability)", func(_ *Vehicle, _ []RoadCase, _ *Setup, c []Constraint) { c[0].Limit = 5 },
			"constraints[0].limit", "must be in (0, 1], got 5"},
		{"travel limit 25 (mm)", func(_ *Vehicle, _ []RoadCase, _ *Setup, c []Constraint) { c[1].Limit = 25 },
			"constraints[1].limit", "looks like a value in mm; 25 mm is 0.025 m"},
		{"wheel rate and spring rate", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.Corners[1].WheelRate = 80e3 },
			"vehicle.corners[1].wheel_rate_n_per_m", "give one of wheel rate or spring rate"},
		{"bar wheel rate and bar rate", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) {
			v.AntiRoll[Rear] = AntiRollBar{WheelRate: 20e3, BarRate: 50e3, MotionRatio: 0.5}
		}, "vehicle.anti_roll[1].wheel_rate_n_per_m", "give one of the bar's wheel rate or its bar rate"},
		{"spring rate in N/mm", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.Corners[3].SpringRate = 150 },
			"vehicle.corners[3].spring_rate_n_per_m", "looks like a value in N/mm; 150 N/mm is 150000 N/m"},
		{"tyre rate in N/mm", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.Corners[0].TyreRate = 280 },
			"vehicle.corners[0].tyre_rate_n_per_m", "looks like a value in N/mm"},
		{"speed in km/h", func(_ *Vehicle, rc []RoadCase, _ *Setup, _ []Constraint) { rc[0].Speed = 250 },
			"road_cases[0].speed_m_per_s", "looks like a value in km/h; 250 km/h is 69.4"},
		{"aero reference speed in km/h", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.Aero.ReferenceSpeed = 200 },
			"vehicle.aero.reference_speed_m_per_s", "looks like a value in km/h"},
		{"track in mm", func(v *Vehicle, _ []RoadCase, _ *Setup, _ []Constraint) { v.TrackRear = 1580 },
			"vehicle.track_rear_m", "looks like a value in mm; 1580 mm is 1.58 m"},
		{"knee in mm/s", func(_ *Vehicle, _ []RoadCase, s *Setup, _ []Constraint) { s.Axles[Front].KneeBump = 50 },
			"setup.front.knee_bump_m_per_s", "looks like a value in mm/s"},
		{"measured PSD of 1e300", func(_ *Vehicle, rc []RoadCase, _ *Setup, _ []Constraint) {
			rc[0] = RoadCase{Name: "m", Speed: 40, Measured: &MeasuredSpectrum{N: []float64{0.01, 1}, Left: []float64{1e300, 1e-8}}}
		}, "road_cases[0].measured.left_m3[0]", "must be finite and in [1e-24, 1000] m^3"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			v, rc, s := demoCar(), demoCases()[:1], demoSetup()
			c := []Constraint{{Kind: ConstraintLiftOff, Limit: 0.01}, {Kind: ConstraintTravel, Limit: 0.02}}
			tc.mutate(&v, rc, &s, c)
			var p problems
			p.merge("vehicle.", v.Validate())
			for i := range rc {
				p.merge(fmt.Sprintf("road_cases[%d].", i), rc[i].Validate())
			}
			p.merge("setup.", s.Validate())
			if len(p.list) == 0 {
				e, err := NewEvaluator(v, rc, EvaluatorOptions{})
				if err != nil {
					t.Fatal(err)
				}
				d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: s}
				_, err = NewProblem(e, d, DefaultObjectives(), c)
				p.merge("", err)
			}
			if len(p.list) != 1 {
				t.Fatalf("want one problem at %s, got %v", tc.field, p.err())
			}
			if got := p.list[0]; got.Field != tc.field || !strings.Contains(got.Reason, tc.reason) {
				t.Errorf("got %s: %s\nwant %s: ...%s...", got.Field, got.Reason, tc.field, tc.reason)
			}
		})
	}
}

// TestEvaluateRefusesAbsurdSetup: Evaluate's fast check agrees with
// Validate, so a damping ratio of 1e6 is an error naming the field, not a
// result.
func TestEvaluateRefusesAbsurdSetup(t *testing.T) {
	t.Parallel()
	e, err := NewEvaluator(demoCar(), demoCases()[:1], EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	s := demoSetup()
	s.Axles[Front].ReboundRatio = 1e6
	var r Result
	err = e.Evaluate(s, &r)
	var ve *ValidationError
	if !errors.As(err, &ve) || ve.Problems[0].Field != "front.rebound_ratio" {
		t.Fatalf("Evaluate of rebound ratio 1e6: %v, want a validation error at front.rebound_ratio", err)
	}
}

// TestCheckFiniteNamesTheMetric: a NaN or infinite metric is an error
// wrapping ErrNonFinite that names the case and the metric.
func TestCheckFiniteNamesTheMetric(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name   string
		mutate func(m *CaseMetrics)
		want   string // "" for no error
	}{
		{"finite", func(*CaseMetrics) {}, ""},
		{"NaN tyre load", func(m *CaseMetrics) { m.TyreLoadSD[2] = math.NaN() }, `road case "kerb": tyre_load_sd_n[2] is NaN`},
		{"infinite mean force", func(m *CaseMetrics) { m.MeanDamperForce[0] = math.Inf(-1) }, "mean_damper_force_n[0] is -Inf"},
		{"infinite pitch", func(m *CaseMetrics) { m.PitchSD = math.Inf(1) }, "pitch_sd_rad[0] is +Inf"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			m := CaseMetrics{Case: "kerb", TyreLoadSD: [4]float64{1e300, 1, 2, 3}, PitchSD: 1e-3}
			tc.mutate(&m)
			err := m.checkFinite()
			switch {
			case tc.want == "" && err != nil:
				t.Fatalf("checkFinite: %v", err)
			case tc.want != "" && (!errors.Is(err, ErrNonFinite) || !strings.Contains(err.Error(), tc.want)):
				t.Fatalf("checkFinite: %v, want ErrNonFinite with %q", err, tc.want)
			}
		})
	}
}
