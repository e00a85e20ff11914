package main

import (
	"math"

	pb "dampfront/api/gen/dampfront/v1"
)

// balancedIndex picks the balanced point of a front: each objective is
// normalised to [0, 1] over the front, (f - min) / (max - min) (an
// objective with no spread maps to 0), and the solution nearest to the
// middle (1/2, ..., 1/2) in the Euclidean norm wins; ties go to the lower
// index. It returns -1 for an empty front.
//
// This is a presentation choice, not an optimum: it is the point that
// gives up about as much of each objective as the front allows, a
// sensible first setup to look at before an engineer weighs grip against
// platform for the car and the track.
func balancedIndex(sols []*pb.Solution) int {
	if len(sols) == 0 {
		return -1
	}
	m := len(sols[0].GetObjectives())
	lo := make([]float64, m)
	hi := make([]float64, m)
	for j := range lo {
		lo[j], hi[j] = math.Inf(1), math.Inf(-1)
	}
	for _, s := range sols {
		for j, v := range s.GetObjectives() {
			if j < m {
				lo[j] = math.Min(lo[j], v)
				hi[j] = math.Max(hi[j], v)
			}
		}
	}
	best, bestD := -1, math.Inf(1)
	for i, s := range sols {
		d := 0.0
		for j, v := range s.GetObjectives() {
			if j >= m {
				break
			}
			u := 0.0
			if hi[j] > lo[j] {
				u = (v - lo[j]) / (hi[j] - lo[j])
			}
			d += (u - 0.5) * (u - 0.5)
		}
		if d < bestD {
			best, bestD = i, d
		}
	}
	return best
}
