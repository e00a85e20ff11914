package model

import "testing"

// BenchmarkTransientCase is one evaluation of one manoeuvre or kerb case
// on the demo car (piecewise dampers with knees); its history buffers
// come from the case's pool, so a warm evaluation allocates nothing.
// The _heave cases run the demo car with heave springs, packers and
// dampers (heaveCar), kerb_stops the demo car with bump-stop curves.
// Beside ns/op it reports the process's user CPU per evaluation
// (user-ns/op; run with -cpu 1 so that it is one core's).
func BenchmarkTransientCase(b *testing.B) {
	paths := LoadPaths{CGHeight: 0.45, RollCentreHeight: [2]float64{0.05, 0.08}, UnsprungCGHeight: [2]float64{0.33, 0.34}}
	demo, heave, stops := demoCar(), heaveCar(), demoCar()
	demo.LoadPaths, heave.LoadPaths, stops.LoadPaths = paths, paths, paths
	for i := range stops.Corners {
		stops.Corners[i].BumpStopGap = 0.012
		stops.Corners[i].BumpStop = BumpStop{Deflection: []float64{0.004, 0.010}, Force: []float64{400, 2400}}
	}
	brake := &Manoeuvre{Name: "brake", Shape: ShapeBrake, Speed: 55, Longitudinal: 1.8 * Gravity, Start: 0.1, Ramp: 0.15}
	kerb := &Kerb{Name: "kerb", Shape: KerbTrapezoid, Side: KerbLeft, Height: 0.03, Length: 1.5, Speed: 40}
	for _, bc := range []struct {
		name string
		v    *Vehicle
		s    Setup
		man  *Manoeuvre
		kerb *Kerb
	}{
		{"brake", &demo, demoSetup(), brake, nil},
		{"turn_in", &demo, demoSetup(), &Manoeuvre{Name: "turn", Shape: ShapeTurnIn, Speed: 45, Lateral: 1.6 * Gravity, Start: 0.1, Ramp: 0.3}, nil},
		{"kerb", &demo, demoSetup(), nil, kerb},
		// A logged braking zone: the speed, and with it the aero
		// stiffness, falls through the record.
		{"table", &demo, demoSetup(), &Manoeuvre{Name: "zone", Shape: ShapeTable, Table: []ManoeuvrePoint{
			{Time: 0, Speed: 60}, {Time: 0.1, Ax: -1.6 * Gravity, Speed: 59}, {Time: 1.0, Ax: -1.4 * Gravity, Speed: 45}, {Time: 1.3, Ay: 1.2 * Gravity, Speed: 44}}}, nil},
		{"brake_heave", &heave, heaveSetup(demoSetup(), 0.5), brake, nil},
		{"kerb_heave", &heave, heaveSetup(demoSetup(), 0.5), nil, kerb},
		{"kerb_stops", &stops, demoSetup(), nil, kerb},
	} {
		b.Run(bc.name, func(b *testing.B) {
			d := bc.v.dampers(&bc.s)
			var top [nDamp]wheelDamper // prepared for twice the setup's rebound slopes
			for i := range top {
				top[i] = wheelDamper{cb: 2 * d[i].cr}
			}
			c := prepare(b, bc.v, bc.man, bc.kerb, TransientOptions{}, &top)
			var m TransientMetrics
			if err := c.evaluate(&d, &m); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			cpu0, ok := processCPU()
			n := 0
			for b.Loop() {
				if err := c.evaluate(&d, &m); err != nil {
					b.Fatal(err)
				}
				n++
			}
			if cpu1, ok1 := processCPU(); ok && ok1 && n > 0 {
				b.ReportMetric(float64(cpu1-cpu0)/float64(n), "user-ns/op")
			}
			b.ReportMetric(float64(c.steps), "steps")
		})
	}
}
