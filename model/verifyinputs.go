package model

import (
	"math/rand/v2"
	"sync"
)

// roadInputs keeps, per road case of a Verifier, the tyre inputs of the
// case's road realisation, built once and shared read-only by every check
// (see Verifier). The inputs depend on the car, the case, the seed and
// the record only (caseTyreInputs), not on the setup, except through the
// step count: a setup whose step rule gives another count than the kept
// one builds its own, as SimulateCase does, and keeps nothing.
type roadInputs struct {
	cases []roadInputSlot
}

// roadInputSlot is one case's kept inputs: the first built.
type roadInputSlot struct {
	mu          sync.Mutex
	steps, kmax int
	length      float64
	in          []float64 // nil until built
}

func newRoadInputs(n int) *roadInputs {
	return &roadInputs{cases: make([]roadInputSlot, n)}
}

// source gives case i's inputs from the stream (seed, i), as Verify
// seeds SimulateCase.
func (r *roadInputs) source(v *Vehicle, rc *RoadCase, seed uint64, i int) roadInputSource {
	return func(steps, kmax int, length float64) []float64 {
		build := func() []float64 {
			return caseTyreInputs(v, rc, length, steps, kmax, rand.New(rand.NewPCG(seed, uint64(i))))
		}
		sl := &r.cases[i]
		sl.mu.Lock()
		if sl.in == nil {
			sl.steps, sl.kmax, sl.length, sl.in = steps, kmax, length, build()
		}
		kept := sl.steps == steps && sl.kmax == kmax && sl.length == length
		in := sl.in
		sl.mu.Unlock()
		if kept {
			return in
		}
		return build()
	}
}
