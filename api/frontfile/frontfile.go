// Package frontfile writes a job's Pareto front in the one file schema
// that the command line (front --format csv|json), the job page's
// downloads and the Python client all produce: one row per solution, SI
// values with the unit in each column's name, floats as the shortest
// text that reads back to the same double. README.md ("The front as a
// file") lists every column with its unit; api/clients/python writes the
// same schema, and a test holds the three to it byte for byte.
package frontfile

import (
	"strconv"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

// objectiveColumns names each objective's column, its SI unit suffixed.
var objectiveColumns = map[pb.ObjectiveKind]string{
	pb.ObjectiveKind_OBJECTIVE_KIND_GRIP:           "grip_rel",
	pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM:       "platform_m",
	pb.ObjectiveKind_OBJECTIVE_KIND_FRONT_PLATFORM: "front_platform_m",
	pb.ObjectiveKind_OBJECTIVE_KIND_REAR_PLATFORM:  "rear_platform_m",
	pb.ObjectiveKind_OBJECTIVE_KIND_PITCH:          "pitch_rad",
	pb.ObjectiveKind_OBJECTIVE_KIND_ROLL:           "roll_rad",
	pb.ObjectiveKind_OBJECTIVE_KIND_HEAVE_ACCEL:    "heave_accel_m_per_s2",
	pb.ObjectiveKind_OBJECTIVE_KIND_DOWNFORCE:      "downforce_n",
	pb.ObjectiveKind_OBJECTIVE_KIND_BALANCE:        "balance",
}

// ObjectiveColumn is the column of an objective of kind k; a kind this
// version does not know gets its enum name in lower case.
func ObjectiveColumn(k pb.ObjectiveKind) string {
	if c, ok := objectiveColumns[k]; ok {
		return c
	}
	return strings.ToLower(strings.TrimPrefix(k.String(), "OBJECTIVE_KIND_"))
}

// ConstraintColumn is the column of a constraint's violation,
// max(0, worst / limit - 1), dimensionless: "lift_off_violation"; a band
// on a mode's ratio is named by its mode, "heave_ratio_violation".
func ConstraintColumn(c *pb.Constraint) string {
	if c.GetKind() == pb.ConstraintKind_CONSTRAINT_KIND_MODAL_RATIO && c.GetMode() != pb.ModeName_MODE_NAME_UNSPECIFIED {
		return strings.ToLower(strings.TrimPrefix(c.GetMode().String(), "MODE_NAME_")) + "_ratio_violation"
	}
	return strings.ToLower(strings.TrimPrefix(c.GetKind().String(), "CONSTRAINT_KIND_")) + "_violation"
}

// slopeColumns are the low-speed slopes at the damper (N s/m) of the
// front-left and rear-left corners, one corner per axle.
var slopeColumns = []struct {
	corner        pb.CornerPosition
	bump, rebound string
}{
	{pb.CornerPosition_CORNER_POSITION_FRONT_LEFT, "front_bump_slope_n_s_per_m", "front_rebound_slope_n_s_per_m"},
	{pb.CornerPosition_CORNER_POSITION_REAR_LEFT, "rear_bump_slope_n_s_per_m", "rear_rebound_slope_n_s_per_m"},
}

// Columns are the columns of front's rows, in order: index, the genes,
// the objectives, the four slopes, each constraint's violation,
// out_of_band_n (the largest excess over the adjuster range, N at the
// damper, over the corners and directions; 0 inside the band or without
// one), feasible and balanced; then, for a refined front (Refined), each
// objective's refined value and statistical error ("refined_grip_rel",
// "refined_grip_rel_error"), refined_feasible, refined_rank and
// refined_unsettled; then, for a robust front (its solutions
// carry Solution.robust), per objective its value on the nominal car,
// its sd and its worst over the uncertain cars: "grip_rel_nominal",
// "grip_rel_sd", "grip_rel_worst".
func Columns(f *pb.Front) []string {
	cols := baseColumns(f)
	if !Robust(f) {
		return cols
	}
	for _, o := range f.GetObjectives() {
		c := ObjectiveColumn(o.GetKind())
		cols = append(cols, c+"_nominal", c+"_sd", c+"_worst")
	}
	return cols
}

// Robust reports whether f is a robust front: a solution carries the
// figures over the uncertain cars.
func Robust(f *pb.Front) bool {
	for _, s := range f.GetSolutions() {
		if s.GetRobust() != nil {
			return true
		}
	}
	return false
}

// robustValues are a solution's robust columns: nominal, sd and worst per
// objective, NaN-free as the solution is; nil values (an infeasible
// solution without figures) where it has none.
func robustValues(f *pb.Front, s *pb.Solution) []any {
	var out []any
	r := s.GetRobust()
	for i := range f.GetObjectives() {
		for _, vs := range [][]float64{r.GetNominal(), r.GetSd(), r.GetWorst()} {
			if i < len(vs) {
				out = append(out, vs[i])
			} else {
				out = append(out, nil)
			}
		}
	}
	return out
}

func baseColumns(f *pb.Front) []string {
	cols := []string{"index"}
	cols = append(cols, f.GetGeneNames()...)
	for _, o := range f.GetObjectives() {
		cols = append(cols, ObjectiveColumn(o.GetKind()))
	}
	for _, s := range slopeColumns {
		cols = append(cols, s.bump, s.rebound)
	}
	for _, c := range f.GetConstraints() {
		cols = append(cols, ConstraintColumn(c))
	}
	cols = append(cols, "out_of_band_n", "feasible", "balanced")
	if !Refined(f) {
		return cols
	}
	for _, o := range f.GetObjectives() {
		c := "refined_" + ObjectiveColumn(o.GetKind())
		cols = append(cols, c, c+"_error")
	}
	return append(cols, "refined_feasible", "refined_rank", "refined_unsettled")
}

// Refined reports whether the front carries refined figures (a job with a
// refinement, once it is done): its first solution has them.
func Refined(f *pb.Front) bool {
	s := f.GetSolutions()
	return len(s) > 0 && s[0].GetRefined() != nil
}

// OutOfBand is the largest excess over the adjuster range of a solution
// (N at the damper), 0 when it lies inside or the job has no band.
func OutOfBand(s *pb.Solution) float64 {
	worst := 0.0
	for _, e := range s.GetOutOfBand() {
		worst = max(worst, e.GetOverN())
	}
	return worst
}

// Balanced is the position in f's solutions of the balanced point
// (plot.Balanced), -1 for an empty front or objectives it cannot scale.
func Balanced(f *pb.Front) int {
	k, err := plot.BalancedSolution(f.GetSolutions())
	if err != nil {
		return -1
	}
	return k
}

// row is one solution's values under Columns: int for the index, float64
// for numbers, nil for a slope the solution does not carry (the basic
// view has no curves), bool for the flags.
func row(f *pb.Front, s *pb.Solution, balanced bool) []any {
	out := []any{int(s.GetIndex())}
	for _, g := range s.GetGenes() {
		out = append(out, g)
	}
	for _, o := range s.GetObjectives() {
		out = append(out, o)
	}
	for _, c := range slopeColumns {
		var bump, rebound any
		for _, dc := range s.GetDamperCurves() {
			if dc.GetCorner() == c.corner {
				bump, rebound = dc.GetBumpSlopeNSPerM(), dc.GetReboundSlopeNSPerM()
			}
		}
		out = append(out, bump, rebound)
	}
	for k := range f.GetConstraints() {
		v := 0.0
		if k < len(s.GetViolations()) {
			v = s.GetViolations()[k]
		}
		out = append(out, v)
	}
	out = append(out, OutOfBand(s), s.GetFeasible(), balanced)
	if Refined(f) {
		out = append(out, refinedValues(f, s)...)
	}
	if Robust(f) {
		out = append(out, robustValues(f, s)...)
	}
	return out
}

// refinedValues are a solution's refined columns: value and error per
// objective (nil for a point whose check failed), then refined_feasible,
// refined_rank and refined_unsettled.
func refinedValues(f *pb.Front, s *pb.Solution) []any {
	var out []any
	r := s.GetRefined()
	for k := range f.GetObjectives() {
		var v, e any
		if k < len(r.GetObjectives()) {
			v, e = r.GetObjectives()[k], r.GetObjectiveErrors()[k]
		}
		out = append(out, v, e)
	}
	return append(out, r.GetFeasible(), int(r.GetRank()), r.GetUnsettled())
}

// Number is the text of an SI value in CSV: the shortest that reads back
// to the same float64 (strconv's 'g' with precision -1).
func Number(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
