package model

import "testing"

// BenchmarkTransientCase is one evaluation of one manoeuvre or kerb case
// on the demo car (piecewise dampers with knees); its history buffers
// come from the case's pool, so a warm evaluation allocates nothing.
// Beside ns/op it reports the process's user CPU per evaluation
// (user-ns/op; run with -cpu 1 so that it is one core's).
func BenchmarkTransientCase(b *testing.B) {
	v := demoCar()
	v.LoadPaths = LoadPaths{CGHeight: 0.45, RollCentreHeight: [2]float64{0.05, 0.08}, UnsprungCGHeight: [2]float64{0.33, 0.34}}
	s := demoSetup()
	d := v.dampers(&s)
	for _, bc := range []struct {
		name string
		man  *Manoeuvre
		kerb *Kerb
	}{
		{"brake", &Manoeuvre{Name: "brake", Shape: ShapeBrake, Speed: 55, Longitudinal: 1.8 * Gravity, Start: 0.1, Ramp: 0.15}, nil},
		{"turn_in", &Manoeuvre{Name: "turn", Shape: ShapeTurnIn, Speed: 45, Lateral: 1.6 * Gravity, Start: 0.1, Ramp: 0.3}, nil},
		{"kerb", nil, &Kerb{Name: "kerb", Shape: KerbTrapezoid, Side: KerbLeft, Height: 0.03, Length: 1.5, Speed: 40}},
		// A logged braking zone: the speed, and with it the aero
		// stiffness, falls through the record.
		{"table", &Manoeuvre{Name: "zone", Shape: ShapeTable, Table: []ManoeuvrePoint{
			{Time: 0, Speed: 60}, {Time: 0.1, Ax: -1.6 * Gravity, Speed: 59}, {Time: 1.0, Ax: -1.4 * Gravity, Speed: 45}, {Time: 1.3, Ay: 1.2 * Gravity, Speed: 44}}}, nil},
	} {
		b.Run(bc.name, func(b *testing.B) {
			c := prepare(b, &v, bc.man, bc.kerb, TransientOptions{}, &[nDamp]wheelDamper{{cb: 2 * d[0].cr}, {cb: 2 * d[1].cr}, {cb: 2 * d[2].cr}, {cb: 2 * d[3].cr}})
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
