package api

import (
	"context"
	"fmt"
	"strconv"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/model"
)

// EvaluateSetups evaluates setups on the car, road cases, objectives and
// constraints of a spec given in the request or of a stored job, at once.
// It is limited in size (setups × road cases) and in how many such calls
// run together; both give ResourceExhausted.
func (s *Server) EvaluateSetups(ctx context.Context, req *pb.EvaluateSetupsRequest) (*pb.EvaluateSetupsResponse, error) {
	// The slot comes first: compiling the spec is a large part of the
	// work, and a call turned away should not have paid for it.
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
	var spec *pb.JobSpec
	var job *string
	switch src := req.GetSource().(type) {
	case *pb.EvaluateSetupsRequest_Spec:
		spec = src.Spec
	case *pb.EvaluateSetupsRequest_Job:
		job = &src.Job
	}
	pl, err := s.sourcePlan(ctx, spec, job, &p)
	if err != nil {
		return nil, err
	}
	if w := len(setups) * pl.eval.Cases(); w > s.opt.MaxSyncWork {
		return nil, resourceExhausted(ReasonTooManySetups,
			fmt.Sprintf("setups × road cases = %d is over the server's %d for one call; split the setups over several calls", w, s.opt.MaxSyncWork),
			map[string]string{"work": strconv.Itoa(w), "limit": strconv.Itoa(s.opt.MaxSyncWork)}, 0)
	}
	out := &pb.EvaluateSetupsResponse{Objectives: pl.objectivesProto(), Constraints: pl.constraintsProto(), GeneNames: pl.geneNames()}
	basic := req.GetView() == pb.SolutionView_SOLUTION_VIEW_BASIC
	for i, su := range setups {
		if err := ctx.Err(); err != nil {
			return nil, toStatus(err, nil)
		}
		sol := pl.evaluate(su)
		sol.Index = int32(i)
		if basic {
			sol.CaseMetrics, sol.DamperCurves = nil, nil
		}
		out.Evaluations = append(out.Evaluations, sol)
	}
	return out, nil
}

// sourcePlan compiles the car, road cases and study of a request's
// source: a spec given in it (spec non-nil; its problems are reported at
// "spec.", together with those already in p) or a stored job's
// ("jobs/{job_id}" in job); with neither, "spec: give spec or job". Any
// problem in p is returned as one InvalidArgument, and a spec over the
// grid limit as ResourceExhausted, so a nil error means a plan to use.
func (s *Server) sourcePlan(ctx context.Context, spec *pb.JobSpec, job *string, p *problems) (*plan, error) {
	var pl *plan
	switch {
	case spec != nil:
		if err := s.checkSpecSize(spec); err != nil {
			return nil, err
		}
		var err error
		if pl, err = compile(spec, "spec."); err != nil {
			sp, ok := fieldProblems(err)
			if !ok {
				return nil, err
			}
			*p = append(*p, sp...)
		}
	case job != nil:
		id := parseJobName(*job, "job", p)
		if err := p.err(); err != nil {
			return nil, err
		}
		var err error
		if _, pl, err = s.storedPlan(ctx, id); err != nil {
			return nil, err
		}
	default:
		p.add("spec", "give spec or job")
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	if err := s.checkGrid(pl); err != nil {
		return nil, err
	}
	return pl, nil
}

// fieldProblems returns the field problems of an InvalidArgument status
// and whether err is one.
func fieldProblems(err error) (problems, bool) {
	ia, ok := statusToJobsError(err).(*jobs.InvalidArgumentError)
	if !ok {
		return nil, false
	}
	p := make(problems, len(ia.Violations))
	for i, v := range ia.Violations {
		p[i] = fieldProblem{Field: v.Field, Reason: v.Reason}
	}
	return p, true
}
