package model

import "testing"

// Test fixtures. demoCar is the invented GT-style car of the demo
// (testdata/), used only where a test needs "a plausible car"; expected
// values never come from it, they come from the sources named at each check.

func demoCar() Vehicle {
	front := Corner{SpringRate: 160e3, SpringMotionRatio: 0.80, DamperMotionRatio: 0.80,
		UnsprungMass: 45, TyreRate: 320e3, TyreDamping: 150, TyreEnvelopeLength: 0.18, BumpStopGap: 0.030}
	rear := Corner{SpringRate: 180e3, SpringMotionRatio: 0.78, DamperMotionRatio: 0.78,
		UnsprungMass: 50, TyreRate: 340e3, TyreDamping: 150, TyreEnvelopeLength: 0.18, BumpStopGap: 0.035}
	return Vehicle{
		Name:       "Quillon GT (invented demo car)",
		SprungMass: 1150, PitchInertia: 1800, RollInertia: 450,
		CGToFrontAxle: 1.378, CGToRearAxle: 1.272,
		TrackFront: 1.65, TrackRear: 1.62,
		Corners:  [4]Corner{front, front, rear, rear},
		AntiRoll: [2]AntiRollBar{{WheelRate: 60e3}, {WheelRate: 30e3}},
		Aero: Aero{ReferenceSpeed: 50, Downforce: [2]float64{2600, 3400},
			Stiffness: [2]float64{40e3, 30e3}},
	}
}

func demoCases() []RoadCase {
	return []RoadCase{
		{Name: "Ashgrove Ring, fast sweepers", Speed: 55, Gd0: 2e-6},
		{Name: "Port Vellan streets, bumpy braking zone", Speed: 30, Gd0: 12e-6, Waviness: 2.3},
	}
}

func demoSetup() Setup {
	ax := AxleDamping{BumpRatio: 0.55, ReboundRatio: 0.85, KneeBump: 0.05, KneeRebound: 0.06,
		HighSpeedBump: 0.45, HighSpeedRebound: 0.55}
	return Setup{Axles: [2]AxleDamping{ax, ax}}
}

// asymmetric returns the demo car with a lateral CG offset and a stiffer
// right-rear spring, so that the symmetric split does not apply.
func asymmetricCar() Vehicle {
	v := demoCar()
	v.CGLateral = 0.02
	v.Corners[RR].SpringRate = 190e3
	return v
}

// systemAt builds the undamped system of v about its operating point at
// speed.
func systemAt(t testing.TB, v *Vehicle, speed float64) *system {
	t.Helper()
	op, err := v.operatingPoint(speed)
	if err != nil {
		t.Fatal(err)
	}
	return newSystem(v, &op.AeroStiffness)
}

// timeModelAt builds the time-domain model of v about its operating point
// at speed.
func timeModelAt(t testing.TB, v *Vehicle, s *Setup, speed float64) *timeModel {
	t.Helper()
	op, err := v.operatingPoint(speed)
	if err != nil {
		t.Fatal(err)
	}
	return newTimeModel(v, s, &op)
}

// crossAeroCar is the demo car with a first-order ride-height aero map
// that has cross terms: each axle's downforce depends on both ride
// heights (raising the rear loads the front, as a rake change does).
func crossAeroCar() Vehicle {
	v := demoCar()
	v.RestRideHeight = [2]float64{0.055, 0.075}
	v.Aero = Aero{ReferenceSpeed: 50, Polynomial: &AeroPolynomial{
		Origin: v.RestRideHeight,
		Terms: []AeroTerm{
			{Coefficient: [2]float64{2600, 3400}},
			{PowerFront: 1, Coefficient: [2]float64{-36e3, 9e3}},
			{PowerRear: 1, Coefficient: [2]float64{6e3, -26e3}},
		},
	}}
	return v
}
