package jobs

import (
	"context"
	"time"
)

// Run is one resumable optimisation run, as the engine drives it. The
// study package (jobs/study) provides the real one, an NSGA-II search of
// a job spec; the engine knows only this.
//
// A Run is used by one goroutine at a time.
type Run interface {
	// Step runs at most maxGenerations generations and reports whether the
	// run has reached its end. When ctx is done before that, Step returns
	// early, with ctx's error or nil, and the run is left at the boundary
	// of its last completed generation: a generation in progress is
	// discarded, never half applied, so Checkpoint stays exact.
	Step(ctx context.Context, maxGenerations int) (done bool, err error)

	// Checkpoint returns the full state. Opening the same spec with it must
	// give a run that continues bit for bit as this one would, and equal
	// states must give equal bytes.
	Checkpoint() ([]byte, error)

	// Progress returns the figures the watch stream shows.
	Progress() Progress

	// Front returns the current non-dominated set.
	Front() ([]Solution, error)
}

// Summarizer is a Run that also sums up its front, for example with a
// check of it: the engine stores the bytes with every front it stores
// (Job.Summary) and never reads them.
type Summarizer interface {
	Summary() ([]byte, error)
}

// RunOpener builds a Run from a stored spec and a checkpoint, which is
// nil for a job that has not run yet. An error from Open is final: the job
// fails with its message.
type RunOpener interface {
	Open(spec []byte, checkpoint []byte) (Run, error)
}

// Progress is how far a job has got.
type Progress struct {
	Generation  int       // generations completed
	Generations int       // generations planned in total
	Evaluations int64     // objective evaluations so far
	Hypervolume float64   // of the current front against the job's reference point (dimensionless, objective units multiplied)
	Best        []float64 // best value reached per objective, in the objectives' own units
	UpdatedAt   time.Time // when the engine stored it (zero if never)
}

// Solution is one member of a stored front. The engine keeps the floats
// bit for bit; Detail is opaque (metrics, damper curves) and is serialised
// by the API layer.
type Solution struct {
	Index      int       // position in the front, from 0
	Genes      []float64 // decision variables, in the spec's order
	Objectives []float64 // minimised objective values
	Violations []float64 // constraint violations, 0 where satisfied
	Feasible   bool
	Detail     []byte
}
