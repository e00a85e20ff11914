package api

import (
	"context"
	"errors"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// markInfeasible sets job.Infeasible and job.Closest from the job's stored
// front: a front no member of which is feasible (the optimiser then keeps
// the least violating setups) makes the job infeasible. The archive holds
// either feasible members only or infeasible ones only, so the first
// member tells, and only an infeasible front is read in full, on every
// GetJob of it (such a front holds only the least violating setups, so it
// is small). A job with no front yet is left as it is.
func (s *Server) markInfeasible(ctx context.Context, job *pb.Job) error {
	page, err := s.engine.Front(ctx, &jobs.FrontGetParams{JobID: job.GetJobId(), PageSize: 1})
	var pre *jobs.PreconditionError
	switch {
	case errors.As(err, &pre):
		return nil
	case err != nil:
		return err
	case len(page.Solutions) == 0 || page.Solutions[0].Feasible:
		return nil
	}
	var front []*pb.Solution
	token := ""
	for {
		page, err := s.engine.Front(ctx, &jobs.FrontGetParams{JobID: job.GetJobId(), PageSize: jobs.MaxPageSize, PageToken: token})
		if err != nil {
			return err
		}
		for _, js := range page.Solutions {
			sol, err := solutionFromStore(js)
			if err != nil {
				return err
			}
			if sol.GetFeasible() {
				return nil
			}
			front = append(front, sol)
		}
		if token = page.NextPageToken; token == "" || len(page.Solutions) == 0 {
			break
		}
	}
	job.Infeasible, job.Closest = true, closestShortfalls(front)
	return nil
}

// closestShortfalls is, per constraint that every member of an infeasible
// front violates, the member's shortfall with the least violation (the
// first such member on a tie), in the order of the job's constraints. A
// constraint some member meets is not listed: what blocks that member is
// another constraint.
func closestShortfalls(front []*pb.Solution) []*pb.ConstraintShortfall {
	type constraint struct {
		kind  pb.ConstraintKind
		limit float64
	}
	best := map[constraint]*pb.ConstraintShortfall{}
	count := map[constraint]int{}
	for _, sol := range front {
		for _, sf := range sol.GetShortfalls() {
			c := constraint{sf.GetKind(), sf.GetLimit()}
			count[c]++
			if b := best[c]; b == nil || sf.GetViolation() < b.GetViolation() {
				best[c] = sf
			}
		}
	}
	var out []*pb.ConstraintShortfall
	if len(front) == 0 {
		return out
	}
	for _, sf := range front[0].GetShortfalls() { // every listed one is among the first member's
		if c := (constraint{sf.GetKind(), sf.GetLimit()}); count[c] == len(front) {
			out = append(out, best[c])
		}
	}
	return out
}
