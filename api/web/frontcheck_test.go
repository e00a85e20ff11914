package web

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// FrontCheckText words the check of a finished front in one line, with
// or without a polish, with the polish's neighbourhood rounds when it ran
// them, and nothing for a job without one.
func TestFrontCheckText(t *testing.T) {
	t.Parallel()
	c := &pb.FrontCheck{Points: 156, Twins: 150, Neighbours: 4, Radius: 0.03, MarginFraction: 0.001,
		BeatenByTwin: 1, BeatenByNeighbour: 2, Beaten: 3, Evaluations: 700}
	const head = "Decision space: 3 of 156 points beaten (1 by the same-sum twin, 2 by a ±0.03 neighbour of 4; margin 0.1 % of the front's extent)"
	if got := FrontCheckText(&pb.Job{FrontCheck: c}); got != head+"; no polish" {
		t.Errorf("without a polish: %q", got)
	}
	c.Polished, c.PolishEvaluations = 40, 6240
	if got := FrontCheckText(&pb.Job{FrontCheck: c}); got != head+"; the polish improved 40 points (6240 evaluations)" {
		t.Errorf("with a polish: %q", got)
	}
	c.PolishRounds, c.PolishReplaced = 3, 25
	if got := FrontCheckText(&pb.Job{FrontCheck: c}); got != head+"; the polish improved 40 points (6240 evaluations; its 3 rounds on the twin, every corner of the box and the linear model's step replaced 25)" {
		t.Errorf("with the polish's rounds: %q", got)
	}
	if got := FrontCheckText(&pb.Job{}); got != "" {
		t.Errorf("no check: %q", got)
	}
}
