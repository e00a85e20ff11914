package optimizer

import (
	"context"
	"math/rand"
	"strconv"

	"github.com/MaxHalford/eaopt"
)

// stepRun is the glue between one Step and eaopt's GA.Minimize.
type stepRun struct {
	search *Search
	target int
	ctx    context.Context
	// made counts the genomes handed to eaopt at start-up.
	made int
	// initialised is set by the callback after eaopt's start-up.
	initialised bool
}

// newGenome is eaopt's genome factory. eaopt calls it 2N times per island,
// island after island, at the start of Minimize. A started search gets its
// committed individuals back, evaluated, reporting their committed Fitness;
// a new one gets uniform random genes, Fitness = slot.
func (r *stepRun) newGenome(rng *rand.Rand) eaopt.Genome {
	s := r.search
	size := 2 * s.settings.PopulationSize
	island, slot := r.made/size, r.made%size
	r.made++
	if s.started {
		rec := s.pops[island][slot]
		g := *rec.g
		g.fitness = rec.fitness
		return &g
	}
	genes := make([]float64, len(s.shape.bounds))
	for i, b := range s.shape.bounds {
		genes[i] = b.Lo + rng.Float64()*(b.Hi-b.Lo)
	}
	return newGenome(s.env, genes, 0, float64(slot))
}

// earlyStop is eaopt's EarlyStop, asked before each generation.
func (r *stepRun) earlyStop(*eaopt.GA) bool {
	return r.search.generation >= r.target || r.search.Stagnated() || r.ctx.Err() != nil
}

// callback is eaopt's Callback, called after start-up and after each
// generation. After the start-up of a started search it only aligns eaopt's
// counters and streams; otherwise it commits the generation.
func (r *stepRun) callback(ga *eaopt.GA) {
	s := r.search
	if !r.initialised {
		r.initialised = true
		if s.started {
			ga.Generations = uint(s.generation)
			r.prepare(ga)
			return
		}
	}
	s.commit(ga, int(ga.Generations))
	r.prepare(ga)
}

// prepare seeds the streams of the generation after the committed one and
// sets eaopt's counters to absolute generations, so migration falls on
// the same generations however a run is cut into Steps.
func (r *stepRun) prepare(ga *eaopt.GA) {
	s := r.search
	next := s.generation + 1
	for i := range ga.Populations {
		ga.Populations[i].RNG = streamRand(s.settings.Seed, next, streamIsland, i)
		ga.Populations[i].Generations = uint(s.generation)
		ga.Populations[i].ID = strconv.Itoa(i)
	}
	ga.RNG = streamRand(s.settings.Seed, next, streamMigration, 0)
}

// commit makes generation g of ga the search's state: the populations, the
// children born in g offered to the archive, the evaluation count, the
// reference point if none is fixed yet, and the progress, which goes to
// the history and the callback.
func (s *Search) commit(ga *eaopt.GA, g int) {
	pops := make([][]record, len(ga.Populations))
	var born []Solution
	evals := 0
	for i, pop := range ga.Populations {
		pops[i] = make([]record, len(pop.Individuals))
		for k, indi := range pop.Individuals {
			gen := indi.Genome.(*genome)
			pops[i][k] = record{g: gen, fitness: indi.Fitness}
			if gen.born == g {
				born = append(born, gen.solution())
				if gen.fresh {
					evals++
				}
			}
		}
	}
	s.pops = pops
	s.started = true
	s.generation = g
	s.evaluations += evals
	for _, sol := range born {
		s.front.add(sol)
	}
	if s.ref == nil {
		s.ref = autoReference(born, s.shape.nObj)
	}
	p := Progress{Generation: g, Evaluations: s.evaluations, Best: s.front.best(s.shape.nObj)}
	if s.ref != nil {
		p.Hypervolume = Hypervolume(s.front.points(), s.ref)
	}
	s.history = append(s.history, p)
	if s.settings.Progress != nil {
		s.settings.Progress(p.clone())
	}
}
