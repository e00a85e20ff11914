package api

import (
	"context"
	"fmt"
	"strconv"
	"strings"

	"google.golang.org/grpc/codes"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/study"
	"dampfront/model"
)

// frontPaths maps the engine's front paths to GetFrontRequest's.
func frontPaths(p string) string {
	if p == "job_id" {
		return "job"
	}
	return p
}

// frontPageBytes bounds the encoded solutions of one GetFront page: half
// of gRPC's default 4 MiB receive limit, so that a client that never
// raised it reads every page. A page holds at least one solution.
const frontPageBytes = 2 << 20

// frontChunk is how many stored solutions GetFront reads at a time while
// it fills a page, so that a page cut by size reads little it drops.
const frontChunk = 100

// GetFront returns a page of a job's front: a finished job's, or a
// running job's at its last checkpoint (partial). Solutions come from
// the stored details; genes, objectives and violations are the stored
// ones, bit for bit. A page ends at page_size solutions or before its
// solutions' encoding passes frontPageBytes (or half the server's message
// limit), whichever comes first; next_page_token says where to go on.
func (s *Server) GetFront(ctx context.Context, req *pb.GetFrontRequest) (*pb.GetFrontResponse, error) {
	var p problems
	id := parseJobName(req.GetJob(), "job", &p)
	if err := p.err(); err != nil {
		return nil, err
	}
	want := int(req.GetPageSize())
	switch {
	case want <= 0:
		want = jobs.DefaultPageSize
	case want > jobs.MaxPageSize:
		want = jobs.MaxPageSize
	}
	budget := min(frontPageBytes, s.opt.MaxMessageBytes/2)
	basic := req.GetView() == pb.SolutionView_SOLUTION_VIEW_BASIC
	var front *pb.Front
	var st *study.Spec // the stored spec, for the adjusters
	token, size := req.GetPageToken(), 0
	for {
		page, err := s.engine.Front(ctx, &jobs.FrontGetParams{JobID: id, PageSize: min(want-len(front.GetSolutions()), frontChunk), PageToken: token})
		if err != nil {
			return nil, toStatus(err, frontPaths)
		}
		if front == nil {
			spec, err := unmarshalSpec(page.Job.Spec)
			if err != nil {
				return nil, toStatus(err, nil)
			}
			front = frontHeader(id, spec, page.Total, page.Partial)
			var p problems // a stored spec has none
			st = specFromProto(spec, "", &p)
		}
		token = page.NextPageToken
		for _, js := range page.Solutions {
			sol, err := solutionFromStore(js)
			if err != nil {
				return nil, toStatus(err, nil)
			}
			addAdjusting(sol, st)
			if basic {
				sol.CaseMetrics, sol.DamperCurves = nil, nil
				if sol.Refined != nil {
					sol.Refined.Cases = nil
				}
			}
			n := proto.Size(sol)
			if len(front.Solutions) > 0 && size+n > budget {
				last := front.Solutions[len(front.Solutions)-1].GetIndex()
				return &pb.GetFrontResponse{Front: front, NextPageToken: page.TokenAfter(int(last))}, nil
			}
			size += n
			front.Solutions = append(front.Solutions, sol)
		}
		if token == "" || len(front.Solutions) >= want || len(page.Solutions) == 0 {
			return &pb.GetFrontResponse{Front: front, NextPageToken: token}, nil
		}
	}
}

// frontHeader is a Front without solutions: the job, gene names,
// objectives and constraints of a stored spec.
func frontHeader(id string, spec *pb.JobSpec, total int, partial bool) *pb.Front {
	var p problems // a stored spec has none
	design := designFromProto(spec.GetDesignSpace(), "", &p)
	names := design.GeneNames()
	return &pb.Front{
		Job: jobName(id), GeneNames: names, Objectives: spec.GetObjectives(), Constraints: spec.GetConstraints(),
		TotalSize: int32(total), Partial: partial,
	}
}

// solutionFromStore decodes a stored solution's detail and sets the
// stored values on it.
func solutionFromStore(js jobs.Solution) (*pb.Solution, error) {
	sol := &pb.Solution{}
	if err := proto.Unmarshal(js.Detail, sol); err != nil {
		return nil, fmt.Errorf("stored detail of solution %d does not decode: %w", js.Index, err)
	}
	sol.Index = int32(js.Index)
	sol.Genes, sol.Objectives, sol.Violations, sol.Feasible = js.Genes, js.Objectives, js.Violations, js.Feasible
	return sol, nil
}

// wholeFront reads every page of a finished job's front; a running
// job's gives a *jobs.PreconditionError.
func (s *Server) wholeFront(ctx context.Context, id string) (*jobs.FrontPage, error) {
	var all *jobs.FrontPage
	token := ""
	for {
		page, err := s.engine.Front(ctx, &jobs.FrontGetParams{JobID: id, PageSize: jobs.MaxPageSize, PageToken: token})
		if err != nil {
			return nil, err
		}
		if !page.Job.State.Terminal() {
			return nil, &jobs.PreconditionError{ID: id, State: page.Job.State, Reason: "the front is final once the job has finished or been cancelled; watch the job until then"}
		}
		if all == nil {
			all = page
		} else {
			all.Solutions = append(all.Solutions, page.Solutions...)
		}
		if page.NextPageToken == "" || len(page.Solutions) == 0 {
			all.NextPageToken = ""
			return all, nil
		}
		token = page.NextPageToken
	}
}

// setupArgument converts and checks a setup given in a request at path.
func setupArgument(s *pb.Setup, path string, p *problems) model.Setup {
	n := len(*p)
	out := setupFromProto(s, path, p)
	if len(*p) == n {
		p.mergeModel(under(path+"."), out.Validate())
	}
	return out
}

// CompareSetup evaluates a candidate setup on a finished job's spec and
// compares its objectives with the stored front (see
// CompareSetupResponse for the definitions).
func (s *Server) CompareSetup(ctx context.Context, req *pb.CompareSetupRequest) (*pb.CompareSetupResponse, error) {
	var p problems
	id := parseJobName(req.GetJob(), "job", &p)
	setup := setupArgument(req.GetSetup(), "setup", &p)
	if err := p.err(); err != nil {
		return nil, err
	}
	front, err := s.wholeFront(ctx, id)
	if err != nil {
		return nil, toStatus(err, frontPaths)
	}
	if len(front.Solutions) == 0 {
		return nil, statusError(codes.FailedPrecondition,
			fmt.Sprintf("job %q has an empty front (no feasible solution was found); nothing to compare with", id),
			ReasonEmptyFront, map[string]string{"job_id": id})
	}
	release, err := s.acquire()
	if err != nil {
		return nil, err
	}
	defer release()
	_, pl, err := s.storedPlan(ctx, id)
	if err != nil {
		return nil, err
	}
	sol := solutionToProto(pl.Evaluate(setup))
	if len(sol.Objectives) == 0 {
		return nil, invalidArgument(problems{{Field: "setup", Reason: "the model cannot evaluate this setup on the job's car: " + sol.InfeasibleReason}})
	}
	pts := make([][]float64, len(front.Solutions))
	for i, f := range front.Solutions {
		pts[i] = f.Objectives
	}
	c := compareWithFront(sol.Objectives, pts)
	return &pb.CompareSetupResponse{
		Evaluation:                sol,
		Dominated:                 c.dominated,
		AdditiveEpsilon:           c.epsilon,
		NormalizedAdditiveEpsilon: c.normalized,
		ObjectiveGaps:             c.gaps,
		NearestIndex:              int32(front.Solutions[c.nearest].Index),
		FrontSize:                 int32(len(front.Solutions)),
		Partial:                   front.Partial,
		Objectives:                pl.objectivesProto(),
		Constraints:               pl.constraintsProto(),
	}, nil
}

// curvesPaths maps model.DamperCurves's paths to GetDamperCurvesRequest's.
func curvesPaths(p string) string {
	switch {
	case p == "max_velocity_m_per_s" || p == "points":
		return "curves." + p
	case strings.HasPrefix(p, "vehicle."):
		return "job" // the stored car; cannot happen for a stored spec
	}
	return p
}

// GetDamperCurves returns the damper curves of a solution of a finished
// job's front, or of a setup given in the request on the job's car.
func (s *Server) GetDamperCurves(ctx context.Context, req *pb.GetDamperCurvesRequest) (*pb.GetDamperCurvesResponse, error) {
	var p problems
	id := parseJobName(req.GetJob(), "job", &p)
	var setup model.Setup
	switch t := req.GetTarget().(type) {
	case *pb.GetDamperCurvesRequest_Setup:
		setup = setupArgument(t.Setup, "setup", &p)
	case *pb.GetDamperCurvesRequest_SolutionIndex:
		if t.SolutionIndex < 0 {
			p.add("solution_index", "must not be negative, got %d", t.SolutionIndex)
		}
	default:
		p.add("solution_index", "give solution_index (a member of the job's front) or setup")
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	_, pl, err := s.storedPlan(ctx, id)
	if err != nil {
		return nil, err
	}
	if t, ok := req.GetTarget().(*pb.GetDamperCurvesRequest_SolutionIndex); ok {
		front, err := s.wholeFront(ctx, id)
		if err != nil {
			return nil, toStatus(err, frontPaths)
		}
		k := int(t.SolutionIndex)
		if k >= len(front.Solutions) {
			return nil, statusError(codes.NotFound,
				fmt.Sprintf("job %q has %d solutions in its front; solution_index %d is not one of them", id, len(front.Solutions), k),
				ReasonSolutionNotFound, map[string]string{"job_id": id, "front_size": strconv.Itoa(len(front.Solutions))})
		}
		setup = pl.Problem().Design().Decode(front.Solutions[k].Genes)
	}
	var adj *model.Adjustment
	if req.GetAdjustment() != nil {
		a := adjustmentFromProto(req.GetAdjustment())
		adj = &a
	}
	cs := &study.Curves{MaxVelocity: req.GetCurves().GetMaxVelocityMPerS(), Points: int(req.GetCurves().GetPoints())}
	curves, err := pl.Curves(setup, adj, cs)
	if err != nil {
		return nil, toStatus(err, curvesPaths)
	}
	heave, err := pl.HeaveCurves(setup, cs)
	if err != nil {
		return nil, toStatus(err, curvesPaths)
	}
	return &pb.GetDamperCurvesResponse{Setup: setupToProto(setup), Curves: damperCurvesToProto(curves), HeaveCurves: heaveCurvesToProto(heave)}, nil
}
