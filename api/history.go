package api

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// history returns a job's per-generation progress up to its last
// checkpoint, read back from the optimiser state in that checkpoint; the
// spec is checked, not compiled.
func (s *Server) history(ctx context.Context, j *jobs.Job) ([]*pb.Progress, error) {
	ckpt, err := s.engine.Checkpoint(ctx, j.ID)
	if err != nil || ckpt == nil {
		return nil, err
	}
	msg, err := unmarshalSpec(j.Spec)
	if err != nil {
		return nil, err
	}
	var p problems
	c, err := checkSpec(msg, "spec.", &p)
	if err != nil {
		return nil, err
	}
	h, err := c.History(ckpt)
	if err != nil {
		return nil, fmt.Errorf("job %s: read checkpoint: %w", j.ID, err)
	}
	gens := int32(c.Spec().Search.Generations)
	var out []*pb.Progress
	for _, p := range h {
		out = append(out, &pb.Progress{
			Generation: int32(p.Generation), Generations: gens, Evaluations: int64(p.Evaluations),
			Hypervolume: p.Hypervolume, BestObjectives: p.Best,
		})
	}
	return out, nil
}
