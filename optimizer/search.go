package optimizer

import (
	"context"
	"errors"
	"fmt"
	"slices"

	"github.com/MaxHalford/eaopt"
)

// Search is one resumable NSGA-II run on a Problem. Its methods must not be
// called concurrently; the Progress callback runs on the goroutine that
// steps and may call the read-only methods.
type Search struct {
	settings Settings
	shape    problemShape
	env      *evalEnv
	model    *nsga2

	// Committed state: the search after its last completed generation.
	started     bool       // the initial population exists
	generation  int        // generations completed
	evaluations int        // calls of Problem.Evaluate
	ref         []float64  // hypervolume reference point, nil until fixed
	pops        [][]record // per island, in eaopt's order after its sort
	front       archive
	history     []Progress
	polish      *PolishReport // nil until the archive is polished
}

// record is one individual of a committed population.
type record struct {
	g       *genome
	fitness float64 // eaopt Fitness at the commit
}

// New returns a search of p with settings s, before its initial population.
// Input problems are *FieldError values naming the field.
func New(p Problem, s Settings) (*Search, error) {
	shape, err := readProblem(p)
	if err != nil {
		return nil, err
	}
	if err := s.Validate(shape.nObj); err != nil {
		return nil, err
	}
	s.ReferencePoint = slices.Clone(s.ReferencePoint)
	st := &Search{
		settings: s,
		shape:    shape,
		env: &evalEnv{
			problem: p,
			shape:   shape,
			etaC:    s.CrossoverEta,
			pm:      s.MutationProbability,
			etaM:    s.MutationEta,
			ctx:     context.Background(),
			gate:    make(chan struct{}, s.Workers),
		},
		model: &nsga2{
			n:         s.PopulationSize,
			crossProb: s.CrossoverProbability,
			selector:  eaopt.SelTournament{NContestants: 2},
			variation: s.Variation,
			deF:       s.DifferentialWeight,
			deCR:      s.DifferentialCrossover,
		},
		ref: slices.Clone(s.ReferencePoint),
	}
	return st, nil
}

// Generation returns the number of generations completed; 0 also before
// the initial population exists (see Started).
func (s *Search) Generation() int { return s.generation }

// Started reports whether the initial population has been evaluated.
func (s *Search) Started() bool { return s.started }

// Evaluations returns the number of calls of Problem.Evaluate so far. A
// child whose genes equal its parent's inherits the evaluation and is not
// counted.
func (s *Search) Evaluations() int { return s.evaluations }

// Done reports whether the search has run all of Settings.Generations or
// stopped on stagnation (Stagnated).
func (s *Search) Done() bool {
	return s.started && (s.generation >= s.settings.Generations || s.Stagnated())
}

// Stagnated reports whether the stagnation rule of the settings
// (StagnationWindow, StagnationTolerance) has stopped the search: after at
// least W generations, HV_t − HV_{t−W} ≤ tol · HV_t with HV_t > 0, where
// HV_t is the hypervolume of the history's last entry. It is a function
// of the history, so a restored search stops where the uninterrupted one
// does.
func (s *Search) Stagnated() bool {
	w := s.settings.StagnationWindow
	n := len(s.history)
	if w <= 0 || n <= w {
		return false
	}
	now, then := s.history[n-1].Hypervolume, s.history[n-1-w].Hypervolume
	return now > 0 && now-then <= s.settings.StagnationTolerance*now
}

// ReferencePoint returns the hypervolume reference point, nil while none
// is fixed.
func (s *Search) ReferencePoint() []float64 { return slices.Clone(s.ref) }

// Front returns a copy of the archive: every feasible point seen that no
// other feasible point seen dominates, one per objective vector, sorted by
// objectives and then genes lexicographically. While no feasible point has
// been seen it returns the least violating points instead (Feasible false,
// see Feasible), so it is empty only before any evaluation succeeded.
func (s *Search) Front() []Solution {
	members := s.front.members()
	out := make([]Solution, len(members))
	for i, sol := range members {
		out[i] = sol.clone()
	}
	return out
}

// Feasible reports whether any feasible point has been seen, that is
// whether Front holds feasible points.
func (s *Search) Feasible() bool { return len(s.front.sols) > 0 }

// Population returns a copy of the current survivors and children of every
// island, islands in order.
func (s *Search) Population() []Solution {
	var out []Solution
	for _, pop := range s.pops {
		for _, r := range pop {
			out = append(out, r.g.solution().clone())
		}
	}
	return out
}

// Progress returns the progress of the last completed generation, the
// zero Progress before the initial population.
func (s *Search) Progress() Progress {
	if len(s.history) == 0 {
		return Progress{}
	}
	return s.history[len(s.history)-1].clone()
}

// History returns the progress of every completed generation, the initial
// population first.
func (s *Search) History() []Progress {
	out := make([]Progress, len(s.history))
	for i, p := range s.history {
		out[i] = p.clone()
	}
	return out
}

// Run steps the search to the end of Settings.Generations.
func (s *Search) Run(ctx context.Context) error {
	_, err := s.Step(ctx, max(0, s.settings.Generations-s.generation))
	return err
}

// Step evaluates the initial population if there is none yet, then runs at
// most n more generations, stopping at Settings.Generations, and reports
// whether the search is done. Step(ctx, 0) only makes the initial
// population.
//
// ctx is checked between generations and before each evaluation. When it
// is done Step returns its error and the search stays at its last completed
// generation: a generation in progress is dropped whole, so a later Step
// continues exactly as an uninterrupted run would.
//
// Each Step is one call of eaopt's GA.Minimize (see the package doc): its
// genome factory restores the committed populations, its callback commits
// each generation and re-seeds the random streams, its EarlyStop ends the
// Step.
func (s *Search) Step(ctx context.Context, n int) (done bool, err error) {
	if n < 0 {
		return s.Done(), &FieldError{Field: "Step.n", Msg: fmt.Sprintf("must not be negative, got %d", n)}
	}
	if err := ctx.Err(); err != nil {
		return s.Done(), err
	}
	target := min(s.generation+n, s.settings.Generations)
	if s.started && (s.generation >= target || s.Stagnated()) {
		return s.Done(), nil
	}
	s.env.ctx = ctx
	defer func() { s.env.ctx = context.Background() }()

	run := &stepRun{search: s, target: target, ctx: ctx}
	conf := eaopt.GAConfig{
		NPops:        uint(s.settings.Islands),
		PopSize:      uint(2 * s.settings.PopulationSize),
		NGenerations: uint(max(1, target-s.generation)),
		HofSize:      1,
		Model:        s.model,
		ParallelEval: s.settings.Workers > 1,
		Callback:     run.callback,
		EarlyStop:    run.earlyStop,
		RNG:          streamRand(s.settings.Seed, 0, streamInit, 0),
	}
	if s.settings.migrates() {
		conf.Migrator = eaopt.MigRing{NMigrants: uint(s.settings.Migrants)}
		conf.MigFrequency = uint(s.settings.MigrationEvery)
	}
	ga, err := conf.NewGA()
	if err != nil {
		return s.Done(), fmt.Errorf("optimizer: configuring eaopt: %w", err)
	}
	err = ga.Minimize(run.newGenome)
	if s.generation < target || !s.started {
		if cerr := ctx.Err(); cerr != nil {
			return s.Done(), cerr
		}
	}
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return s.Done(), err
		}
		return s.Done(), fmt.Errorf("optimizer: generation %d: %w", s.generation+1, err)
	}
	return s.Done(), nil
}
