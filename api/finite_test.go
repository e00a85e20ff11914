package api

import (
	"math"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestFiniteSolutionGuard: a solution holding a NaN or an infinity
// anywhere is never reported or stored as it is: it becomes infeasible,
// without the values, and its reason names the first bad value's path.
func TestFiniteSolutionGuard(t *testing.T) {
	t.Parallel()
	base := func() *pb.Solution {
		return &pb.Solution{
			Genes: []float64{0.5, 0.7}, Setup: testSetup(), Objectives: []float64{0.1, 0.002}, Feasible: true,
			CaseMetrics:  []*pb.CaseMetrics{{RoadCase: "a", PitchSdRad: 1e-3}, {RoadCase: "b", PitchSdRad: 2e-3}},
			DamperCurves: []*pb.DamperCurve{{VelocityMPerS: []float64{-0.1, 0, 0.1}, ForceN: []float64{-900, 0, 700}}},
		}
	}
	for _, tc := range []struct {
		name   string
		mutate func(s *pb.Solution)
		path   string // "" when the solution is finite
	}{
		{"finite", func(*pb.Solution) {}, ""},
		{"NaN metric of the second case", func(s *pb.Solution) { s.CaseMetrics[1].RollSdRad = math.NaN() }, "case_metrics[1].roll_sd_rad is NaN"},
		{"infinite curve force", func(s *pb.Solution) { s.DamperCurves[0].ForceN[2] = math.Inf(1) }, "damper_curves[0].force_n[2] is +Inf"},
		{"infinite objective", func(s *pb.Solution) { s.Objectives[1] = math.Inf(-1) }, "objectives[1] is -Inf"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			sol := base()
			tc.mutate(sol)
			got := finiteSolution(proto.Clone(sol).(*pb.Solution))
			if tc.path == "" {
				if !proto.Equal(got, sol) {
					t.Errorf("a finite solution changed: %v", got)
				}
				return
			}
			if got.GetFeasible() || len(got.GetCaseMetrics()) != 0 || len(got.GetDamperCurves()) != 0 || len(got.GetObjectives()) != 0 {
				t.Errorf("a non-finite solution kept its values: %v", got)
			}
			if !strings.Contains(got.GetInfeasibleReason(), tc.path) || !proto.Equal(got.GetSetup(), sol.GetSetup()) {
				t.Errorf("reason %q, setup %v; want %q in the reason and the setup kept", got.GetInfeasibleReason(), got.GetSetup(), tc.path)
			}
		})
	}
}
