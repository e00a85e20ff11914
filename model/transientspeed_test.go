package model

import (
	"errors"
	"math"
	"testing"
)

// A logged table whose speed steps from 40 to 60 m/s and holds settles
// at the car-at-speed point of 60 m/s: per axle, the body point on the
// axle line carries the axle's downforce alone (forces at the two axle
// lines only: statically determinate), so its ride-height change is
//
//	Δh_a(V) = −s F_a / (k_a − s K_a),   s = (V/V_ref)²
//
// (Hooke, x = F/(k − k_a)), k_a the axle's two wheel rates in series
// with its two tyres (the bar does not stroke in heave), F_a and K_a the
// linear map's downforce and aero stiffness at V_ref. The record starts
// from the point at 40 m/s, so the settled ride height (the change from
// there) must be Δh_a(60) − Δh_a(40), both from the closed form; the
// quasi-static end state (what the metrics' steady values read) too.
// Tolerance 1e-6 of the change: the slowest body mode decays by
// e^(−ζω t) < 1e-7 in the 3 s held, and the linear map makes the
// linearisation exact.
func TestTransientTableSpeedSettlesAtSpeed(t *testing.T) {
	t.Parallel()
	v := transientCar()
	v.Aero = demoCar().Aero
	d := linearDampers(&v, 0.5)
	man := &Manoeuvre{Name: "straight", Shape: ShapeTable, Table: []ManoeuvrePoint{
		{Time: 0, Speed: 40}, {Time: 0.3, Speed: 40}, {Time: 0.8, Speed: 60}, {Time: 4, Speed: 60}}}
	c := prepare(t, &v, man, nil, TransientOptions{}, &d)
	if c.tm.width != inWidthSpeed {
		t.Errorf("sample width %d, want %d (the speed's q)", c.tm.width, inWidthSpeed)
	}
	m := c.tm
	m.damp = d
	var log sampleLog
	m.integrate(c.in, c.steps, 0, c.h, c.x0, &log)
	drop := func(ax int, speed float64) float64 {
		cn := v.Corners[2*ax]
		kw := cn.SpringRate * cn.SpringMotionRatio * cn.SpringMotionRatio
		k := 1 / (1/(2*kw) + 1/(2*cn.TyreRate))
		s := (speed / v.Aero.ReferenceSpeed) * (speed / v.Aero.ReferenceSpeed)
		return -s * v.Aero.Downforce[ax] / (k - s*v.Aero.Stiffness[ax])
	}
	last := log.out[len(log.out)-1]
	tr := v.axleRows()
	for ax := 0; ax < 2; ax++ {
		want := drop(ax, 60) - drop(ax, 40)
		if got := last[outRide+ax]; math.Abs(got-want) > 1e-6*math.Abs(want) {
			t.Errorf("%s: settled ride-height change %.9g m, statics %.9g m", AxleNames[ax], got, want)
		}
		qs := tr[ax][0]*c.final[0] + tr[ax][1]*c.final[1] + tr[ax][2]*c.final[2]
		if math.Abs(qs-want) > 1e-9*math.Abs(want) {
			t.Errorf("%s: quasi-static end %.9g m, statics %.9g m", AxleNames[ax], qs, want)
		}
	}
}

// A table that reaches a speed where the aero stiffness, grown with the
// dynamic pressure, exceeds the suspension's is refused as the operating
// point refuses it: at 90 m/s a map of 150 N/mm per axle at 50 m/s gives
// 486 N/mm against the front axle's 155 N/mm at the ground (springs and
// tyres in series, by hand).
func TestTransientTableSpeedBeyondStability(t *testing.T) {
	t.Parallel()
	v := transientCar()
	v.Aero = demoCar().Aero
	v.Aero.Stiffness = [2]float64{150e3, 150e3}
	d := linearDampers(&v, 0.5)
	man := &Manoeuvre{Name: "fast", Shape: ShapeTable, Table: []ManoeuvrePoint{{Time: 0, Speed: 30}, {Time: 1, Speed: 90}}}
	var slope [nDamp]float64
	for i := range d {
		slope[i] = d[i].steepest()
	}
	_, err := newTransientCase(&v, man, nil, TransientOptions{}.withDefaults(), slope)
	if !errors.Is(err, ErrNoEquilibrium) {
		t.Errorf("got %v, want an error wrapping ErrNoEquilibrium", err)
	}
}
