// Package apitest builds stored jobs for the tests of the API's clients
// (the command line, the job page, the Python client) where running the
// job itself would cost minutes.
package apitest

import (
	"context"
	"fmt"
	"log/slog"
	"math/rand/v2"
	"os"

	"google.golang.org/protobuf/proto"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// seedLease is the lease under which SeedFront writes its job.
const seedLease = "apitest-seed"

// SeedFront stores a succeeded job of spec whose front is n setups of its
// design space's damping ratios, drawn from a seeded source and each
// evaluated in full by the service (metrics on every road case, modes,
// damper curves: the detail a real front stores), in the order drawn. It
// stands in for the front of a long run (a 3-objective job of 100 × 300
// leaves some 1,500 solutions) without running it; the setups are not
// filtered to be mutually non-dominated, which paging and the output
// formats do not depend on. The engine must have no workers, so that
// nothing works the job's queued slice before it is finished here. It
// returns the job's resource name.
func SeedFront(ctx context.Context, e *jobs.Engine, spec *pb.JobSpec, n int, seed uint64) (string, error) {
	srv, err := api.NewServer(e, api.Options{MaxSyncWork: n * max(len(spec.GetRoadCases()), 1), Logger: slog.New(slog.DiscardHandler)})
	if err != nil {
		return "", err
	}
	sub, err := srv.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: spec})
	if err != nil {
		return "", fmt.Errorf("submit: %w", err)
	}
	name := sub.GetJob().GetName()
	id := sub.GetJob().GetJobId()
	stored, err := srv.GetJob(ctx, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_FULL})
	if err != nil {
		return "", err
	}
	ev, err := srv.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Job{Job: name}, Setups: drawSetups(stored.GetJob().GetSpec(), n, seed), View: pb.SolutionView_SOLUTION_VIEW_FULL,
	})
	if err != nil {
		return "", fmt.Errorf("evaluate: %w", err)
	}
	front := make([]jobs.Solution, len(ev.GetEvaluations()))
	for i, s := range ev.GetEvaluations() {
		s.Index = int32(i)
		detail, err := proto.MarshalOptions{Deterministic: true}.Marshal(s)
		if err != nil {
			return "", err
		}
		front[i] = jobs.Solution{Index: i, Genes: s.GetGenes(), Objectives: s.GetObjectives(), Violations: s.GetViolations(), Feasible: s.GetFeasible(), Detail: detail}
	}
	st := e.Store()
	now := sub.GetJob().GetCreateTime().AsTime()
	if _, err := st.JobStart(ctx, &jobs.JobStartParams{ID: id, Lease: seedLease, Now: now}); err != nil {
		return "", fmt.Errorf("start: %w", err)
	}
	if err := st.FrontPut(ctx, &jobs.FrontPutParams{JobID: id, Lease: seedLease, Solutions: front}); err != nil {
		return "", fmt.Errorf("store the front: %w", err)
	}
	if _, err := st.JobFinish(ctx, &jobs.JobFinishParams{ID: id, Lease: seedLease, State: jobs.StateSucceeded, Now: now}); err != nil {
		return "", fmt.Errorf("finish: %w", err)
	}
	return name, nil
}

// drawSetups draws n setups whose four damping ratios are uniform within
// the bounds of a stored spec (defaults filled in); knees and high-speed
// factors are its base.
func drawSetups(spec *pb.JobSpec, n int, seed uint64) []*pb.Setup {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	r := spec.GetDesignSpace().GetRatios()
	draw := func(b *pb.Range) float64 { return b.GetMin() + (b.GetMax()-b.GetMin())*rng.Float64() }
	base := spec.GetDesignSpace().GetBase()
	axle := func(b *pb.AxleDamping, bump, rebound *pb.Range) *pb.AxleDamping {
		return &pb.AxleDamping{BumpRatio: draw(bump), ReboundRatio: draw(rebound),
			KneeBumpMPerS: b.GetKneeBumpMPerS(), KneeReboundMPerS: b.GetKneeReboundMPerS(),
			HighSpeedBumpFactor: b.GetHighSpeedBumpFactor(), HighSpeedReboundFactor: b.GetHighSpeedReboundFactor()}
	}
	out := make([]*pb.Setup, n)
	for i := range out {
		out[i] = &pb.Setup{Front: axle(base.GetFront(), r.GetFrontBump(), r.GetFrontRebound()), Rear: axle(base.GetRear(), r.GetRearBump(), r.GetRearRebound())}
	}
	return out
}

// SeedDatabase is SeedFront on the database at url (a SQLite file path or
// a PostgreSQL URL) through an engine of its own without workers, closed
// again before it returns: the database is then ready for a server.
func SeedDatabase(ctx context.Context, url string, spec *pb.JobSpec, n int, seed uint64) (string, error) {
	e, err := jobs.Open(ctx, jobs.Config{DatabaseURL: url, Workers: 0, Logger: slog.New(slog.DiscardHandler)}, api.NewOpener(0))
	if err != nil {
		return "", err
	}
	defer e.Close()
	return SeedFront(ctx, e, spec, n, seed)
}

// DemoSpec is the demo job (testdata/demo-job.yaml, read from path) with
// three objectives (pitch added when it has fewer), the kind of job that
// leaves the largest fronts, on a coarse frequency grid (61 points) that makes each
// evaluation some four times cheaper and each stored solution no smaller.
func DemoSpec(path string) (*pb.JobSpec, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	spec := &pb.JobSpec{}
	if err := api.DecodeText(b, spec); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(spec.Objectives) < 3 {
		spec.Objectives = append(spec.Objectives, &pb.Objective{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PITCH})
	}
	spec.Grid = &pb.Grid{MinHz: 0.1, MaxHz: 250, Points: 61}
	return spec, nil
}
