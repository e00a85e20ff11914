package study

import (
	"context"
	"slices"

	"dampfront/model"
	"dampfront/optimizer"
)

// Plan is a spec compiled into what the model and the optimiser run: the
// evaluator of the car on the road cases, the search problem, the
// optimiser settings and the damper-curve settings. A Plan is safe for
// concurrent use.
type Plan struct {
	spec     *Spec // with defaults filled in
	eval     *model.Evaluator
	problem  *model.Problem
	settings optimizer.Settings // Workers 1, no Progress
}

// Compile checks s (see Check) and compiles it (see Checked.Compile).
func Compile(ctx context.Context, s *Spec) (*Plan, error) {
	c, err := Check(s)
	if err != nil {
		return nil, err
	}
	return c.Compile(ctx)
}

// Compile builds the plan of a checked spec: it prepares every road case
// on the grid, the part of the work that grows with the spec, and stops
// with ctx's error when ctx is done. A car that is not stable at a case's
// speed is a *model.ValidationError at that case.
func (c *Checked) Compile(ctx context.Context) (*Plan, error) {
	spec := c.spec
	eval, err := compileEvaluator(ctx, c, spec.Vehicle, nil)
	if err != nil {
		return nil, err
	}
	problem, err := model.NewProblem(eval, c.design, spec.Objectives, spec.Constraints)
	// A given reference replaces the middle of the bounds that NewProblem
	// has already evaluated for a normalised objective: one evaluation more
	// per compile, left as it is since it is small beside the search.
	if err == nil && spec.Reference != nil {
		err = problem.SetReference(*spec.Reference)
	}
	if err != nil {
		var p problems
		p.mergeMapped(problemPath, err)
		return nil, p.err()
	}
	if spec.Uncertainty != nil {
		if problem, err = robustProblem(ctx, c, problem); err != nil {
			return nil, err
		}
	}
	return &Plan{spec: spec, eval: eval, problem: problem, settings: c.settings}, nil
}

// Spec returns the plan's spec with its defaults filled in. It must not
// be changed.
func (pl *Plan) Spec() *Spec { return pl.spec }

// Evaluator returns the car on the road cases.
func (pl *Plan) Evaluator() *model.Evaluator { return pl.eval }

// Problem returns the search problem: genes, objectives, constraints.
func (pl *Plan) Problem() *model.Problem { return pl.problem }

// Settings returns the optimiser's settings of the plan with a worker
// count (at least 1) and a progress callback.
func (pl *Plan) Settings(workers int, progress func(optimizer.Progress)) optimizer.Settings {
	s := pl.settings
	s.ReferencePoint = slices.Clone(s.ReferencePoint)
	s.Workers = max(1, workers)
	s.Progress = progress
	return s
}

// SearchProblem is the plan's problem as the optimiser sees it.
func (pl *Plan) SearchProblem() optimizer.Problem { return searchProblem{pl.problem} }

// GeneNames lists the genes' names in order.
func (pl *Plan) GeneNames() []string {
	genes := pl.problem.Genes()
	out := make([]string, len(genes))
	for i, g := range genes {
		out[i] = g.Name
	}
	return out
}

// RoadCases returns a copy of the plan's road cases, weights filled in.
func (pl *Plan) RoadCases() []model.RoadCase { return slices.Clone(pl.spec.RoadCases) }

// EvaluatorOptions are the options the plan's evaluator was made with.
func (pl *Plan) EvaluatorOptions() model.EvaluatorOptions {
	return model.EvaluatorOptions{Grid: pl.spec.Grid}
}

// Curves returns the damper curves of setup s with the plan's adjustment
// and curve settings, or with adj and curves where they are not nil (a
// zero field of curves keeps the plan's). Problems are a
// *model.ValidationError with model.DamperCurves's paths.
func (pl *Plan) Curves(s model.Setup, adj *model.Adjustment, curves *Curves) ([]model.DamperCurve, error) {
	a := pl.spec.Adjustment
	if adj != nil {
		a = *adj
	}
	vmax, points := pl.curveRange(curves)
	return model.DamperCurves(pl.eval.Vehicle(), &s, a, vmax, points)
}

// HeaveCurves returns the heave damper curves of setup s
// (model.HeaveDamperCurves, nil without heave dampers) at the plan's
// curve settings or curves' as Curves does.
func (pl *Plan) HeaveCurves(s model.Setup, curves *Curves) ([]model.HeaveCurve, error) {
	vmax, points := pl.curveRange(curves)
	return model.HeaveDamperCurves(pl.eval.Vehicle(), &s, vmax, points)
}

// curveRange is the plan's curve settings, overridden by curves' non-zero
// fields.
func (pl *Plan) curveRange(curves *Curves) (float64, int) {
	vmax, points := pl.spec.Curves.MaxVelocity, pl.spec.Curves.Points
	if curves != nil && curves.MaxVelocity != 0 {
		vmax = curves.MaxVelocity
	}
	if curves != nil && curves.Points != 0 {
		points = curves.Points
	}
	return vmax, points
}

// searchProblem adapts a model.Problem to optimizer.Problem: the genes'
// box, the objectives and the constraint violations. model.Problem is
// safe for concurrent use and pure, as the optimiser requires.
type searchProblem struct{ p *model.Problem }

func (q searchProblem) Bounds() []optimizer.Bound { return bounds(q.p.Genes()) }

func (q searchProblem) NumObjectives() int  { return q.p.NumObjectives() }
func (q searchProblem) NumConstraints() int { return q.p.NumConstraints() }

func (q searchProblem) Evaluate(x, obj, viol []float64) error {
	return q.p.EvaluateGenes(x, obj, viol)
}

// bounds is the optimiser's box of genes.
func bounds(genes []model.Gene) []optimizer.Bound {
	b := make([]optimizer.Bound, len(genes))
	for i, g := range genes {
		b[i] = optimizer.Bound{Lo: g.Min, Hi: g.Max}
	}
	return b
}
