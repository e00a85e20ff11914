package model

import (
	"math"
	"testing"
)

// TestStaticLoadsAndExceedance checks the static tyre loads and the
// Gaussian exceedance probabilities against statics and the normal
// distribution written here: the static load of a tyre is its sprung
// corner load (lever rule along and across the car), its unsprung weight
// and half its axle's downforce at the case speed, (V/V_ref)² times the
// reference figure; with linear dampers and bump = rebound there is no
// mean shift, so P(lift-off) = P(X > F_static) and P(bump stop) =
// P(s > gap) for zero-mean Gaussian X, s with the reported sd, i.e.
// erfc(margin/(σ sqrt 2))/2. Tolerance relative 1e-12 on the loads,
// 1e-9 on the probabilities (math.Erfc's accuracy over the range used).
func TestStaticLoadsAndExceedance(t *testing.T) {
	t.Parallel()
	v := asymmetricCar()
	cases := []RoadCase{
		{Name: "smooth, fast", Speed: 60, Gd0: 2e-6},
		// Rough enough that lift-off and bump-stop probabilities are not
		// negligible (a kerb-like case).
		{Name: "rough", Speed: 45, Class: "C"},
	}
	ev, err := NewEvaluator(v, cases, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var res Result
	s := Setup{Axles: [2]AxleDamping{{BumpRatio: 0.5, ReboundRatio: 0.5}, {BumpRatio: 0.6, ReboundRatio: 0.6}}}
	if err := ev.Evaluate(s, &res); err != nil {
		t.Fatal(err)
	}
	l := v.CGToFrontAxle + v.CGToRearAxle
	const g = 9.80665 // standard gravity (m/s²), ISO 80000-3
	for ci, rc := range cases {
		m := res.Cases[ci]
		q := (rc.Speed / v.Aero.ReferenceSpeed) * (rc.Speed / v.Aero.ReferenceSpeed)
		for i := 0; i < 4; i++ {
			ax := i / 2
			axle := v.SprungMass * g * [2]float64{v.CGToRearAxle, v.CGToFrontAxle}[ax] / l
			track := [2]float64{v.TrackFront, v.TrackRear}[ax]
			left := (track/2 + v.CGLateral) / track
			share := left
			if i%2 == 1 {
				share = 1 - left
			}
			want := axle*share + v.Corners[i].UnsprungMass*g + v.Aero.Downforce[ax]*q/2
			if relErr(m.StaticTyreLoad[i], want) > 1e-12 {
				t.Errorf("%s %s: static tyre load %.10g N, statics %.10g N", rc.Name, CornerNames[i], m.StaticTyreLoad[i], want)
			}
			if relErr(m.TyreLoadSDRel[i], m.TyreLoadSD[i]/want) > 1e-12 {
				t.Errorf("%s %s: normalised tyre load sd %g, want %g", rc.Name, CornerNames[i], m.TyreLoadSDRel[i], m.TyreLoadSD[i]/want)
			}
			pl := 0.5 * math.Erfc(want/(m.TyreLoadSD[i]*math.Sqrt2))
			if math.Abs(m.LiftOffProbability[i]-pl) > 1e-9*pl+1e-300 {
				t.Errorf("%s %s: lift-off probability %.10g, normal tail %.10g", rc.Name, CornerNames[i], m.LiftOffProbability[i], pl)
			}
			gap := v.Corners[i].BumpStopGap
			pb := 0.5 * math.Erfc(gap/(m.TravelSD[i]*math.Sqrt2))
			if math.Abs(m.BumpStopProbability[i]-pb) > 1e-9*pb+1e-300 {
				t.Errorf("%s %s: bump-stop probability %.10g, normal tail %.10g", rc.Name, CornerNames[i], m.BumpStopProbability[i], pb)
			}
		}
		// Warnings follow the probabilities and the 1% default threshold.
		var want Warnings
		for i := 0; i < 4; i++ {
			if m.LiftOffProbability[i] > 0.01 {
				want |= WarnLiftOff
			}
			if m.BumpStopProbability[i] > 0.01 {
				want |= WarnBumpStop
			}
		}
		if m.Warnings != want {
			t.Errorf("%s: warnings %b, want %b", rc.Name, m.Warnings, want)
		}
		t.Logf("%s: worst lift-off %.3g, bump stop %.3g", rc.Name, maxOf(m.LiftOffProbability), maxOf(m.BumpStopProbability))
	}
	if res.Cases[1].Warnings == 0 {
		t.Errorf("class C at 45 m/s raises no warning; the case is meant to exceed 1%%")
	}
}

func maxOf(x [4]float64) float64 {
	m := x[0]
	for _, v := range x[1:] {
		m = math.Max(m, v)
	}
	return m
}
