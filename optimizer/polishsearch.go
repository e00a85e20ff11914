package optimizer

import (
	"context"
	randv2 "math/rand/v2"
	"slices"
)

// pointSearch is the local search of one archive point (see Polish): the
// compass search on the scalarised function s, with the descent step.
type pointSearch struct {
	ctx   context.Context
	prob  Problem
	shape problemShape
	p     Polish
	z, w  []float64 // reference point and weights of s
	x     []float64 // current point
	fx    float64   // s(x)
	best  *Solution // the last accepted point, nil while x is the start
	evals int
}

// try evaluates y (kept, not copied) unless the budget is spent or ctx is
// done, moves to it when it lowers s, and returns the evaluated solution
// (nil when not evaluated) and whether it moved.
func (ps *pointSearch) try(y []float64) (*Solution, bool) {
	if ps.evals >= ps.p.Budget || ps.ctx.Err() != nil {
		return nil, false
	}
	ps.evals++
	sol := evaluateAt(ps.prob, ps.shape, y)
	if !sol.Feasible {
		return &sol, false // s = +Inf
	}
	if fy := asf(sol.Objectives, ps.z, ps.w); fy < ps.fx {
		ps.x, ps.fx, ps.best = slices.Clone(y), fy, &sol
		return &sol, true
	}
	return &sol, false
}

// compassSearch minimises the scalarised function from x0 (see Polish)
// and returns its end point (none when it did not move) and how many
// evaluations it made. It stops early, without error, when ctx is done;
// the caller checks ctx.
func compassSearch(ctx context.Context, prob Problem, shape problemShape, x0 *Solution, w []float64, p Polish, index uint64) ([]Solution, int) {
	b := shape.bounds
	ps := &pointSearch{ctx: ctx, prob: prob, shape: shape, p: p, z: x0.Objectives, w: w, x: slices.Clone(x0.Genes)}
	// ps.fx = 0: s(x0) = 0 by construction.
	if p.Twin != nil {
		y := make([]float64, len(ps.x))
		if p.Twin(ps.x, y) && !slices.Equal(ps.x, y) {
			ps.try(y)
		}
	}
	var dirs []int // 2i: +e_i, 2i+1: −e_i
	for i, bi := range b {
		if bi.Hi > bi.Lo {
			dirs = append(dirs, 2*i, 2*i+1)
		}
	}
	polls := make([]poll, 2*len(b))
	rng := randv2.New(randv2.NewPCG(mix64(p.Seed^0x3c6ef372fe94f82b), mix64(index^0xa54ff53a5f1d36f1)))
	for step := p.Step; step >= p.MinStep && ps.evals < p.Budget && ctx.Err() == nil; {
		rng.Shuffle(len(dirs), func(a, c int) { dirs[a], dirs[c] = dirs[c], dirs[a] })
		clear(polls)
		moved := false
		for _, d := range dirs {
			i := d / 2
			delta := step * (b[i].Hi - b[i].Lo)
			if d%2 == 1 {
				delta = -delta
			}
			y := slices.Clone(ps.x)
			y[i] = min(b[i].Hi, max(b[i].Lo, ps.x[i]+delta))
			if y[i] == ps.x[i] {
				continue
			}
			sol, ok := ps.try(y)
			if ok {
				moved = true
				break
			}
			if sol != nil && sol.Feasible {
				polls[d] = poll{at: y[i], f: sol.Objectives}
			}
		}
		if !moved && p.Descent {
			moved = ps.descentStep(polls, step)
		}
		if !moved {
			step /= 2
		}
	}
	if ps.best == nil {
		return nil, ps.evals
	}
	return []Solution{*ps.best}, ps.evals
}
