package api

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/optimizer"
)

// TwinComparison is a front solution beside its same-sum twin, the setup
// with each axle's bump and rebound ratios set to their mean
// (model.Setup.SameSumTwin): the same sum per axle, so the same on the
// random roads but for the jacking shift. What the twin loses is what
// the solution's bump/rebound split buys.
type TwinComparison struct {
	// Twin is the twin's setup.
	Twin *pb.Setup
	// TwinObjectives are the twin's objectives on the job's spec, in the
	// job's order and SI units.
	TwinObjectives []float64
	// Worse is, per objective, (twin − solution) over the front's extent
	// in it (max − min over the front): positive where the twin is worse.
	Worse []float64
	// Dominated reports whether the solution dominates its twin.
	Dominated bool
	// Feasible reports whether the twin meets the job's constraints.
	Feasible bool
	// Own reports that the solution has bump = rebound on both axles: it
	// is its own twin.
	Own bool
}

// SameSumTwin returns the same-sum twin of setup s (see TwinComparison).
// Problems are a *model.ValidationError with paths under "setup".
func SameSumTwin(s *pb.Setup) (*pb.Setup, error) {
	m, err := SetupToModel(s, "setup")
	if err != nil {
		return nil, err
	}
	return setupToProto(m.SameSumTwin()), nil
}

// CompareTwin evaluates the twin of sol, a solution of the finished job's
// front, on the job's spec through c (CompareSetup) and compares the two;
// front is the job's whole front, which gives the extents.
func CompareTwin(ctx context.Context, c pb.DampfrontServiceClient, job string, sol *pb.Solution, front []*pb.Solution) (*TwinComparison, error) {
	twin, err := SameSumTwin(sol.GetSetup())
	if err != nil {
		return nil, err
	}
	resp, err := c.CompareSetup(ctx, &pb.CompareSetupRequest{Job: job, Setup: twin})
	if err != nil {
		return nil, err
	}
	z, f := resp.GetEvaluation().GetObjectives(), sol.GetObjectives()
	if len(z) != len(f) || len(front) == 0 {
		return nil, fmt.Errorf("the twin has %d objectives, the solution %d, on a front of %d", len(z), len(f), len(front))
	}
	pts := make([][]float64, len(front))
	for i, s := range front {
		pts[i] = s.GetObjectives()
	}
	scale := extents(pts)
	tc := &TwinComparison{Twin: twin, TwinObjectives: z, Worse: make([]float64, len(z)),
		Dominated: optimizer.Dominates(f, z), Feasible: resp.GetEvaluation().GetFeasible()}
	for j := range z {
		tc.Worse[j] = (z[j] - f[j]) / scale[j]
	}
	tc.Own = proto.Equal(twin, sol.GetSetup())
	return tc, nil
}

// SplitPicks returns the index in front of its balanced point (bal, or
// none when bal < 0) and of the n other solutions with the largest
// bump/rebound split, Σ over the axles of |bump − rebound|, largest
// first: the points whose twins say most about what the split buys.
func SplitPicks(front []*pb.Solution, bal, n int) []int {
	split := func(s *pb.Solution) float64 {
		f, r := s.GetSetup().GetFront(), s.GetSetup().GetRear()
		return math.Abs(f.GetBumpRatio()-f.GetReboundRatio()) + math.Abs(r.GetBumpRatio()-r.GetReboundRatio())
	}
	order := make([]int, 0, len(front))
	for i := range front {
		if i != bal {
			order = append(order, i)
		}
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(split(front[b]), split(front[a])) })
	var out []int
	if bal >= 0 && bal < len(front) {
		out = append(out, bal)
	}
	return append(out, order[:min(n, len(order))]...)
}
