package optimizer

import (
	"context"
	"fmt"
	"math"
	randv2 "math/rand/v2"
	"slices"
	"sync"
)

// FrontCheck configures CheckFront, a check of a front in decision space:
// the hypervolume says how good a front is in objective space, not
// whether each of its points is locally optimal in the genes, which is
// where a user acts on it. Each point is compared with its twin (when the
// problem has one) and with a few seeded random neighbours.
type FrontCheck struct {
	// Twin, when not nil, gives a point's twin in dst and reports whether
	// it has one (see Polish.Twin). It must not retain x or dst.
	Twin func(x, dst []float64) bool
	// Radius is, per gene, the half-width of the perturbations in the
	// gene's unit: each neighbour moves every gene by +Radius or −Radius
	// (a random corner of the box around the point), clipped to the
	// bounds. 0 leaves a gene alone. Its length is the number of genes.
	Radius []float64
	// Perturbations is the number of random neighbours per point, 0 or more.
	Perturbations int
	// Margin is the fraction of the front's extent (max − min of each
	// objective over the front) by which a candidate must be better in
	// every objective to beat a point; 0 or more.
	Margin float64
	// Seed selects the neighbours.
	Seed uint64
	// Workers is the number of points checked at once; at least 1.
	Workers int
}

// FrontReport is the result of CheckFront.
type FrontReport struct {
	// Points is the number of feasible points checked.
	Points int
	// Twins is the number of points that have a twin other than
	// themselves.
	Twins int
	// Evaluations is the number of calls of Problem.Evaluate made.
	Evaluations int
	// BeatenByTwin counts the points their twin beats; BeatenByNeighbour
	// those a random neighbour beats (and their twin does not); Beaten is
	// their sum.
	BeatenByTwin, BeatenByNeighbour, Beaten int
	// Margin is the absolute margin per objective, in its unit.
	Margin []float64
	// Checks holds one entry per point of the front, in its order.
	Checks []PointCheck
}

// PointCheck is the verdict on one point.
type PointCheck struct {
	// Beaten is set when a candidate is feasible and lower than the point
	// by more than the margin in every objective.
	Beaten bool
	// ByTwin says the candidate is the point's twin.
	ByTwin bool
	// By is the first candidate that beats the point (twin first, then
	// neighbours in order); zero when not beaten.
	By Solution
}

// beats reports whether f is below g by more than margin in every
// objective.
func beats(f, g, margin []float64) bool {
	for j := range f {
		if !(f[j] < g[j]-margin[j]) {
			return false
		}
	}
	return true
}

// CheckFront checks every feasible point of front against its twin and
// c.Perturbations seeded neighbours (see FrontCheck). Infeasible points are
// counted nowhere and get a zero PointCheck. The result depends on the
// problem, the front, the settings and the seed only, not on Workers.
// Input problems are *FieldError values; a done ctx returns its error.
func CheckFront(ctx context.Context, p Problem, front []Solution, c FrontCheck) (FrontReport, error) {
	shape, err := readProblem(p)
	if err != nil {
		return FrontReport{}, err
	}
	switch {
	case len(c.Radius) != len(shape.bounds):
		return FrontReport{}, &FieldError{Field: "FrontCheck.Radius", Msg: fmt.Sprintf("has %d values for %d genes", len(c.Radius), len(shape.bounds))}
	case c.Perturbations < 0:
		return FrontReport{}, &FieldError{Field: "FrontCheck.Perturbations", Msg: fmt.Sprintf("must not be negative, got %d", c.Perturbations)}
	case !(c.Margin >= 0) || math.IsInf(c.Margin, 0):
		return FrontReport{}, &FieldError{Field: "FrontCheck.Margin", Msg: fmt.Sprintf("must be finite and not negative, got %g", c.Margin)}
	case c.Workers < 1:
		return FrontReport{}, &FieldError{Field: "FrontCheck.Workers", Msg: fmt.Sprintf("must be at least 1, got %d", c.Workers)}
	}
	for i, r := range c.Radius {
		if !(r >= 0) || math.IsInf(r, 0) {
			return FrontReport{}, &FieldError{Field: fmt.Sprintf("FrontCheck.Radius[%d]", i), Msg: fmt.Sprintf("must be finite and not negative, got %g", r)}
		}
	}
	rep := FrontReport{Margin: make([]float64, shape.nObj), Checks: make([]PointCheck, len(front))}
	var feasible []*Solution
	for i := range front {
		if front[i].Feasible {
			feasible = append(feasible, &front[i])
		}
	}
	for j := range rep.Margin {
		rep.Margin[j] = c.Margin * extent(feasible, j)
	}
	evals := make([]int, len(front))
	twin := make([]bool, len(front))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(c.Workers, max(1, len(front))) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				rep.Checks[i], twin[i], evals[i] = checkPoint(ctx, p, shape, &front[i], c, rep.Margin, uint64(i))
			}
		}()
	}
	for i := range front {
		if ctx.Err() != nil {
			break
		}
		if front[i].Feasible {
			next <- i
		}
	}
	close(next)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return FrontReport{}, err
	}
	rep.Points = len(feasible)
	for i, pc := range rep.Checks {
		rep.Evaluations += evals[i]
		if twin[i] {
			rep.Twins++
		}
		switch {
		case pc.Beaten && pc.ByTwin:
			rep.BeatenByTwin++
		case pc.Beaten:
			rep.BeatenByNeighbour++
		}
	}
	rep.Beaten = rep.BeatenByTwin + rep.BeatenByNeighbour
	return rep, nil
}

// checkPoint compares x with its twin and its neighbours; it returns the
// verdict, whether x has a twin, and the evaluations made.
func checkPoint(ctx context.Context, p Problem, shape problemShape, x *Solution, c FrontCheck, margin []float64, index uint64) (PointCheck, bool, int) {
	evals := 0
	var pc PointCheck
	consider := func(y []float64, isTwin bool) {
		if pc.Beaten || ctx.Err() != nil {
			return
		}
		evals++
		sol := evaluateAt(p, shape, y)
		if sol.Feasible && beats(sol.Objectives, x.Objectives, margin) {
			pc = PointCheck{Beaten: true, ByTwin: isTwin, By: sol}
		}
	}
	hasTwin := false
	if c.Twin != nil {
		y := make([]float64, len(x.Genes))
		if c.Twin(x.Genes, y) && !slices.Equal(x.Genes, y) {
			hasTwin = true
			consider(y, true)
		}
	}
	rng := randv2.New(randv2.NewPCG(mix64(c.Seed^0x510e527fade682d1), mix64(index^0x9b05688c2b3e6c1f)))
	for range c.Perturbations {
		y := slices.Clone(x.Genes)
		for i, r := range c.Radius {
			if rng.Uint64()&1 == 1 {
				r = -r
			}
			y[i] = min(shape.bounds[i].Hi, max(shape.bounds[i].Lo, y[i]+r))
		}
		consider(y, false)
	}
	return pc, hasTwin, evals
}
