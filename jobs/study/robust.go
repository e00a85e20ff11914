package study

import (
	"context"
	"fmt"

	"dampfront/model"
)

// robustProblem makes the nominal problem robust over the spec's
// uncertainty (model.NewRobustProblem): it builds the evaluator of every
// uncertain car once, on the spec's road and transient cases, so that
// each keeps its own response cache for the whole job. A car the
// perturbation makes invalid (a sprung mass or tyre rate out of its
// range, a car unstable at a case's speed) is a problem at
// "uncertainty", naming the car.
func robustProblem(ctx context.Context, c *Checked, nominal *model.Problem) (*model.Problem, error) {
	spec := c.spec
	u := spec.Uncertainty
	points := u.UncertainPoints()
	evals := make([]*model.Evaluator, len(points))
	var p problems
	for j := range points {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		v, err := points[j].Apply(&spec.Vehicle)
		if err == nil {
			evals[j], err = compileEvaluator(ctx, c, v, &spec.Vehicle)
		}
		if err != nil {
			if ctx.Err() != nil {
				return nil, ctx.Err()
			}
			p.add("uncertainty", "the uncertain car %d of %d (%s) cannot be evaluated: %v", j+1, len(points), describePoint(&points[j]), err)
			return nil, p.err()
		}
	}
	return model.NewRobustProblem(nominal, u, points, evals)
}

// compileEvaluator is the evaluator of car v on the spec's road cases and
// manoeuvre and kerb cases; ref, when not nil, is the car the setups'
// ratios are taken of (model.EvaluatorOptions.DampingReference).
func compileEvaluator(ctx context.Context, c *Checked, v model.Vehicle, ref *model.Vehicle) (*model.Evaluator, error) {
	spec := c.spec
	eval, err := model.NewEvaluatorContext(ctx, v, spec.RoadCases, model.EvaluatorOptions{Grid: spec.Grid, DampingReference: ref})
	if err != nil {
		return nil, err
	}
	if len(spec.Manoeuvres)+len(spec.Kerbs) > 0 {
		opt := model.TransientOptions{LoadFraction: spec.LoadFraction, MaxRatio: c.design.MaxSlopeRatio()}
		if err := eval.SetTransientCases(spec.Manoeuvres, spec.Kerbs, opt); err != nil {
			return nil, err
		}
	}
	return eval, nil
}

// describePoint names an uncertain car by the values that differ from the
// nominal car.
func describePoint(pt *model.UncertainPoint) string {
	return fmt.Sprintf("fuel %g kg at %g m, tyre rate ×%g front ×%g rear, downforce ×%g, balance %+g, aero stiffness ×%g",
		pt.FuelMass, pt.FuelPosition, pt.TyreRateScale[0], pt.TyreRateScale[1], pt.DownforceScale, pt.BalanceShift, pt.AeroStiffnessScale)
}

// Nominal returns the checked spec without its uncertainty: what compiles
// to the nominal car alone, for a caller that needs only it (the model
// inputs of a command running the time domain, the sheet), without
// building every uncertain car. It is c itself without uncertainty.
func (c *Checked) Nominal() *Checked {
	if c.spec.Uncertainty == nil {
		return c
	}
	spec := *c.spec
	spec.Uncertainty = nil
	out := *c
	out.spec = &spec
	return &out
}
