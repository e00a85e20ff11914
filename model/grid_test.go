package model

import (
	"fmt"
	"math"
	"testing"
)

// sdFields returns every standard deviation a CaseMetrics reports, named.
func sdFields(m *CaseMetrics) map[string]float64 {
	out := map[string]float64{
		"ride height sd front": m.RideHeightSD[0], "ride height sd rear": m.RideHeightSD[1],
		"pitch sd": m.PitchSD, "roll sd": m.RollSD, "heave acceleration sd": m.HeaveAccelSD,
	}
	for i := 0; i < 4; i++ {
		c := CornerNames[i]
		out[c+" tyre load sd"] = m.TyreLoadSD[i]
		out[c+" tyre load sd / static"] = m.TyreLoadSDRel[i]
		out[c+" travel sd"] = m.TravelSD[i]
		out[c+" damper velocity sd"] = m.DamperVelocitySD[i]
	}
	return out
}

// TestGridTruncation checks the requirement that the default grid
// (with its analytic power-law tails) loses or gains less than 0.5% of
// every reported standard deviation on the demo car, against a grid seven
// decades wide with 20001 points (fineGrid, accurate to about 1e-6, see
// quartercar_test.go and lyapunov_test.go). Run on the demo car and the
// asymmetric car, the demo road cases and several setups; the worst figure
// is logged.
func TestGridTruncation(t *testing.T) {
	t.Parallel()
	const tol = 0.005 // the figure
	for _, tc := range []struct {
		name string
		v    Vehicle
	}{{"demo car", demoCar()}, {"asymmetric car", asymmetricCar()}} {
		tc := tc
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			cases := demoCases()
			coarse, err := NewEvaluator(tc.v, cases, EvaluatorOptions{})
			if err != nil {
				t.Fatal(err)
			}
			fine, err := NewEvaluator(tc.v, cases, EvaluatorOptions{Grid: fineGrid})
			if err != nil {
				t.Fatal(err)
			}
			worst, where := 0.0, ""
			for si, s := range symmetrySetups() {
				var rc, rf Result
				if err := coarse.Evaluate(s, &rc); err != nil {
					t.Fatal(err)
				}
				if err := fine.Evaluate(s, &rf); err != nil {
					t.Fatal(err)
				}
				for ci := range cases {
					got, want := sdFields(&rc.Cases[ci]), sdFields(&rf.Cases[ci])
					for name, w := range want {
						e := math.Abs(got[name]-w) / w
						if e > worst {
							worst, where = e, fmt.Sprintf("setup %d, %s, %s", si, cases[ci].Name, name)
						}
						if e > tol {
							t.Errorf("setup %d, %s, %s: default grid %.6g, fine grid %.6g, rel. error %.2g > %g",
								si, cases[ci].Name, name, got[name], w, e, tol)
						}
					}
				}
			}
			t.Logf("worst truncation error %.3g%% (%s)", 100*worst, where)
		})
	}
}
