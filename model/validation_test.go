package model

import (
	"errors"
	"math"
	"sort"
	"strings"
	"testing"
)

// fieldsOf returns the sorted, distinct field paths of a *ValidationError.
func fieldsOf(t *testing.T, err error) []string {
	t.Helper()
	var ve *ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("error %v (%T) is not a *ValidationError", err, err)
	}
	var out []string
	seen := map[string]bool{}
	for _, p := range ve.Problems {
		if p.Reason == "" {
			t.Errorf("field %s: empty reason", p.Field)
		}
		if !seen[p.Field] {
			out = append(out, p.Field)
		}
		seen[p.Field] = true
	}
	sort.Strings(out)
	return out
}

// TestValidationNamesFields: every bad input is reported with the path of
// its field, and only bad fields are reported (house style: errors name
// the field; the API maps them to InvalidArgument field violations).
func TestValidationNamesFields(t *testing.T) {
	t.Parallel()
	good := demoCases()[:1]
	for _, tc := range []struct {
		name   string
		mutate func(v *Vehicle, rc *[]RoadCase, o *EvaluatorOptions)
		want   []string
	}{
		{"NaN sprung mass", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.SprungMass = math.NaN() }, []string{"vehicle.sprung_mass_kg"}},
		{"infinite pitch inertia", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.PitchInertia = math.Inf(1) }, []string{"vehicle.pitch_inertia_kg_m2"}},
		{"negative sprung mass", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.SprungMass = -1150 }, []string{"vehicle.sprung_mass_kg"}},
		{"negative unsprung mass", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Corners[2].UnsprungMass = -3 }, []string{"vehicle.corners[2].unsprung_mass_kg"}},
		{"zero tyre rate", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Corners[3].TyreRate = 0 }, []string{"vehicle.corners[3].tyre_rate_n_per_m"}},
		{"damper MR above 2", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Corners[1].DamperMotionRatio = 2.01 }, []string{"vehicle.corners[1].damper_motion_ratio"}},
		{"damper MR 0", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Corners[0].DamperMotionRatio = 0 }, []string{"vehicle.corners[0].damper_motion_ratio"}},
		{"spring MR negative", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Corners[2].SpringMotionRatio = -0.8 }, []string{"vehicle.corners[2].spring_motion_ratio"}},
		{"CG behind the rear axle", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.CGToRearAxle = -0.1 }, []string{"vehicle.cg_to_rear_axle_m"}},
		{"CG ahead of the front axle", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.CGToFrontAxle = 0 }, []string{"vehicle.cg_to_front_axle_m"}},
		{"CG outside the track", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.CGLateral = 0.9 }, []string{"vehicle.cg_lateral_m"}},
		{"tyre damping without envelope", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) {
			v.Corners[2].TyreEnvelopeLength, v.Corners[3].TyreEnvelopeLength = 0, 0
		}, []string{"vehicle.corners[2].tyre_envelope_length_m", "vehicle.corners[3].tyre_envelope_length_m"}},
		{"envelopes differ across an axle", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Corners[1].TyreEnvelopeLength = 0.2 }, []string{"vehicle.corners[1].tyre_envelope_length_m"}},
		{"sprung load on two corners only", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) {
			v.Corners[0].SprungLoad, v.Corners[1].SprungLoad = 3000, 3000
		}, []string{"vehicle.corners.sprung_load_n"}},
		{"bar motion ratio 3", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) {
			v.AntiRoll[0] = AntiRollBar{BarRate: 50e3, MotionRatio: 3}
		}, []string{"vehicle.anti_roll[0].motion_ratio"}},
		{"negative downforce", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Aero.Downforce[1] = -10 }, []string{"vehicle.aero.downforce_n[1]"}},
		{"aero without reference speed", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Aero.ReferenceSpeed = 0 }, []string{"vehicle.aero.reference_speed_m_per_s"}},
		{"two bad fields at once", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) {
			v.RollInertia = math.NaN()
			v.Corners[3].UnsprungMass = 0
		}, []string{"vehicle.corners[3].unsprung_mass_kg", "vehicle.roll_inertia_kg_m2"}},
		{"unknown ISO class", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) {
			(*rc)[0] = RoadCase{Name: "x", Speed: 40, Class: "J"}
		}, []string{"road_cases[0].iso_class"}},
		{"zero speed", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) { (*rc)[0].Speed = 0 }, []string{"road_cases[0].speed_m_per_s"}},
		{"no roughness", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) { (*rc)[0].Gd0 = 0 }, []string{"road_cases[0].gd0_m3"}},
		{"waviness 5", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) { (*rc)[0].Waviness = 5 }, []string{"road_cases[0].waviness"}},
		{"coherence above 1", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) {
			(*rc)[0].Coherence = Coherence{Kind: CoherenceTable, N: []float64{0.1, 1}, Gamma: []float64{0.9, 1.5}}
		}, []string{"road_cases[0].coherence.gamma[1]"}},
		{"unsorted measured n", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) {
			(*rc)[0] = RoadCase{Name: "m", Speed: 40, Measured: &MeasuredSpectrum{
				N: []float64{0.01, 0.1, 0.05, 1}, Left: []float64{1e-4, 1e-6, 4e-6, 1e-8}}}
		}, []string{"road_cases[0].measured.n_cycles_per_m[2]"}},
		{"measured PSD negative, length mismatch", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) {
			(*rc)[0] = RoadCase{Name: "m", Speed: 40, Measured: &MeasuredSpectrum{
				N: []float64{0.01, 0.1, 1}, Left: []float64{1e-4, -1e-6, 1e-8}, Right: []float64{1e-4, 1e-6}}}
		}, []string{"road_cases[0].measured.left_m3[1]", "road_cases[0].measured.right_m3"}},
		{"second road case bad", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) {
			*rc = append(*rc, RoadCase{Name: "y", Speed: math.NaN(), Gd0: 1e-6})
		}, []string{"road_cases[1].speed_m_per_s"}},
		{"no road cases", func(_ *Vehicle, rc *[]RoadCase, _ *EvaluatorOptions) { *rc = nil }, []string{"road_cases"}},
		{"even grid points", func(_ *Vehicle, _ *[]RoadCase, o *EvaluatorOptions) {
			o.Grid = Grid{MinHz: 0.1, MaxHz: 100, Points: 200}
		}, []string{"grid.points"}},
		{"grid too narrow", func(_ *Vehicle, _ *[]RoadCase, o *EvaluatorOptions) { o.Grid = Grid{MinHz: 10, MaxHz: 15, Points: 101} }, []string{"grid.max_hz"}},
		{"aero stiffer than the springs", func(v *Vehicle, _ *[]RoadCase, _ *EvaluatorOptions) { v.Aero.Stiffness = [2]float64{2e6, 2e6} }, []string{"road_cases[0].speed_m_per_s"}},
	} {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			v := demoCar()
			rc := append([]RoadCase(nil), good...)
			var o EvaluatorOptions
			tc.mutate(&v, &rc, &o)
			_, err := NewEvaluator(v, rc, o)
			if err == nil {
				t.Fatalf("no error, want problems with %v", tc.want)
			}
			got := fieldsOf(t, err)
			want := append([]string(nil), tc.want...)
			sort.Strings(want)
			if strings.Join(got, ",") != strings.Join(want, ",") {
				t.Errorf("fields %v, want %v (error: %v)", got, want, err)
			}
		})
	}
}

// TestSetupValidationNamesFields: a bad setup is refused by Evaluate with
// the setup field named.
func TestSetupValidationNamesFields(t *testing.T) {
	t.Parallel()
	ev, err := NewEvaluator(demoCar(), demoCases()[:1], EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		mutate func(s *Setup)
		want   []string
	}{
		{"zero bump ratio", func(s *Setup) { s.Axles[0].BumpRatio = 0 }, []string{"front.bump_ratio"}},
		{"NaN rebound ratio", func(s *Setup) { s.Axles[1].ReboundRatio = math.NaN() }, []string{"rear.rebound_ratio"}},
		{"negative knee", func(s *Setup) { s.Axles[1].KneeBump = -0.01 }, []string{"rear.knee_bump_m_per_s"}},
		{"high-speed factor 12", func(s *Setup) { s.Axles[0].HighSpeedRebound = 12 }, []string{"front.high_speed_rebound"}},
	} {
		s := demoSetup()
		tc.mutate(&s)
		var r Result
		err := ev.Evaluate(s, &r)
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		if got := fieldsOf(t, err); strings.Join(got, ",") != strings.Join(tc.want, ",") {
			t.Errorf("%s: fields %v, want %v", tc.name, got, tc.want)
		}
	}
	// The boundary values are accepted: MR = 2 (the range is (0, 2]).
	v := demoCar()
	v.Corners[0].DamperMotionRatio, v.Corners[1].DamperMotionRatio = 2, 2
	if _, err := NewEvaluator(v, demoCases()[:1], EvaluatorOptions{}); err != nil {
		t.Errorf("damper MR 2: %v", err)
	}
}

// TestRoughnessScaling: the model is linear in the road once the dampers
// are linearised, so every standard deviation scales as sqrt(Gd0) with
// linear dampers; with knees, scaling the knee velocities by the same
// factor keeps u = v_knee/σ and so the whole fixed point, and every sd,
// mean force and mean shift scales by it while c_eq does not change
// (property of linearity, no source needed). Tolerance relative 1e-10 for
// the fixed point's rounding.
func TestRoughnessScaling(t *testing.T) {
	t.Parallel()
	const tol = 1e-10
	const k = 3.0 // sd factor: Gd0 × 9
	v := asymmetricCar()
	base := demoCases()
	scaled := demoCases()
	for i := range scaled {
		scaled[i].Gd0 *= k * k
	}
	e1, err := NewEvaluator(v, base, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	e2, err := NewEvaluator(v, scaled, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for si, s := range symmetrySetups() {
		s2 := s
		for ax := range s2.Axles {
			s2.Axles[ax].KneeBump *= k
			s2.Axles[ax].KneeRebound *= k
		}
		var r1, r2 Result
		if err := e1.Evaluate(s, &r1); err != nil {
			t.Fatal(err)
		}
		if err := e2.Evaluate(s2, &r2); err != nil {
			t.Fatal(err)
		}
		for ci := range base {
			a, b := r1.Cases[ci], r2.Cases[ci]
			for name, x := range sdFields(&a) {
				if y := sdFields(&b)[name]; relErr(y, k*x) > tol {
					t.Errorf("setup %d, %s, %s: %g at 9·Gd0, want 3 × %g", si, base[ci].Name, name, y, x)
				}
			}
			for i := 0; i < 4; i++ {
				if relErr(b.EquivalentDamping[i], a.EquivalentDamping[i]) > tol {
					t.Errorf("setup %d, %s: c_eq %s changed: %g vs %g", si, base[ci].Name, CornerNames[i], b.EquivalentDamping[i], a.EquivalentDamping[i])
				}
				if a.MeanDamperForce[i] != 0 && relErr(b.MeanDamperForce[i], k*a.MeanDamperForce[i]) > tol {
					t.Errorf("setup %d, %s: mean damper force %s %g, want 3 × %g", si, base[ci].Name, CornerNames[i], b.MeanDamperForce[i], a.MeanDamperForce[i])
				}
			}
			for ax := 0; ax < 2; ax++ {
				if a.RideHeightShift[ax] != 0 && relErr(b.RideHeightShift[ax], k*a.RideHeightShift[ax]) > tol {
					t.Errorf("setup %d, %s: ride-height shift %s %g, want 3 × %g", si, base[ci].Name, AxleNames[ax], b.RideHeightShift[ax], a.RideHeightShift[ax])
				}
			}
		}
	}
}
