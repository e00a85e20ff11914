package model

// legacyScenario is one evaluation whose results were recorded with the
// per-axle linear aero before the operating point existed
// (testdata/legacy_linear_aero.json).
type legacyScenario struct {
	Name  string
	V     Vehicle
	Cases []RoadCase
	Setup Setup
}

func legacyScenarios() []legacyScenario {
	rough := append(demoCases(), RoadCase{Name: "rough, fast", Speed: 55, Class: "B"})
	linear := Setup{Axles: [2]AxleDamping{{BumpRatio: 0.5, ReboundRatio: 0.5}, {BumpRatio: 0.6, ReboundRatio: 0.6}}}
	return []legacyScenario{
		{"demo car, demo setup", demoCar(), rough, demoSetup()},
		{"demo car, linear setup", demoCar(), rough, linear},
		{"asymmetric car, demo setup", asymmetricCar(), rough, demoSetup()},
	}
}
