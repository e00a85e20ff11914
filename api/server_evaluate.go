package api

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// EvaluateSetups evaluates setups on the car, road cases, objectives and
// constraints of a spec given in the request or of a stored job, at once.
// It is limited in size (setups × road cases) and in how many such calls
// run together; both give ResourceExhausted.
func (s *Server) EvaluateSetups(ctx context.Context, req *pb.EvaluateSetupsRequest) (*pb.EvaluateSetupsResponse, error) {
	// The slot comes first: checking and compiling the spec are a large
	// part of the work, and a call turned away should not have paid for
	// them.
	release, err := s.acquire()
	if err != nil {
		return nil, err
	}
	defer release()
	var p problems
	if len(req.GetSetups()) == 0 {
		p.add("setups", "needs at least one setup")
	}
	setups := make([]model.Setup, len(req.GetSetups()))
	for i, su := range req.GetSetups() {
		setups[i] = setupArgument(su, fmt.Sprintf("setups[%d]", i), &p)
	}
	spec, job := requestSource(req)
	pl, err := s.sourcePlan(ctx, spec, job, len(setups), &p)
	if err != nil {
		return nil, err
	}
	out := &pb.EvaluateSetupsResponse{Objectives: pl.objectivesProto(), Constraints: pl.constraintsProto(), GeneNames: pl.GeneNames()}
	basic := req.GetView() == pb.SolutionView_SOLUTION_VIEW_BASIC
	for i, su := range setups {
		if err := ctx.Err(); err != nil {
			return nil, toStatus(err, nil)
		}
		sol := solutionToProto(pl.Evaluate(su))
		addAdjusting(sol, pl.Spec())
		sol.Index = int32(i)
		if basic {
			sol.CaseMetrics, sol.DamperCurves = nil, nil
		}
		out.Evaluations = append(out.Evaluations, sol)
	}
	return out, nil
}
