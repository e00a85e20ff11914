package model

import (
	"math"
	"testing"
)

// TestStaticLoadsAndExceedance checks the static tyre loads and the
// Gaussian exceedance probabilities against statics and the normal
// distribution written here: an axle's two tyres carry its sprung load
// (lever rule along the car), their unsprung weight and the axle's
// downforce at the operating point, which for the linear map is
// q·(D - k_a·Δh), q = (V/V_ref)², Δh the axle's reported ride-height
// change (the downforce acts at the axle line, so each axle carries its
// own); with linear dampers and bump = rebound there is no mean shift, so
// P(lift-off) = P(X > F_static) and P(bump stop) = P(s > gap left at
// speed) for zero-mean Gaussian X, s with the reported sd, i.e.
// erfc(margin/(σ sqrt 2))/2. Tolerance relative 1e-12 on the loads,
// 1e-9 on the probabilities (math.Erfc's accuracy over the range used).
func TestStaticLoadsAndExceedance(t *testing.T) {
	t.Parallel()
	v := asymmetricCar()
	cases := []RoadCase{
		{Name: "smooth, fast", Speed: 55, Gd0: 2e-6},
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
		for ax := 0; ax < 2; ax++ {
			axle := v.SprungMass * g * [2]float64{v.CGToRearAxle, v.CGToFrontAxle}[ax] / l
			df := q * (v.Aero.Downforce[ax] - v.Aero.Stiffness[ax]*m.AtSpeed.RideHeightChange[ax])
			want := axle + (v.Corners[2*ax].UnsprungMass+v.Corners[2*ax+1].UnsprungMass)*g + df
			if got := m.StaticTyreLoad[2*ax] + m.StaticTyreLoad[2*ax+1]; relErr(got, want) > 1e-12 {
				t.Errorf("%s %s axle: static tyre loads %.10g N, statics %.10g N", rc.Name, AxleNames[ax], got, want)
			}
		}
		for i := 0; i < 4; i++ {
			load := m.StaticTyreLoad[i]
			if relErr(m.TyreLoadSDRel[i], m.TyreLoadSD[i]/load) > 1e-12 {
				t.Errorf("%s %s: normalised tyre load sd %g, want %g", rc.Name, CornerNames[i], m.TyreLoadSDRel[i], m.TyreLoadSD[i]/load)
			}
			pl := 0.5 * math.Erfc(load/(m.TyreLoadSD[i]*math.Sqrt2))
			if math.Abs(m.LiftOffProbability[i]-pl) > 1e-9*pl+1e-300 {
				t.Errorf("%s %s: lift-off probability %.10g, normal tail %.10g", rc.Name, CornerNames[i], m.LiftOffProbability[i], pl)
			}
			gap := v.Corners[i].BumpStopGap - m.AtSpeed.Compression[i]
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
