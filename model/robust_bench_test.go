package model

import "testing"

// BenchmarkRobustEvaluate measures one robust evaluation of the demo
// setup (the demo car on its two road cases) against the nominal one: 3
// Gauss-Legendre nodes on fuel, all-tyre rate and downforce make 27 cars
// per setup. It reports allocations, the process's user CPU per op
// (user-ns/op) and the cars per op. Run with -cpu 1.
func BenchmarkRobustEvaluate(b *testing.B) {
	v := demoCar()
	cases := demoCases()
	d := DesignSpace{Ratios: [4]Range{{0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}, {0.2, 1.6}}, Base: demoSetup()}
	e, err := NewEvaluator(v, cases, EvaluatorOptions{})
	if err != nil {
		b.Fatal(err)
	}
	p, err := NewProblem(e, d, DefaultObjectives(), []Constraint{{Kind: ConstraintLiftOff, Limit: 0.01}})
	if err != nil {
		b.Fatal(err)
	}
	u := Uncertainty{FuelMass: &Range{10, 100}, TyreRateScaleAll: &Range{0.9, 1.1}, DownforceScale: &Range{0.9, 1.05}, Nodes: 3}
	u = u.WithDefaults()
	pts := u.UncertainPoints()
	evals := uncertainEvaluators(b, &v, cases, pts, nil)
	rp, err := NewRobustProblem(p, &u, pts, evals)
	if err != nil {
		b.Fatal(err)
	}
	x := d.Encode(demoSetup())
	for _, bc := range []struct {
		name string
		p    *Problem
		cars int
	}{{"nominal", p, 1}, {"robust27", rp, len(pts)}} {
		b.Run(bc.name, func(b *testing.B) {
			obj, viol := make([]float64, 2), make([]float64, 1)
			if err := bc.p.EvaluateGenes(x, obj, viol); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			cpu0, ok := processCPU()
			for i := 0; i < b.N; i++ {
				if err := bc.p.EvaluateGenes(x, obj, viol); err != nil {
					b.Fatal(err)
				}
			}
			if cpu1, ok1 := processCPU(); ok && ok1 {
				b.ReportMetric(float64(cpu1-cpu0)/float64(b.N), "user-ns/op")
			}
			b.ReportMetric(float64(bc.cars), "cars/op")
		})
	}
}
