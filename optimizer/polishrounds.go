package optimizer

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sync"
)

// Neighbourhood is the closing stage of a Polish: rounds of a Pareto local
// search on a fixed, finite neighbourhood of every archive point, its twin
// (Polish.Twin) and the 2^k corners x ± Radius of the box around it (k the
// genes with a radius above 0, each corner clipped to the bounds), the
// neighbourhood a FrontCheck draws its random neighbours from.
//
// The compass search of a point stops when its budget is spent, and the
// point it stopped at enters the archive without a search of its own; on
// a problem whose objectives fall together only along a diagonal of the
// genes (as the bump/rebound ratios of a car on driver inputs do), such a
// point may still be beaten by a corner of its box while every move along
// one gene raises an objective. A front check that draws a few random
// corners then finds it or not by chance. The rounds make the archive a
// Pareto local optimum set for the neighbourhood in the sense of
//
//	L. Paquete, M. Chiarandini and T. Stützle, "Pareto local optimum sets
//	in the biobjective traveling salesman problem: an experimental
//	study", in Metaheuristics for Multiobjective Optimisation (Springer
//	series in economics and mathematical systems, vol. 535), 2004,
//	pp. 177-199, doi:10.1007/978-3-642-17144-4_7
//
// (from memory), with dominance by a margin (the ε-dominance of
// M. Laumanns, L. Thiele, K. Deb and E. Zitzler, "Combining convergence
// and diversity in evolutionary multiobjective optimization",
// Evolutionary Computation 10(3):263-282, 2002,
// doi:10.1162/106365602760234108, additive form; from memory): in each
// round every archive member not yet cleared has its neighbourhood
// evaluated in a fixed order (twin first, then the corners in binary
// order) until a feasible neighbour is lower in every objective by more
// than Margin times the archive's extent in it. A member with no such
// neighbour is cleared for good (a member never changes); a beaten one
// leaves the archive for the neighbour that beats it (an evaluated point
// that dominates it), and that newcomer gets the compass search of the
// Polish before the next round. The rounds stop when every member is
// cleared or after Rounds rounds.
//
// After the corners, a member none of them beats gets one more try: the
// move a linear model of the objectives fitted to its evaluated
// neighbours promises to lower every objective by the most margins
// (linearModelStep), and that move halved. The corners are the box's
// vertices, but a move that lowers every objective may lie only inside
// the box (a narrow cone of such moves between corners), where the
// corners never look; on the demo job, of the points the corners
// cleared, 15-19 of about 190 were still beaten by moves drawn uniformly
// inside the box (16 a point), 1-3 with the model step (README, "The
// front in the genes").
//
// Nothing is drawn at random, so the rounds share no stream with a
// FrontCheck: a check after them samples the same neighbourhood
// independently, and with its margin at least this one's it finds no
// point beaten once the rounds have cleared every member.
type Neighbourhood struct {
	// Radius is, per gene, the half-width of the box in the gene's unit
	// (0 leaves the gene alone); its length is the number of genes, and
	// at most MaxNeighbourhoodGenes values are above 0.
	Radius []float64
	// Margin is the fraction of the archive's extent in each objective by
	// which a neighbour must be lower to beat a member; 0 or more.
	Margin float64
	// Rounds bounds the rounds; at least 1.
	Rounds int
}

// ModelStepEvaluations is the most evaluations the linear model's step
// adds to a member's neighbourhood in a round (the step and its half).
const ModelStepEvaluations = 2

// MaxNeighbourhoodGenes bounds the genes a Neighbourhood moves, so that a
// member's neighbourhood has at most 2^8 corners.
const MaxNeighbourhoodGenes = 8

// validate checks the neighbourhood against n genes; fields are named
// "Polish.Neighbourhood.X".
func (nb *Neighbourhood) validate(n int) error {
	field := func(f string) string { return "Polish.Neighbourhood." + f }
	switch {
	case len(nb.Radius) != n:
		return &FieldError{Field: field("Radius"), Msg: fmt.Sprintf("has %d values for %d genes", len(nb.Radius), n)}
	case !(nb.Margin >= 0) || math.IsInf(nb.Margin, 0):
		return &FieldError{Field: field("Margin"), Msg: fmt.Sprintf("must be finite and not negative, got %g", nb.Margin)}
	case nb.Rounds < 1:
		return &FieldError{Field: field("Rounds"), Msg: fmt.Sprintf("must be at least 1, got %d", nb.Rounds)}
	}
	moved := 0
	for i, r := range nb.Radius {
		if !(r >= 0) || math.IsInf(r, 0) {
			return &FieldError{Field: fmt.Sprintf("%s[%d]", field("Radius"), i), Msg: fmt.Sprintf("must be finite and not negative, got %g", r)}
		}
		if r > 0 {
			moved++
		}
	}
	if moved > MaxNeighbourhoodGenes {
		return &FieldError{Field: field("Radius"), Msg: fmt.Sprintf("moves %d genes, at most %d", moved, MaxNeighbourhoodGenes)}
	}
	return nil
}

// neighbourhoodRounds runs the rounds of p.Neighbourhood on the archive a
// (changing it) with the compass search's weights w; it returns the
// rounds run, the members replaced and the evaluations made. On a done
// ctx it returns its error, a part done.
func neighbourhoodRounds(ctx context.Context, prob Problem, shape problemShape, a *archive, w []float64, p Polish) (rounds, replaced, evals int, err error) {
	nb := p.Neighbourhood
	cleared := map[*Solution]bool{}
	for rounds < nb.Rounds {
		var open []*Solution
		for _, s := range a.sols {
			if !cleared[s] {
				open = append(open, s)
			}
		}
		if len(open) == 0 {
			break
		}
		rounds++
		margin := make([]float64, shape.nObj)
		for j := range margin {
			margin[j] = nb.Margin * extent(a.sols, j)
		}
		beaters := make([]*Solution, len(open))
		counts := make([]int, len(open))
		forEachPoint(ctx, len(open), p.Workers, func(i int) {
			beaters[i], counts[i] = scanNeighbourhood(ctx, prob, shape, open[i], nb.Radius, margin, p.Twin)
		})
		if err := ctx.Err(); err != nil {
			return rounds, replaced, evals, err
		}
		for i, s := range open {
			evals += counts[i]
			if beaters[i] == nil {
				cleared[s] = true
				continue
			}
			replaced++
			a.add(*beaters[i])
		}
		var newcomers []*Solution
		for _, s := range a.sols {
			if !cleared[s] && !slices.Contains(open, s) {
				newcomers = append(newcomers, s)
			}
		}
		// The newcomers' own compass searches, seeded apart from the first
		// polish's by the round.
		found, n, err := polishPoints(ctx, prob, shape, newcomers, w, p, uint64(rounds)<<32)
		if err != nil {
			return rounds, replaced, evals, err
		}
		evals += n
		for _, sol := range found {
			a.add(sol)
		}
	}
	return rounds, replaced, evals, nil
}

// scanNeighbourhood evaluates x's twin, then the corners of its box in
// binary order (bit i of the corner's number set: gene i moves down),
// then the linear model's step and half of it (see Neighbourhood),
// skipping a candidate equal to x or to one already tried, and returns
// the first feasible one lower than x by more than margin in every
// objective (nil when none is) with the evaluations made. It stops early,
// without error, when ctx is done.
func scanNeighbourhood(ctx context.Context, prob Problem, shape problemShape, x *Solution, radius, margin []float64, twin func(x, dst []float64) bool) (*Solution, int) {
	evals := 0
	var tried [][]float64
	var seen []Solution // the corners evaluated, for the linear model
	consider := func(y []float64) *Solution {
		if ctx.Err() != nil || slices.Equal(y, x.Genes) || slices.ContainsFunc(tried, func(t []float64) bool { return slices.Equal(t, y) }) {
			return nil
		}
		tried = append(tried, y)
		evals++
		sol := evaluateAt(prob, shape, y)
		if sol.Feasible && beats(sol.Objectives, x.Objectives, margin) {
			return &sol
		}
		if finiteAll(sol.Objectives) {
			seen = append(seen, sol)
		}
		return nil
	}
	if twin != nil {
		y := make([]float64, len(x.Genes))
		if twin(x.Genes, y) {
			if sol := consider(y); sol != nil {
				return sol, evals
			}
		}
	}
	var moved []int
	for i, r := range radius {
		if r > 0 {
			moved = append(moved, i)
		}
	}
	for c := range 1 << len(moved) {
		y := slices.Clone(x.Genes)
		for bit, i := range moved {
			d := radius[i]
			if c>>bit&1 == 1 {
				d = -d
			}
			y[i] = min(shape.bounds[i].Hi, max(shape.bounds[i].Lo, y[i]+d))
		}
		if sol := consider(y); sol != nil {
			return sol, evals
		}
	}
	if y, ok := linearModelStep(x, seen, moved, radius, shape.bounds, margin); ok {
		if sol := consider(y); sol != nil {
			return sol, evals
		}
		half := slices.Clone(x.Genes)
		for _, i := range moved {
			half[i] = x.Genes[i] + (y[i]-x.Genes[i])/2
		}
		if sol := consider(half); sol != nil {
			return sol, evals
		}
	}
	return nil, evals
}

// forEachPoint calls f(i) for i in [0, n) on up to workers goroutines and
// returns when all are done; it hands out no more indices once ctx is
// done.
func forEachPoint(ctx context.Context, n, workers int, f func(i int)) {
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(max(1, workers), max(1, n)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				f(i)
			}
		}()
	}
	for i := range n {
		if ctx.Err() != nil {
			break
		}
		next <- i
	}
	close(next)
	wg.Wait()
}
