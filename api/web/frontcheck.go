package web

import (
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
)

// FrontCheckText is the one-line check of a finished job's front in
// decision space (pb.FrontCheck), for example "Decision space: 2 of 156
// points beaten (1 by the same-sum twin, 1 by a ±0.03 neighbour; margin
// 0.1 % of the front's extent); the polish improved 40 points (6240
// evaluations)"; empty while the job has none. The page and the command
// line's get and watch print it.
func FrontCheckText(j *pb.Job) string {
	c := j.GetFrontCheck()
	if c == nil {
		return ""
	}
	s := fmt.Sprintf("Decision space: %d of %d points beaten (%d by the same-sum twin, %d by a ±%.2g neighbour of %d; margin %.2g %% of the front's extent)",
		c.GetBeaten(), c.GetPoints(), c.GetBeatenByTwin(), c.GetBeatenByNeighbour(), c.GetRadius(), c.GetNeighbours(), 100*c.GetMarginFraction())
	switch {
	case c.GetPolishRounds() > 0:
		return s + fmt.Sprintf("; the polish improved %d points (%d evaluations; its %d rounds on the twin, every corner of the box and the linear model's step replaced %d)",
			c.GetPolished(), c.GetPolishEvaluations(), c.GetPolishRounds(), c.GetPolishReplaced())
	case c.GetPolishEvaluations() > 0:
		return s + fmt.Sprintf("; the polish improved %d points (%d evaluations)", c.GetPolished(), c.GetPolishEvaluations())
	}
	return s + "; no polish"
}
