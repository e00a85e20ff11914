package api

import (
	"fmt"
	"math"
	"strings"

	"google.golang.org/protobuf/reflect/protoreflect"

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
	return finiteSolution(sol)
}

// finiteSolution is the guard that keeps NaN and infinities out of every
// reported and stored solution: a solution holding one anywhere (metrics,
// modes, curves) becomes an infeasible one with its genes and setup, and
// the reason names the first such value.
func finiteSolution(sol *pb.Solution) *pb.Solution {
	path, v, ok := firstNonFinite(sol.ProtoReflect(), "")
	if !ok {
		return sol
	}
	return &pb.Solution{
		Index: sol.Index, Genes: sol.Genes, Setup: sol.Setup,
		InfeasibleReason: fmt.Sprintf("evaluation failed: %s is %v; check the inputs for values out of scale", path, v),
	}
}

// firstNonFinite finds the first NaN or infinite double or float of m,
// depth first in field order, with its path.
func firstNonFinite(m protoreflect.Message, path string) (string, float64, bool) {
	var (
		at    string
		bad   float64
		found bool
	)
	check := func(p string, v protoreflect.Value, fd protoreflect.FieldDescriptor) bool {
		switch fd.Kind() {
		case protoreflect.DoubleKind, protoreflect.FloatKind:
			if f := v.Float(); math.IsNaN(f) || math.IsInf(f, 0) {
				at, bad, found = p, f, true
			}
		case protoreflect.MessageKind:
			at, bad, found = firstNonFinite(v.Message(), p)
		}
		return !found
	}
	m.Range(func(fd protoreflect.FieldDescriptor, v protoreflect.Value) bool {
		p := joinField(path, string(fd.Name()))
		switch {
		case fd.IsList():
			l := v.List()
			for i := 0; i < l.Len() && !found; i++ {
				check(fmt.Sprintf("%s[%d]", p, i), l.Get(i), fd)
			}
			return !found
		case fd.IsMap():
			v.Map().Range(func(k protoreflect.MapKey, mv protoreflect.Value) bool {
				return check(fmt.Sprintf("%s[%q]", p, k.String()), mv, fd.MapValue())
			})
			return !found
		}
		return check(p, v, fd)
	})
	return at, bad, found
}

// describe adds the metrics, modes, curves and warnings of an evaluated
// result to sol.
func (pl *plan) describe(sol *pb.Solution, s model.Setup, r *model.Result) {
	v := pl.eval.Vehicle()
	threshold := pl.eval.WarnThreshold()
	for i := range r.Cases {
		modes, err := model.ModalAnalysis(v, &s, pl.eval.Case(i).Speed)
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
		if x > 0 || math.IsNaN(x) {
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
