package api

import (
	"context"
	"fmt"
	"strings"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// submitPaths puts the engine's field paths of a submitted spec under
// "spec" (its label check says "labels[...]").
func submitPaths(p string) string {
	if p == "spec" || strings.HasPrefix(p, "spec.") {
		return p
	}
	return "spec." + p
}

// listPaths maps the engine's list filter paths to ListJobsRequest's.
func listPaths(p string) string { return strings.TrimPrefix(p, "filter.") }

// SubmitJob checks the spec in full, fills in its defaults, checks the
// job's size against the limits, compiles it once (the car's stability
// at each speed) and stores it. The size is checked before anything that
// grows with it, and the checks and the compile run in a submit slot
// (Options.MaxConcurrentSubmits), under the call's context.
func (s *Server) SubmitJob(ctx context.Context, req *pb.SubmitJobRequest) (*pb.SubmitJobResponse, error) {
	if req.GetSpec() == nil {
		return nil, invalidArgument(problems{{Field: "spec", Reason: "is required"}})
	}
	if err := s.checkSpecSize(req.GetSpec()); err != nil {
		return nil, err
	}
	if err := s.checkCases(req.GetSpec()); err != nil {
		return nil, err
	}
	release, err := s.acquireSubmit(ctx)
	if err != nil {
		return nil, err
	}
	defer release()
	var p problems
	c, err := checkSpec(req.GetSpec(), "spec.", &p)
	if err != nil {
		return nil, err
	}
	size := c.Size()
	if err := s.checkGrid(size); err != nil {
		return nil, err
	}
	if err := s.checkJobWork(size); err != nil {
		return nil, err
	}
	if _, err := s.compile(ctx, c); err != nil {
		return nil, err
	}
	spec, err := marshalSpec(c.msg)
	if err != nil {
		return nil, toStatus(err, nil)
	}
	j, err := s.engine.Submit(ctx, &jobs.SubmitParams{Spec: spec, Labels: c.msg.GetLabels()})
	job, err := engineJob(j, err, submitPaths, true)
	if err != nil {
		return nil, err
	}
	return &pb.SubmitJobResponse{Job: job}, nil
}

// GetJob returns a job, with its spec unless the basic view is asked for.
func (s *Server) GetJob(ctx context.Context, req *pb.GetJobRequest) (*pb.GetJobResponse, error) {
	id, err := jobNameArgument(req.GetName())
	if err != nil {
		return nil, err
	}
	j, err := s.engine.Get(ctx, id)
	full := req.GetView() != pb.JobView_JOB_VIEW_BASIC
	job, err := engineJob(j, err, nil, full)
	if err != nil {
		return nil, err
	}
	if err := s.markInfeasible(ctx, job); err != nil {
		return nil, toStatus(err, nil)
	}
	if full {
		if job.History, err = s.history(ctx, j); err != nil {
			return nil, toStatus(err, nil)
		}
	}
	return &pb.GetJobResponse{Job: job}, nil
}

// ListJobs pages through the jobs, newest first.
func (s *Server) ListJobs(ctx context.Context, req *pb.ListJobsRequest) (*pb.ListJobsResponse, error) {
	var p problems
	params := &jobs.JobListParams{PageSize: int(req.GetPageSize()), PageToken: req.GetPageToken(), Labels: req.GetLabels()}
	for i, st := range req.GetStates() {
		js, ok := stateFromProto(st)
		if !ok {
			p.add(fmt.Sprintf("states[%d]", i), "must be one of the JOB_STATE_ values other than UNSPECIFIED, got %v", st)
		}
		params.States = append(params.States, js)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	res, err := s.engine.List(ctx, params)
	if err != nil {
		return nil, toStatus(err, listPaths)
	}
	out := &pb.ListJobsResponse{NextPageToken: res.NextPageToken}
	for _, j := range res.Jobs {
		job, err := jobToProto(j, req.GetView() == pb.JobView_JOB_VIEW_FULL)
		if err != nil {
			return nil, toStatus(err, nil)
		}
		if j.State == jobs.StateSucceeded {
			// The list's badge reads the flag as GetJob and watch do; a
			// feasible front costs one one-member page read.
			if err := s.markInfeasible(ctx, job); err != nil {
				return nil, toStatus(err, nil)
			}
		}
		out.Jobs = append(out.Jobs, job)
	}
	return out, nil
}

// CancelJob requests cancellation of a queued or running job.
func (s *Server) CancelJob(ctx context.Context, req *pb.CancelJobRequest) (*pb.CancelJobResponse, error) {
	id, err := jobNameArgument(req.GetName())
	if err != nil {
		return nil, err
	}
	j, err := s.engine.Cancel(ctx, id)
	job, err := engineJob(j, err, nil, false)
	if err != nil {
		return nil, err
	}
	return &pb.CancelJobResponse{Job: job}, nil
}

// WatchJob streams the job's progress whenever it changes (and, while
// the job refines its front, the refinement's whenever a checkpoint moves
// it), then the job in its terminal state. A job already finished gives
// that last event at once. When the server shuts down the stream ends with Unavailable, and
// the client watches again elsewhere or later.
func (s *Server) WatchJob(req *pb.WatchJobRequest, stream grpc.ServerStreamingServer[pb.WatchJobResponse]) error {
	id, err := jobNameArgument(req.GetName())
	if err != nil {
		return err
	}
	ctx, cancel := context.WithCancel(stream.Context())
	defer cancel()
	go func() {
		select {
		case <-s.stopping:
			cancel()
		case <-ctx.Done():
		}
	}()
	ch, err := s.engine.Watch(ctx, id)
	if err != nil {
		return toStatus(err, nil)
	}
	var last *jobs.Progress
	var refining *pb.RefinementSummary
	for j := range ch {
		if j.State.Terminal() {
			job, err := jobToProto(j, false)
			if err != nil {
				return toStatus(err, nil)
			}
			if err := s.markInfeasible(ctx, job); err != nil {
				return toStatus(err, nil)
			}
			return stream.Send(&pb.WatchJobResponse{Event: &pb.WatchJobResponse_Job{Job: job}})
		}
		if last == nil || progressChanged(last, &j.Progress) {
			last = &j.Progress
			if err := stream.Send(&pb.WatchJobResponse{Event: &pb.WatchJobResponse_Progress{Progress: progressToProto(&j.Progress)}}); err != nil {
				return err
			}
		}
		if rs := refinementInProgress(j.Summary); rs != nil && !proto.Equal(rs, refining) {
			refining = rs
			if err := stream.Send(&pb.WatchJobResponse{Event: &pb.WatchJobResponse_Refinement{Refinement: rs}}); err != nil {
				return err
			}
		}
	}
	switch {
	case s.isStopping():
		return statusError(codes.Unavailable, "the server is shutting down; watch the job again", ReasonShuttingDown, nil)
	case stream.Context().Err() != nil:
		return toStatus(stream.Context().Err(), nil)
	}
	return statusError(codes.Unavailable, "the watch ended before the job finished; watch it again", ReasonInternal, nil)
}

// progressChanged reports whether b is news after a.
func progressChanged(a, b *jobs.Progress) bool {
	return a.Generation != b.Generation || a.Evaluations != b.Evaluations || !a.UpdatedAt.Equal(b.UpdatedAt)
}

// jobNameArgument parses a request's job name (field "name").
func jobNameArgument(name string) (string, error) {
	var p problems
	id := parseJobName(name, "name", &p)
	return id, p.err()
}

// engineJob is the engine's answer j, err as a reply's job: err as a
// status (its field paths mapped by paths), j in the full or basic view.
func engineJob(j *jobs.Job, err error, paths pathMapper, full bool) (*pb.Job, error) {
	if err != nil {
		return nil, toStatus(err, paths)
	}
	job, err := jobToProto(j, full)
	if err != nil {
		return nil, toStatus(err, nil)
	}
	return job, nil
}
