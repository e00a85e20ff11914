package main

import (
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// judge applies the rule of "check --help" to comparisons made up here:
// infeasible fails whatever the distance; otherwise the normalised
// additive epsilon (Zitzler et al. 2003, as the API defines it) is
// compared with the allowed one, equality passing.
func TestJudge(t *testing.T) {
	t.Parallel()
	objectives := []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM}}
	constraints := []*pb.Constraint{{Kind: pb.ConstraintKind_CONSTRAINT_KIND_JACKING, Limit: 0.003}}
	cmp := func(feasible bool, viol, eps float64) *pb.CompareSetupResponse {
		return &pb.CompareSetupResponse{
			Evaluation:                &pb.Solution{Feasible: feasible, Violations: []float64{viol}},
			NormalizedAdditiveEpsilon: eps, ObjectiveGaps: []float64{0.001, 2e-4}, NearestIndex: 7, FrontSize: 40,
			Objectives: objectives, Constraints: constraints,
		}
	}
	tests := []struct {
		name    string
		r       *pb.CompareSetupResponse
		epsilon float64
		pass    bool
		want    []string
	}{
		{"not dominated", cmp(true, 0, -0.1), 0, true, []string{"PASS", "no solution of the front of 40 solutions dominates it"}},
		{"within epsilon", cmp(true, 0, 0.01), 0.02, true, []string{"PASS", "solution 7", "at least 1.00 %", "allowed 2.00 %", "grip +0.10 % static", "platform +0.200 mm"}},
		{"at epsilon", cmp(true, 0, 0.02), 0.02, true, []string{"PASS"}},
		{"beyond epsilon", cmp(true, 0, 0.05), 0.02, false, []string{"FAIL", "solution 7", "at least 5.00 %"}},
		{"infeasible", cmp(false, 0.326, -1), 1, false, []string{"FAIL: constraints not met", "ride-height shift over its limit 3.00 mm by 32.6 %"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			v := judge(tt.r, tt.epsilon)
			if v.pass != tt.pass {
				t.Errorf("pass = %v, want %v: %s", v.pass, tt.pass, v.line)
			}
			if strings.Contains(v.line, "\n") {
				t.Errorf("verdict is not one line: %q", v.line)
			}
			for _, w := range tt.want {
				if !strings.Contains(v.line, w) {
					t.Errorf("verdict %q lacks %q", v.line, w)
				}
			}
		})
	}
	// Values that round to zero print without a sign: "-0.00 %" reads
	// as a loss where there is none.
	tie := cmp(true, 0, -2e-5)
	tie.ObjectiveGaps = []float64{-1e-6, -3e-7}
	if v := judge(tie, 0.02); strings.Contains(v.line, "-0.0") || !strings.Contains(v.line, "epsilon 0.00 %") ||
		!strings.Contains(v.line, "grip 0.00 % static, platform 0.000 mm") {
		t.Errorf("a tie shows a signed zero: %s", v.line)
	}
	r := cmp(true, 0, -0.1)
	r.Partial = true
	if v := judge(r, 0); !strings.Contains(v.line, "partial front") {
		t.Errorf("a partial front is not named: %s", v.line)
	}
}
