package model

import (
	"fmt"
	"testing"
)

// BenchmarkEvaluate measures one full evaluation (statistical
// linearisation to its fixed point and all metrics) of the demo setup on
// the default grid, for the symmetric demo car (in-phase/anti-phase split)
// and the asymmetric one (full 7-DOF path), on one and three road cases.
// Evaluate reuses dst, so allocs/op shows what the hot loop allocates.
func BenchmarkEvaluate(b *testing.B) {
	three := append(demoCases(), RoadCase{Name: "kerb line", Speed: 35, Gd0: 40e-6, Waviness: 2.5})
	for _, car := range []struct {
		name string
		v    Vehicle
	}{{"symmetric", demoCar()}, {"asymmetric", asymmetricCar()}} {
		for _, n := range []int{1, 3} {
			b.Run(fmt.Sprintf("%s/cases=%d", car.name, n), func(b *testing.B) {
				ev, err := NewEvaluator(car.v, three[:n], EvaluatorOptions{})
				if err != nil {
					b.Fatal(err)
				}
				s := demoSetup()
				var r Result
				if err := ev.Evaluate(s, &r); err != nil {
					b.Fatal(err)
				}
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					if err := ev.Evaluate(s, &r); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
