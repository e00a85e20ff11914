package api

import (
	"context"
	"fmt"
	"strconv"

	"google.golang.org/grpc/codes"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/study"
	"dampfront/model"
)

// checkedSpec is a spec converted and checked (see study.Check), not yet
// compiled, with the message it came from.
type checkedSpec struct {
	*study.Checked
	msg *pb.JobSpec // with the defaults filled in
}

// specPlan is a spec compiled (see study.Plan), with its message.
type specPlan struct {
	*study.Plan
	msg *pb.JobSpec // with the defaults filled in
}

// objectivesProto and constraintsProto are the spec's, in order.
func (pl *specPlan) objectivesProto() []*pb.Objective   { return pl.msg.GetObjectives() }
func (pl *specPlan) constraintsProto() []*pb.Constraint { return pl.msg.GetConstraints() }

// checkSpec converts spec and checks all of it at once; its problems and
// those already in p come back as one InvalidArgument whose paths of the
// spec start with prefix (for example "spec.").
func checkSpec(spec *pb.JobSpec, prefix string, p *problems) (*checkedSpec, error) {
	s := specFromProto(spec, prefix, p)
	c, err := study.Check(s)
	p.mergeModel(under(prefix), err)
	if err := p.err(); err != nil {
		return nil, err
	}
	return &checkedSpec{Checked: c, msg: fillDefaults(spec, c.Spec())}, nil
}

// compile compiles a checked spec under ctx: a call that has ended stops
// it. A car that is not stable at a case's speed is InvalidArgument with
// paths under "spec.".
func (s *Server) compile(ctx context.Context, c *checkedSpec) (*specPlan, error) {
	if s.onCompile != nil {
		s.onCompile()
	}
	return compileChecked(ctx, c)
}

// compileChecked is Server.compile without the server.
func compileChecked(ctx context.Context, c *checkedSpec) (*specPlan, error) {
	pl, err := c.Compile(ctx)
	if err != nil {
		return nil, toStatus(err, under("spec."))
	}
	return &specPlan{Plan: pl, msg: c.msg}, nil
}

// checkCases refuses a spec with more road cases than the server allows
// (Options.MaxRoadCases) before anything is done with it: every later
// step, from the checks to the compile, grows with the cases.
func (s *Server) checkCases(spec *pb.JobSpec) error {
	n := len(spec.GetRoadCases())
	if n <= s.opt.MaxRoadCases {
		return nil
	}
	return resourceExhausted(ReasonTooManyRoadCases,
		fmt.Sprintf("spec.road_cases has %d road cases, the server allows %d per spec; split the road cases over several jobs or calls", n, s.opt.MaxRoadCases),
		map[string]string{"field": "spec.road_cases", "cases": strconv.Itoa(n), "limit": strconv.Itoa(s.opt.MaxRoadCases)}, 0)
}

// checkGrid refuses a spec whose frequency grid is over the limit.
func (s *Server) checkGrid(size study.Size) error {
	n := size.GridPoints
	if n <= s.opt.MaxGridPoints {
		return nil
	}
	return resourceExhausted(ReasonGridTooFine,
		fmt.Sprintf("spec.grid.points = %d is over the server's %d; the default grid (%d points, tails added analytically) is accurate to 0.5 %%", n, s.opt.MaxGridPoints, model.DefaultGrid.Points),
		map[string]string{"points": strconv.Itoa(n), "limit": strconv.Itoa(s.opt.MaxGridPoints)}, 0)
}

// checkJobWork refuses a job larger than Options.MaxJobWork, naming the
// parts of its work (study.Size) and, in the ErrorInfo's "field", the
// spec's fields behind the largest part.
func (s *Server) checkJobWork(size study.Size) error {
	w := size.Work
	if w <= s.opt.MaxJobWork {
		return nil
	}
	what, fix := "population_size × islands × (generations + polish_budget) × cases", "reduce the population or the generations, or split the road cases over jobs"
	if size.RobustPoints > 0 {
		what, fix = what+" × uncertain cars", fix+", or take fewer uncertain cars"
	}
	search := w - size.PolishRounds - size.Refine
	parts, field := fmt.Sprintf("%s = %d", what, search), "search.population_size, search.generations"
	largest := search
	if n := size.PolishRounds; n > 0 {
		parts += fmt.Sprintf(", polish rounds (search.polish_budget: up to %d rounds of the twin and the ratios' corners on each of at most %d front points) = %d", study.PolishRounds, size.FrontBound, n)
		fix += ", or polish less (search.polish_budget, 0 for none)"
		if n > largest {
			largest, field = n, "search.polish_budget"
		}
	}
	if n := size.Refine; n > 0 {
		parts += fmt.Sprintf(", refinement (refinement.duration_s on each road case of at most %d front points, %d case evaluations per case-second) = %d", size.FrontBound, study.RefineWorkPerSecond, n)
		fix += ", or refine a shorter record (refinement.duration_s) or not at all (refinement.enabled)"
		if n > largest {
			field = "refinement.duration_s"
		}
	}
	return resourceExhausted(ReasonJobTooLarge,
		fmt.Sprintf("the job is too large: %s; %d case evaluations in all, the server allows %d; %s", parts, w, s.opt.MaxJobWork, fix),
		map[string]string{"field": field, "work": strconv.FormatInt(w, 10), "limit": strconv.FormatInt(s.opt.MaxJobWork, 10)}, 0)
}

// checkSyncWork refuses setups × road cases (× uncertain cars, for a
// robust spec) over Options.MaxSyncWork.
func (s *Server) checkSyncWork(setups int, size study.Size) error {
	w, what := setups*size.Cases, "setups × road cases"
	if size.RobustPoints > 0 {
		w, what = w*size.RobustPoints, what+" × uncertain cars"
	}
	if w > s.opt.MaxSyncWork {
		return resourceExhausted(ReasonTooManySetups,
			fmt.Sprintf("%s = %d is over the server's %d for one call; split the setups over several calls", what, w, s.opt.MaxSyncWork),
			map[string]string{"work": strconv.Itoa(w), "limit": strconv.Itoa(s.opt.MaxSyncWork)}, 0)
	}
	return nil
}

// storedSpec returns a job and its stored spec, checked.
func (s *Server) storedSpec(ctx context.Context, id string) (*jobs.Job, *checkedSpec, error) {
	j, err := s.engine.Get(ctx, id)
	if err != nil {
		return nil, nil, toStatus(err, nil)
	}
	msg, err := unmarshalSpec(j.Spec)
	if err != nil {
		return nil, nil, toStatus(err, nil)
	}
	var p problems
	c, err := checkSpec(msg, "spec.", &p)
	if err != nil {
		return nil, nil, storedSpecError(id, err)
	}
	return j, c, nil
}

// storedPlan returns a job and the plan of its stored spec.
func (s *Server) storedPlan(ctx context.Context, id string) (*jobs.Job, *specPlan, error) {
	j, c, err := s.storedSpec(ctx, id)
	if err != nil {
		return nil, nil, err
	}
	pl, err := s.compile(ctx, c)
	if err != nil {
		if ctx.Err() != nil {
			return nil, nil, err
		}
		return nil, nil, storedSpecError(id, err)
	}
	return j, pl, nil
}

// storedSpecError is a stored spec that no longer checks or compiles: a
// bug, since it did when it was stored.
func storedSpecError(id string, err error) error {
	return statusError(codes.Internal, fmt.Sprintf("the stored spec of job %q no longer compiles: %v", id, err), ReasonInternal, nil)
}

// sourcePlan compiles the car, road cases and study of a request's
// source: a spec given in it (spec non-nil; its problems are reported at
// "spec.", together with those already in p) or a stored job's
// ("jobs/{job_id}" in job); with neither, "spec: give spec or job". Any
// problem in p is returned as one InvalidArgument. Before compiling it
// refuses, as ResourceExhausted, a spec over the road-case or grid limit
// and, when setups > 0, setups × road cases over the synchronous limit.
// A nil error means a plan to use.
func (s *Server) sourcePlan(ctx context.Context, spec *pb.JobSpec, job *string, setups int, p *problems) (*specPlan, error) {
	var c *checkedSpec
	switch {
	case spec != nil:
		if err := s.checkSpecSize(spec); err != nil {
			return nil, err
		}
		if err := s.checkCases(spec); err != nil {
			return nil, err
		}
		var err error
		if c, err = checkSpec(spec, "spec.", p); err != nil {
			return nil, err
		}
	case job != nil:
		id := parseJobName(*job, "job", p)
		if err := p.err(); err != nil {
			return nil, err
		}
		var err error
		if _, c, err = s.storedSpec(ctx, id); err != nil {
			return nil, err
		}
		if err := p.err(); err != nil {
			return nil, err
		}
	default:
		p.add("spec", "give spec or job")
		return nil, p.err()
	}
	size := c.Size()
	if err := s.checkGrid(size); err != nil {
		return nil, err
	}
	if err := s.checkSyncWork(setups, size); err != nil {
		return nil, err
	}
	pl, err := s.compile(ctx, c)
	if err != nil && job != nil && ctx.Err() == nil {
		return nil, storedSpecError(*job, err)
	}
	return pl, err
}
