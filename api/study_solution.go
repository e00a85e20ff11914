package api

import (
	"fmt"
	"math"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// evaluate computes everything a solution reports for setup s: the
// metrics on every road case with the modes at each case's speed, the
// objectives and constraint violations as the search scores them, the
// damper curves at the component, and the validity warnings. A setup the
// model cannot evaluate (no fixed point, an unstable system) gives an
// infeasible solution with the reason, not an error.
func (pl *plan) evaluate(s model.Setup) *pb.Solution {
	sol := &pb.Solution{Genes: pl.study.Design().Encode(s), Setup: setupToProto(s)}
	var r model.Result
	if err := pl.eval.Evaluate(s, &r); err != nil {
		sol.InfeasibleReason = "evaluation failed: " + err.Error()
		return sol
	}
	sol.Objectives = make([]float64, pl.study.NumObjectives())
	sol.Violations = make([]float64, pl.study.NumConstraints())
	pl.study.Score(&r, sol.Objectives, sol.Violations)
	sol.Feasible, sol.InfeasibleReason = pl.feasibility(sol.Objectives, sol.Violations)
	pl.describe(sol, s, &r)
	return sol
}

// describe adds the metrics, modes, curves and warnings of an evaluated
// result to sol.
func (pl *plan) describe(sol *pb.Solution, s model.Setup, r *model.Result) {
	v := pl.eval.Vehicle()
	threshold := pl.eval.WarnThreshold()
	for i := range r.Cases {
		modes, err := model.ModesAt(v, pl.eval.Case(i).Speed, r.Cases[i].EquivalentDamping)
		cm := caseMetricsToProto(&r.Cases[i], modes, threshold)
		if err != nil {
			cm.Warnings = append(cm.Warnings, fmt.Sprintf("%s: modal analysis failed: %v", r.Cases[i].Case, err))
		}
		sol.CaseMetrics = append(sol.CaseMetrics, cm)
		sol.Warnings = append(sol.Warnings, cm.Warnings...)
	}
	curves, err := model.DamperCurves(v, &s, pl.adjustment, pl.curveMax, pl.curvePoints)
	if err != nil {
		sol.Warnings = append(sol.Warnings, "damper curves: "+err.Error())
		return
	}
	sol.DamperCurves = damperCurvesToProto(curves)
}

// feasibility says whether objectives and violations make a feasible
// solution, and if not, why: every violated constraint with its
// violation max(0, worst/limit - 1).
func (pl *plan) feasibility(obj, viol []float64) (bool, string) {
	var why []string
	for j, f := range obj {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			why = append(why, fmt.Sprintf("objective %s is %g", pl.study.Objectives()[j].Kind, f))
		}
	}
	cons := pl.study.Constraints()
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

// curves returns the damper curves of s with the plan's settings, or with
// adj and the curve settings c where they are given.
func (pl *plan) curves(s model.Setup, adj *pb.Adjustment, c *pb.CurveSettings) ([]model.DamperCurve, error) {
	a := pl.adjustment
	if adj != nil {
		a = adjustmentFromProto(adj)
	}
	vmax, points := pl.curveMax, pl.curvePoints
	if c.GetMaxVelocityMPerS() != 0 {
		vmax = c.GetMaxVelocityMPerS()
	}
	if c.GetPoints() != 0 {
		points = int(c.GetPoints())
	}
	return model.DamperCurves(pl.eval.Vehicle(), &s, a, vmax, points)
}
