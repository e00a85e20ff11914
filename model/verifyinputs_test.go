package model

import (
	"runtime"
	"testing"
)

// TestVerifierKeepsTheRoadInputs holds the memory of a front's refinement
// down: after its first check a Verifier allocates, per further check,
// less than a quarter of one road case's tyre inputs, and its reports
// stay those of Verify bit for bit. The inputs are 2·steps half-step
// samples of 8 float64 values, 128 bytes a recorded step; a check that
// tabulated them again would allocate at least that much for every case,
// four times the bound. What a check still allocates (its model, the
// output spectra of the frequency-domain side, the rows) does not grow
// with the record; the bound is a project figure tied to the record
// length, not from a published source.
func TestVerifierKeepsTheRoadInputs(t *testing.T) {
	v, cases := demoCar(), demoCases()
	opt := VerifyOptions{Seed: 5, Time: TimeOptions{Duration: 20}}
	vf, err := NewVerifier(v, cases, opt)
	if err != nil {
		t.Fatal(err)
	}
	first := demoSetup()
	if _, err := vf.Verify(first); err != nil {
		t.Fatal(err)
	}
	second := demoSetup()
	second.Axles[0].BumpRatio *= 1.1
	second.Axles[1].ReboundRatio *= 0.9
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	got, err := vf.Verify(second)
	runtime.ReadMemStats(&after)
	if err != nil {
		t.Fatal(err)
	}
	minSteps := -1
	for _, c := range got.Cases {
		steps := int(c.Time.Duration/c.Time.Step + 0.5)
		if minSteps < 0 || steps < minSteps {
			minSteps = steps
		}
	}
	alloc := after.TotalAlloc - before.TotalAlloc
	bound := uint64(128 * minSteps / 4)
	t.Logf("allocated %d bytes in one check (bound %d, %d recorded steps in the shortest case)", alloc, bound, minSteps)
	if alloc >= bound {
		t.Errorf("a check after the first allocated %d bytes, want < %d (a quarter of one case's road inputs)", alloc, bound)
	}
	want, err := Verify(v, cases, second, opt)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.Cases {
		w, g := &want.Cases[i], &got.Cases[i]
		if len(w.Rows) != len(g.Rows) {
			t.Fatalf("case %s: %d rows, want %d", w.Case, len(g.Rows), len(w.Rows))
		}
		for j := range w.Rows {
			// Bit for bit: the kept inputs are the ones Verify builds.
			if w.Rows[j] != g.Rows[j] {
				t.Errorf("case %s, %s: %+v, want %+v", w.Case, w.Rows[j].Metric, g.Rows[j], w.Rows[j])
			}
		}
		if w.Time.Peaks != g.Time.Peaks || w.Time.RoadMaxN != g.Time.RoadMaxN {
			t.Errorf("case %s: peaks or road band differ from Verify's", w.Case)
		}
	}
}
