package study

import (
	"fmt"
	"math"
	"strings"

	"dampfront/model"
)

// Solution is everything a solution reports: its genes and setup, the
// objectives and constraint violations as the search scores them, the
// metrics on every road case with the modes at its speed, the damper
// curves at the component, and the validity warnings.
type Solution struct {
	Genes      []float64
	Setup      model.Setup
	Objectives []float64 // nil when the model cannot evaluate the setup
	Violations []float64
	Feasible   bool
	// InfeasibleReason says why a solution is not feasible: every
	// violated constraint, or why the model could not evaluate it.
	InfeasibleReason string
	// Shortfalls holds every violated constraint, in the spec's order,
	// with its worst value, road case (an index into Cases) and how far
	// over; empty when every constraint is met.
	Shortfalls []model.Shortfall
	Cases      []CaseDetail
	// Transients are the metrics on the manoeuvre and kerb cases, in the
	// spec's order (manoeuvres, then kerbs).
	Transients []model.TransientMetrics
	Curves     []model.DamperCurve // nil when they cannot be drawn (see Warnings)
	Warnings   []string            // every case's warnings, then the curves'
	// Robust holds, for a spec with uncertainty, the objectives of the
	// nominal car and their spread over the uncertain cars; nil without.
	// Objectives and Violations are then the robust ones (the measure over
	// the cars, the worst violation), while Cases, Transients and
	// Shortfalls are the nominal car's.
	Robust *Robust
}

// Robust is a solution's objectives over the uncertain cars, each slice
// in the order of the objectives, in their units.
type Robust struct {
	Nominal []float64 // on the nominal car (the vehicle as given)
	model.RobustFigures
}

// CaseDetail is one road case of a solution.
type CaseDetail struct {
	Metrics model.CaseMetrics
	Modes   []model.Mode // at the case's speed and equivalent slopes
	// Hand holds heave, pitch and roll worked out by hand (tyres rigid)
	// at the same speed and slopes, beside Modes; zero when the modal
	// analysis failed.
	Hand     [3]model.HandMode
	Warnings []string // above the evaluator's threshold, and a failed modal analysis
}

// Evaluate computes everything a solution reports for setup s. A setup
// the model cannot evaluate (no fixed point, an unstable system) gives an
// infeasible solution with the reason, not an error.
func (pl *Plan) Evaluate(s model.Setup) *Solution {
	sol := &Solution{Genes: pl.problem.Design().Encode(s), Setup: s}
	var r model.Result
	if err := pl.eval.Evaluate(s, &r); err != nil {
		sol.InfeasibleReason = "evaluation failed: " + err.Error()
		return sol
	}
	sol.Objectives = make([]float64, pl.problem.NumObjectives())
	sol.Violations = make([]float64, pl.problem.NumConstraints())
	pl.problem.Score(&r, sol.Objectives, sol.Violations)
	if pl.problem.IsRobust() {
		rb := &Robust{Nominal: sol.Objectives}
		sol.Objectives = make([]float64, pl.problem.NumObjectives())
		if err := pl.problem.EvaluateRobust(s, sol.Objectives, sol.Violations, &rb.RobustFigures); err != nil {
			sol.Objectives, sol.Violations = nil, nil
			sol.InfeasibleReason = "evaluation failed: " + err.Error()
			return sol
		}
		sol.Robust = rb
	}
	sol.Feasible, sol.InfeasibleReason = pl.feasibility(sol.Objectives, sol.Violations)
	sol.Shortfalls = violated(pl.problem.Shortfalls(&r))
	pl.describe(sol, s, &r)
	return sol
}

// describe adds the metrics, modes, curves and warnings of an evaluated
// result to sol.
func (pl *Plan) describe(sol *Solution, s model.Setup, r *model.Result) {
	v := pl.eval.Vehicle()
	threshold := pl.eval.WarnThreshold()
	for i := range r.Cases {
		speed, slopes, heave := pl.eval.Case(i).Speed, r.Cases[i].EquivalentDamping, r.Cases[i].HeaveEquivalentDamping
		modes, err := model.ModesAtHeave(v, speed, slopes, heave)
		c := CaseDetail{Metrics: r.Cases[i], Modes: modes, Warnings: r.Cases[i].WarningStrings(threshold)}
		if err == nil {
			c.Hand, err = model.HandModesAtHeave(v, speed, slopes, heave, modes)
		}
		if err != nil {
			c.Warnings = append(c.Warnings, fmt.Sprintf("%s: modal analysis failed: %v", r.Cases[i].Case, err))
		}
		sol.Cases = append(sol.Cases, c)
		sol.Warnings = append(sol.Warnings, c.Warnings...)
	}
	sol.Transients = r.Transients
	curves, err := pl.Curves(s, nil, nil)
	if err != nil {
		sol.Warnings = append(sol.Warnings, "damper curves: "+err.Error())
		return
	}
	sol.Curves = curves
}

// feasibility says whether objectives and violations make a feasible
// solution, and if not, why: every violated constraint with its
// violation max(0, worst/limit - 1).
func (pl *Plan) feasibility(obj, viol []float64) (bool, string) {
	var why []string
	for j, f := range obj {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			why = append(why, fmt.Sprintf("objective %s is %g", pl.problem.Objectives()[j].Kind, f))
		}
	}
	cons := pl.problem.Constraints()
	for j, x := range viol {
		switch {
		case !(x > 0 || math.IsNaN(x)):
		case cons[j].Kind == model.ConstraintModalRatio:
			why = append(why, fmt.Sprintf("%s leaves its band [%g, %g] by %.3g%%", cons[j], cons[j].Lower, cons[j].Limit, 100*x))
		default:
			why = append(why, fmt.Sprintf("%s exceeds its limit %g by %.3g%%", cons[j].Kind, cons[j].Limit, 100*x))
		}
	}
	if len(why) == 0 {
		return true, ""
	}
	return false, strings.Join(why, "; ")
}

// violated keeps the shortfalls of the violated constraints, in order.
func violated(all []model.Shortfall) []model.Shortfall {
	var out []model.Shortfall
	for _, sf := range all {
		if sf.Violation > 0 || math.IsNaN(sf.Violation) {
			out = append(out, sf)
		}
	}
	return out
}
