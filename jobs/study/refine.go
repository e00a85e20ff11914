package study

import (
	"context"
	"fmt"
	"sync"

	"dampfront/model"
	"dampfront/optimizer"
)

// Refinement is the optional stage after the search (and its polish and
// front check): every front point is checked on the nonlinear car in the
// time domain (model.Verify, on the same road realisations as the
// time-domain check of the same seed and duration gives), its objectives
// and constraints are read from the time-domain metrics with their
// statistical errors (model.Problem.Refine), and the front is sorted
// again on them (see RefinedPoint). Zero fields take the defaults, which
// are the time-domain check's.
type Refinement struct {
	Enabled bool
	// Duration is the recorded road per case and point (s), after
	// settling; 0 means model.DefaultDuration, at most MaxRefineDuration.
	Duration float64
	// Seed seeds the road realisations (case i draws from the stream
	// (Seed, i), as the check does); nil means the search's seed.
	Seed *uint64
	// Sigmas is the number of statistical errors within which an order
	// counts as unsettled (see RefinedPoint); 0 means model.VerdictSigmas.
	Sigmas float64
}

// Limits of the refinement's settings.
const (
	// MaxRefineDuration is the time-domain check's longest record (s),
	// five times its default (as for a check of one setup).
	MaxRefineDuration = 600.0
	// MaxRefineSigmas bounds Refinement.Sigmas: beyond 10 statistical
	// errors nothing is ever settled (a sanity bound, this project's).
	MaxRefineSigmas = 10.0
)

// withDefaults fills in a refinement that is enabled; one that is not
// stays as it is, so a spec without one keeps its stored bytes.
func (r Refinement) withDefaults(searchSeed uint64) Refinement {
	if !r.Enabled {
		return r
	}
	if r.Duration == 0 {
		r.Duration = model.DefaultDuration
	}
	if r.Seed == nil {
		r.Seed = &searchSeed
	} else {
		seed := *r.Seed
		r.Seed = &seed
	}
	if r.Sigmas == 0 {
		r.Sigmas = model.VerdictSigmas
	}
	return r
}

// check adds the problems of a refinement with its defaults filled in.
func (r *Refinement) check(p *problems) {
	if !(r.Duration >= 0 && r.Duration <= MaxRefineDuration) {
		p.add("refinement.duration_s", "must be a number of seconds in (0, %g], got %g", MaxRefineDuration, r.Duration)
	}
	if !(r.Sigmas >= 0 && r.Sigmas <= MaxRefineSigmas) {
		p.add("refinement.sigmas", "must be a number of statistical errors in (0, %g], got %g", MaxRefineSigmas, r.Sigmas)
	}
	if !r.Enabled && (r.Duration != 0 || r.Seed != nil || r.Sigmas != 0) {
		p.add("refinement.enabled", "is false, so the refinement's other settings do nothing: set enabled: true or leave them out")
	}
}

// RefinedPoint is a front point refined on the nonlinear car.
//
// Rank and the unsettled mark. The points are sorted again by the fast
// non-dominated sort (Deb et al. 2002) with constrained domination on the
// refined objectives and violations: rank 1 is the refined front, rank 2
// what only rank 1 dominates, and so on. With k = Sigmas and e the
// statistical errors, point b surely dominates point a when b ≺ a and
//
//	f_b,m + k e_b,m ≤ f_a,m - k e_a,m   for every objective m,
//
// Errors of two points add: under the common road of the check they are
// correlated, and the sum is the bound whatever the correlation. A
// feasible point is unsettled when it dominates, or is dominated by,
// another feasible point on the refined figures but not surely: that
// order is within k statistical errors, and the re-sorting that rests on
// it is not settled by the records. Any point whose feasibility is
// unsettled (model.Refined) is unsettled too. A point of rank 1 that
// dominates no other is settled: nothing says more than that it may be
// dominated within the errors, as every near neighbour on a dense front
// may.
type RefinedPoint struct {
	model.Refined
	// Cases are the time-domain check of the point, one per road case in
	// the spec's order: the case's name, the check's step and settling
	// time (Time.Step, Time.Settle; the rest of Time is not kept) and
	// every row, as model.Verify gives them.
	Cases []model.VerifyCase
	// Failed says why the point could not be checked ("" when it was);
	// such a point has no refined figures and rank 0.
	Failed    string
	Feasible  bool // every refined violation is 0
	Rank      int  // 1 on the refined front; 0 for a failed point
	Unsettled bool
}

// RefineSummary is what the refinement did to the front, or, with
// InProgress set, how far it is.
type RefineSummary struct {
	Points     int // front points checked; while InProgress, the front's points
	Failed     int // points the time-domain check could not run
	OffFront   int // points of rank above 1: dominated on the refined figures
	Infeasible int // points whose refined violations are not all 0
	Unsettled  int // points marked unsettled
	Duration   float64
	Seed       uint64
	Sigmas     float64
	// InProgress marks the summary of a refinement still running:
	// Checked is then the points checked so far, Points the front's, and
	// the counts between them are 0 (known only once every point is).
	// A done refinement's summary has neither.
	InProgress bool
	Checked    int
}

// progress is the summary of a refinement under way, nil before it has
// its front (see RefineSummary.InProgress).
func (st *refineStage) progress() *RefineSummary {
	if st.points == nil {
		return nil
	}
	sum := &RefineSummary{Points: len(st.points), Duration: st.opt.Duration, Seed: *st.opt.Seed, Sigmas: st.opt.Sigmas, InProgress: true}
	for _, p := range st.points {
		if p != nil {
			sum.Checked++
		}
	}
	return sum
}

// refineStage is the refinement of a done run's front, resumable point by
// point: each point's figures depend only on its setup and the spec, so
// a run that restores the points checked before a cut and checks the rest
// ends with the same bits.
type refineStage struct {
	opt      Refinement
	verifier *model.Verifier // made at the first step
	front    []optimizer.Solution
	// points are the front's points, nil until checked; the slice is nil
	// until the first step, or as long as the front when restored.
	points  []*RefinedPoint
	summary *RefineSummary
}

func newRefineStage(pl *Plan) *refineStage {
	if !pl.spec.Refinement.Enabled {
		return nil
	}
	return &refineStage{opt: pl.spec.Refinement}
}

// step checks the next points of the front, at most workers at once, and
// reports whether every point is checked and the front sorted again. It
// returns early, with nil, when ctx is done; the points checked so far are
// kept.
func (st *refineStage) step(ctx context.Context, pl *Plan, front []optimizer.Solution, workers int) (bool, error) {
	if st.summary != nil {
		return true, nil
	}
	if err := st.start(pl, front); err != nil {
		return false, err
	}
	var todo []int
	for i, p := range st.points {
		if p == nil && len(todo) < max(1, workers) {
			todo = append(todo, i)
		}
	}
	if len(todo) > 0 && ctx.Err() == nil {
		var wg sync.WaitGroup
		for _, i := range todo {
			wg.Add(1)
			go func() {
				defer wg.Done()
				st.points[i] = st.check(pl, &st.front[i])
			}()
		}
		wg.Wait()
		return false, nil
	}
	if len(todo) > 0 {
		return false, nil
	}
	st.summary = rankRefined(st.points, st.opt)
	// Every point is checked: let the verifier go, and with it the road
	// inputs it keeps (some 15 MB a road case at the default duration),
	// before the job saves its refined front.
	st.verifier = nil
	return true, nil
}

// start fixes the front and makes the check's verifier, once.
func (st *refineStage) start(pl *Plan, front []optimizer.Solution) error {
	if st.verifier != nil {
		return nil
	}
	if st.points != nil && len(st.points) != len(front) {
		return fmt.Errorf("refinement checkpoint holds a front of %d points, the search's has %d", len(st.points), len(front))
	}
	vf, err := model.NewVerifier(pl.spec.Vehicle, pl.RoadCases(), st.verifyOptions(pl))
	if err != nil {
		return err
	}
	if st.points == nil {
		st.points = make([]*RefinedPoint, len(front))
	}
	st.front, st.verifier = front, vf
	return nil
}

// verifyOptions are the time-domain check's options of the refinement:
// those of the check of one setup with the refinement's duration and
// seed (the evaluator's warning threshold marks nothing the refinement
// reads).
func (st *refineStage) verifyOptions(pl *Plan) model.VerifyOptions {
	return model.VerifyOptions{
		Time:  model.TimeOptions{Duration: st.opt.Duration, WarnThreshold: pl.eval.WarnThreshold()},
		Model: pl.EvaluatorOptions(),
		Seed:  *st.opt.Seed,
	}
}

// check refines one front point.
func (st *refineStage) check(pl *Plan, s *optimizer.Solution) *RefinedPoint {
	setup := pl.problem.Design().Decode(s.Genes)
	rep, err := st.verifier.Verify(setup)
	if err != nil {
		return &RefinedPoint{Failed: "time-domain check: " + err.Error()}
	}
	ref, err := pl.problem.Refine(rep, s.Objectives, s.Violations, st.opt.Sigmas)
	if err != nil {
		return &RefinedPoint{Failed: err.Error()}
	}
	p := &RefinedPoint{Refined: *ref}
	for _, c := range rep.Cases {
		p.Cases = append(p.Cases, model.VerifyCase{Case: c.Case,
			Time: model.TimeMetrics{Step: c.Time.Step, Settle: c.Time.Settle}, Rows: c.Rows})
	}
	return p
}

// rankRefined sorts the checked points again and marks the unsettled ones
// (see RefinedPoint); it returns the summary.
func rankRefined(points []*RefinedPoint, opt Refinement) *RefineSummary {
	sum := &RefineSummary{Points: len(points), Duration: opt.Duration, Seed: *opt.Seed, Sigmas: opt.Sigmas}
	var idx []int
	var obj [][]float64
	var viol []float64
	for i, p := range points {
		if p.Failed != "" {
			sum.Failed++
			continue
		}
		p.Feasible = optimizer.TotalViolation(p.Violations) == 0
		idx = append(idx, i)
		obj = append(obj, p.Objectives)
		viol = append(viol, optimizer.TotalViolation(p.Violations))
	}
	for r, fr := range optimizer.NonDominatedSort(obj, viol) {
		for _, k := range fr {
			points[idx[k]].Rank = r + 1
		}
	}
	k := opt.Sigmas
	for _, i := range idx {
		a := points[i]
		a.Unsettled = a.FeasibilityUnsettled
		if a.Feasible && !a.Unsettled {
			a.Unsettled = orderUnsettled(a, points, idx, k)
		}
		if a.Rank > 1 {
			sum.OffFront++
		}
		if !a.Feasible {
			sum.Infeasible++
		}
		if a.Unsettled {
			sum.Unsettled++
		}
	}
	return sum
}

// orderUnsettled reports whether feasible point a dominates, or is
// dominated by, another feasible point only within k statistical errors.
func orderUnsettled(a *RefinedPoint, points []*RefinedPoint, idx []int, k float64) bool {
	for _, j := range idx {
		b := points[j]
		if b == a || !b.Feasible {
			continue
		}
		if optimizer.Dominates(b.Objectives, a.Objectives) && !surelyDominates(b, a, k) ||
			optimizer.Dominates(a.Objectives, b.Objectives) && !surelyDominates(a, b, k) {
			return true
		}
	}
	return false
}

// surelyDominates: b ≺ a and f_b + k e_b ≤ f_a - k e_a in every objective.
func surelyDominates(b, a *RefinedPoint, k float64) bool {
	if !optimizer.Dominates(b.Objectives, a.Objectives) {
		return false
	}
	for m := range a.Objectives {
		if b.Objectives[m]+k*b.ObjectiveErrors[m] > a.Objectives[m]-k*a.ObjectiveErrors[m] {
			return false
		}
	}
	return true
}
