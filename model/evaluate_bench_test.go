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
				benchEvaluate(b, ev, demoSetup())
			})
		}
	}
}

// BenchmarkEvaluateAeroMap compares one evaluation of the demo setup on
// the demo cases for the per-axle linear aero (today's), a polynomial
// ride-height map with cross terms and a table map: the map enters only
// through the operating point and the stiffness matrix built once per
// case, so the evaluation itself should cost the same and allocate
// nothing. The "prepare" runs measure NewEvaluator, where the operating
// point is solved (Newton on the map).
func BenchmarkEvaluateAeroMap(b *testing.B) {
	table := crossAeroCar()
	tb := &AeroTable{RideHeightFront: []float64{0.01, 0.02, 0.03, 0.04, 0.05, 0.06, 0.07}, RideHeightRear: []float64{0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.09}}
	for _, hf := range tb.RideHeightFront {
		for _, hr := range tb.RideHeightRear {
			f, _ := table.Aero.Polynomial.at([2]float64{hf, hr})
			tb.Front, tb.Rear = append(tb.Front, f[0]+2e5*(hf-0.04)*(hf-0.04)), append(tb.Rear, f[1])
		}
	}
	table.Aero = Aero{ReferenceSpeed: 50, Table: tb}
	for _, car := range []struct {
		name string
		v    Vehicle
	}{{"linear", demoCar()}, {"polynomial", crossAeroCar()}, {"table", table}} {
		b.Run(car.name+"/evaluate", func(b *testing.B) {
			ev, err := NewEvaluator(car.v, demoCases(), EvaluatorOptions{})
			if err != nil {
				b.Fatal(err)
			}
			s := demoSetup()
			var r Result
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if err := ev.Evaluate(s, &r); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(car.name+"/prepare", func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				if _, err := NewEvaluator(car.v, demoCases(), EvaluatorOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkEvaluateHeave compares one evaluation of the demo setup on the
// demo cases for the demo car without heave elements and with a heave
// spring, packer and heave damper (a knee, so it iterates with the
// corners) on each axle: the heave damper adds two damper coordinates to
// the fixed point and two outputs per frequency; the evaluation must
// still allocate nothing.
func BenchmarkEvaluateHeave(b *testing.B) {
	withKnee := demoSetup()
	withKnee.Heave = [2]AxleDamping{withKnee.Axles[Front], withKnee.Axles[Rear]}
	for _, car := range []struct {
		name string
		v    Vehicle
		s    Setup
	}{{"none", demoCar(), demoSetup()}, {"heave", heaveCar(), withKnee}} {
		b.Run(car.name, func(b *testing.B) {
			ev, err := NewEvaluator(car.v, demoCases(), EvaluatorOptions{})
			if err != nil {
				b.Fatal(err)
			}
			r := benchEvaluate(b, ev, car.s)
			iters := 0
			for _, m := range r.Cases {
				iters += m.Iterations
			}
			b.ReportMetric(float64(iters), "iterations")
		})
	}
}
