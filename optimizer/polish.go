package optimizer

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// Polish is the local refinement of the archive that a search can run
// once, after its last generation (Search.Polish): a memetic step in the
// sense of
//
//	K. Sindhya, K. Miettinen and K. Deb, "A hybrid framework for
//	evolutionary multi-objective optimization", IEEE Transactions on
//	Evolutionary Computation 17(4):495-511, 2013,
//	doi:10.1109/TEVC.2012.2204403
//
// (cited from memory), who refine points of an evolutionary front by a
// local search on an achievement scalarising function. Each archive point
// x, with objectives z = f(x), is the start and the reference point of the
// augmented achievement scalarising function of A. P. Wierzbicki, "The use
// of reference objectives in multiobjective optimization", in Multiple
// Criteria Decision Making Theory and Application (Springer series in
// economics and mathematical systems, vol. 177), 1980, pp. 468-486
// (from memory),
//
//	s(y) = max_j w_j (f_j(y) − z_j) + ρ Σ_j w_j (f_j(y) − z_j),
//	w_j  = 1 / (max f_j − min f_j) over the archive,  ρ = 10⁻⁶,
//
// so s(x) = 0 and s(y) < 0 where y improves on x. A point whose evaluation
// fails or violates a constraint has s = +∞. s is minimised from x by the
// compass (coordinate pattern) search of T. G. Kolda, R. M. Lewis and
// V. Torczon, "Optimization by direct search: new perspectives on some
// classical and modern methods", SIAM Review 45(3):385-482, 2003,
// doi:10.1137/S003614450242889, §3: in genes scaled to [0, 1] by their
// bounds, poll x ± Δ e_i (clipped to the box) in a seeded random order,
// move to the first poll point that lowers s, halve Δ when none does, and
// stop when Δ < MinStep or the point's budget is spent. Fixed genes
// (Lo = Hi) are not polled. With Descent set, a poll round that fails is
// followed by one step along a common descent direction estimated from
// its poll points before Δ is halved (polishdescent.go), which takes the
// diagonal moves a search along the axes cannot.
//
// The end point of each point's search, when it moved, is offered to the
// archive, which keeps what no other point dominates; an archive member
// therefore leaves only for a point that dominates it (or has equal
// objectives and smaller genes), so the polish never makes a point of the
// front worse. (Offering every point evaluated would add the search's
// intermediate non-dominated points too: on the demo job that made a
// front of 148 points one of 738.)
// The polish of each point depends only on the archive before the polish,
// the seed and the point's index, so it runs in parallel and its result
// does not depend on Workers.
type Polish struct {
	// Budget is the number of evaluations per archive point; at least 1.
	Budget int
	// Step is the first Δ, as a fraction of each gene's range, in (0, 1].
	Step float64
	// MinStep ends a point's search when Δ falls below it; in (0, Step].
	MinStep float64
	// Twin, when not nil, gives a point's twin in dst and reports whether
	// it has one (a design may have a symmetric counterpart that the
	// objectives separate only weakly, such as bump = rebound at the same
	// sum). The twin is tried first, as a poll point. It must not
	// retain x or dst.
	Twin func(x, dst []float64) bool
	// Descent adds the descent step after each failed poll round (see
	// descentStep); false is the plain compass search.
	Descent bool
	// Neighbourhood, when not nil, closes the polish with rounds of a
	// local search on a fixed neighbourhood of every archive point (see
	// Neighbourhood).
	Neighbourhood *Neighbourhood
	// Seed selects the poll order; the search's seed is a good choice.
	Seed uint64
	// Workers is the number of points polished at once; at least 1.
	Workers int
}

// DefaultPolish returns a polish of 40 evaluations per point, first step
// 5 % of each gene's range, last 0.1 %, with the descent step: enough for
// a few accepted moves and two or three halvings on four genes (this
// project's choice, not a published figure).
func DefaultPolish(seed uint64) Polish {
	return Polish{Budget: 40, Step: 0.05, MinStep: 0.001, Descent: true, Seed: seed, Workers: 1}
}

// asfAugmentation is ρ of the augmented achievement scalarising function
// (Wierzbicki 1980 uses a small positive ρ; 10⁻⁶ is common practice).
const asfAugmentation = 1e-6

// PolishReport is what a polish did.
type PolishReport struct {
	// Points is the number of archive points polished.
	Points int
	// Evaluations is the number of calls of Problem.Evaluate the polish
	// made (not counted in Search.Evaluations).
	Evaluations int
	// Improved is the number of those points that a point found by the
	// polish dominates: each left the archive for a better one.
	Improved int
	// Rounds is the number of neighbourhood rounds run (0 without a
	// Neighbourhood); Replaced the members they replaced by a neighbour
	// that beats them.
	Rounds, Replaced int
	// Hypervolume is the archive's hypervolume against the search's
	// reference point after the polish (0 without one).
	Hypervolume float64
}

// validate checks the polish settings for n genes; fields are named
// "Polish.X".
func (p Polish) validate(n int) error {
	switch {
	case p.Budget < 1:
		return &FieldError{Field: "Polish.Budget", Msg: fmt.Sprintf("must be at least 1, got %d", p.Budget)}
	case !(p.Step > 0 && p.Step <= 1):
		return &FieldError{Field: "Polish.Step", Msg: fmt.Sprintf("must be in (0, 1], got %g", p.Step)}
	case !(p.MinStep > 0 && p.MinStep <= p.Step):
		return &FieldError{Field: "Polish.MinStep", Msg: fmt.Sprintf("must be in (0, Step = %g], got %g", p.Step, p.MinStep)}
	case p.Workers < 1:
		return &FieldError{Field: "Polish.Workers", Msg: fmt.Sprintf("must be at least 1, got %d", p.Workers)}
	}
	if p.Neighbourhood != nil {
		return p.Neighbourhood.validate(n)
	}
	return nil
}

// Polished reports whether the search's archive has been polished, and
// what the polish did.
func (s *Search) Polished() (PolishReport, bool) {
	if s.polish == nil {
		return PolishReport{}, false
	}
	return *s.polish, true
}

// Polish refines the archive once (see Polish) and returns what it did.
// The search must be done (Done). A search already polished, also one
// restored from a checkpoint written after its polish, returns the report
// of that polish and changes nothing, whatever p says; so a run cut and
// resumed anywhere ends with the same archive. An archive of infeasible
// points (no feasible point seen) is left as it is.
//
// When ctx is done before the end, Polish returns its error and leaves the
// search as it was.
func (s *Search) Polish(ctx context.Context, p Polish) (PolishReport, error) {
	if s.polish != nil {
		return *s.polish, nil
	}
	if err := p.validate(len(s.shape.bounds)); err != nil {
		return PolishReport{}, err
	}
	if !s.Done() {
		return PolishReport{}, &FieldError{Field: "Polish", Msg: fmt.Sprintf("the search is not done (generation %d of %d)", s.generation, s.settings.Generations)}
	}
	start := slices.Clone(s.front.sols)
	w := asfWeights(start, s.shape.nObj)
	found, evals, err := polishPoints(ctx, s.env.problem, s.shape, start, w, p, 0)
	if err != nil {
		return PolishReport{}, err
	}
	// The rounds work on a copy, so that a done ctx leaves the search as
	// it was.
	front := archive{sols: slices.Clone(s.front.sols)}
	for _, sol := range found {
		front.add(sol)
	}
	rep := PolishReport{Points: len(start), Evaluations: evals}
	if p.Neighbourhood != nil && len(start) > 0 {
		rounds, replaced, n, err := neighbourhoodRounds(ctx, s.env.problem, s.shape, &front, w, p)
		if err != nil {
			return PolishReport{}, err
		}
		rep.Rounds, rep.Replaced, rep.Evaluations = rounds, replaced, rep.Evaluations+n
	}
	for _, x := range start {
		if !slices.Contains(front.sols, x) && front.dominated(x.Objectives) {
			rep.Improved++
		}
	}
	s.front.sols = front.sols
	if s.ref != nil {
		rep.Hypervolume = Hypervolume(s.front.points(), s.ref)
	}
	s.polish = &rep
	return rep, nil
}

// dominated reports whether a member of the feasible archive dominates f.
func (a *archive) dominated(f []float64) bool {
	for _, t := range a.sols {
		if Dominates(t.Objectives, f) {
			return true
		}
	}
	return false
}

// polishPoints runs the compass search, with weights w, from every start
// point and returns the end points of those that moved, in start order,
// with the evaluation count. Point i's poll order is seeded by base + i.
func polishPoints(ctx context.Context, prob Problem, shape problemShape, start []*Solution, w []float64, p Polish, base uint64) ([]Solution, int, error) {
	if len(start) == 0 {
		return nil, 0, nil
	}
	found := make([][]Solution, len(start))
	counts := make([]int, len(start))
	forEachPoint(ctx, len(start), p.Workers, func(i int) {
		found[i], counts[i] = compassSearch(ctx, prob, shape, start[i], w, p, base+uint64(i))
	})
	if err := ctx.Err(); err != nil {
		return nil, 0, err
	}
	var out []Solution
	evals := 0
	for i := range found {
		out = append(out, found[i]...)
		evals += counts[i]
	}
	return out, evals, nil
}

// asfWeights are w_j = 1 / (max f_j − min f_j) over the points, 1 where the
// range is 0.
func asfWeights(pts []*Solution, m int) []float64 {
	w := make([]float64, m)
	for j := range w {
		w[j] = 1
		if e := extent(pts, j); e > 0 {
			w[j] = 1 / e
		}
	}
	return w
}

// extent is max f_j − min f_j over pts, 0 when pts is empty.
func extent(pts []*Solution, j int) float64 {
	if len(pts) == 0 {
		return 0
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range pts {
		lo, hi = min(lo, s.Objectives[j]), max(hi, s.Objectives[j])
	}
	return hi - lo
}

// asf is the augmented achievement scalarising function of f against the
// reference z with weights w (see Polish).
func asf(f, z, w []float64) float64 {
	worst, sum := math.Inf(-1), 0.0
	for j := range f {
		d := w[j] * (f[j] - z[j])
		worst = max(worst, d)
		sum += d
	}
	return worst + asfAugmentation*sum
}

// evaluateAt evaluates x (kept, not copied) into a new Solution, feasible
// when the evaluation succeeded with finite values and no violation.
func evaluateAt(prob Problem, shape problemShape, x []float64) Solution {
	obj := make([]float64, shape.nObj)
	viol := make([]float64, shape.nCon)
	err := prob.Evaluate(x, obj, viol)
	sol := Solution{Genes: x, Objectives: obj, Violations: viol}
	if err != nil || !finiteAll(obj) || !finiteAll(viol) {
		return sol
	}
	for k := range viol {
		viol[k] = max(0, viol[k])
	}
	sol.Feasible = TotalViolation(viol) == 0
	return sol
}

func finiteAll(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
