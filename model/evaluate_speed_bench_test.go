package model

import (
	"testing"
)

// roughCase is ISO 8608 class C (G_d(n_0) = 256e-6 m³, the class's
// geometric mean; ISO 8608:2016, table 1) at 50 m/s: a rough road on
// which the linearisation needs more sweeps than on the demo's smooth
// circuit.
func roughCase() RoadCase {
	return RoadCase{Name: "ISO 8608 class C", Speed: 50, Gd0: 256e-6}
}

// BenchmarkEvaluatePath measures one evaluation of the demo setup on one
// road case, the rough ISO class C road and the demo's smooth circuit,
// on the symmetric path (in-phase/anti-phase split) and the general one
// (the full 7-DOF system, forced). It reports the fixed-point sweeps of
// the case as iterations/op and the process's user CPU time per op as
// user-ns/op. Run with -cpu 1 to compare on one core.
func BenchmarkEvaluatePath(b *testing.B) {
	for _, rc := range []struct {
		name string
		rc   RoadCase
	}{{"rough", roughCase()}, {"smooth", demoCases()[0]}} {
		for _, path := range []struct {
			name    string
			general bool
		}{{"symmetric", false}, {"general", true}} {
			b.Run(rc.name+"/"+path.name, func(b *testing.B) {
				ev, err := NewEvaluator(demoCar(), []RoadCase{rc.rc}, EvaluatorOptions{General: path.general})
				if err != nil {
					b.Fatal(err)
				}
				r := benchEvaluate(b, ev, demoSetup())
				b.ReportMetric(float64(r.Cases[0].Iterations), "iterations/op")
			})
		}
	}
}

// benchEvaluate runs ev.Evaluate(s) b.N times after one untimed run,
// reporting allocations and, where the platform gives it, the process's
// user CPU time per op (user-ns/op); it returns the last result.
func benchEvaluate(b *testing.B, ev *Evaluator, s Setup) *Result {
	b.Helper()
	var r Result
	if err := ev.Evaluate(s, &r); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	cpu0, ok := processCPU()
	for i := 0; i < b.N; i++ {
		if err := ev.Evaluate(s, &r); err != nil {
			b.Fatal(err)
		}
	}
	if cpu1, ok1 := processCPU(); ok && ok1 {
		b.ReportMetric(float64(cpu1-cpu0)/float64(b.N), "user-ns/op")
	}
	return &r
}
