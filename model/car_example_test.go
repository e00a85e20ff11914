package model_test

import "dampfront/model"

// exampleCar is the invented GT-style car of the examples (the demo's,
// testdata/quillon-gt.yaml, in SI).
func exampleCar() model.Vehicle {
	front := model.Corner{SpringRate: 160e3, SpringMotionRatio: 0.80, DamperMotionRatio: 0.80,
		UnsprungMass: 45, TyreRate: 320e3, TyreDamping: 150, TyreEnvelopeLength: 0.18, BumpStopGap: 0.030}
	rear := model.Corner{SpringRate: 180e3, SpringMotionRatio: 0.78, DamperMotionRatio: 0.78,
		UnsprungMass: 50, TyreRate: 340e3, TyreDamping: 150, TyreEnvelopeLength: 0.18, BumpStopGap: 0.035}
	return model.Vehicle{
		Name:       "Quillon GT (invented demo car)",
		SprungMass: 1150, PitchInertia: 1800, RollInertia: 450,
		CGToFrontAxle: 1.378, CGToRearAxle: 1.272,
		TrackFront: 1.65, TrackRear: 1.62,
		Corners:  [4]model.Corner{front, front, rear, rear},
		AntiRoll: [2]model.AntiRollBar{{WheelRate: 60e3}, {WheelRate: 30e3}},
		Aero: model.Aero{ReferenceSpeed: 50, Downforce: [2]float64{2600, 3400},
			Stiffness: [2]float64{40e3, 30e3}},
	}
}

// exampleSetup is a setup of damping ratios at the wheel, the same on
// both axles: bump 0.55, rebound 0.85, knees at 50 and 60 mm/s, the
// high-speed slopes at 45 % and 55 % of the low-speed ones.
func exampleSetup() model.Setup {
	ax := model.AxleDamping{BumpRatio: 0.55, ReboundRatio: 0.85, KneeBump: 0.05, KneeRebound: 0.06,
		HighSpeedBump: 0.45, HighSpeedRebound: 0.55}
	return model.Setup{Axles: [2]model.AxleDamping{ax, ax}}
}
