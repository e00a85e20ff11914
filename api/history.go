package api

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// history returns a job's per-generation progress up to its last
// checkpoint, read back from the optimiser state in that checkpoint.
func (s *Server) history(ctx context.Context, j *jobs.Job) ([]*pb.Progress, error) {
	ckpt, err := s.engine.Checkpoint(ctx, j.ID)
	if err != nil || ckpt == nil {
		return nil, err
	}
	spec, err := unmarshalSpec(j.Spec)
	if err != nil {
		return nil, err
	}
	pl, err := compile(spec, "spec.")
	if err != nil {
		return nil, err
	}
	js, err := openStudy(pl, 1, ckpt)
	if err != nil {
		return nil, fmt.Errorf("job %s: read checkpoint: %w", j.ID, err)
	}
	gens := int32(pl.settings.Generations)
	var out []*pb.Progress
	for _, p := range js.opt.History() {
		out = append(out, &pb.Progress{
			Generation: int32(p.Generation), Generations: gens, Evaluations: int64(p.Evaluations),
			Hypervolume: p.Hypervolume, BestObjectives: p.Best,
		})
	}
	return out, nil
}
