package optimizer

import "math"

// referenceMargin is the fraction of each objective's range added beyond
// its worst value when the search fixes its own reference point, so that
// the extreme points of a front still add volume (common practice; the
// figure 0.1 has no published source).
const referenceMargin = 0.1

// autoReference returns a reference point from the feasible solutions
// among sols: per objective,
//
//	r_j = max_j + 0.1 (max_j − min_j),
//
// or max_j + 0.1 |max_j| when the range is 0, or max_j + 1 when that is 0
// too. It returns nil when no solution is feasible. The result depends on
// the set of solutions only.
func autoReference(sols []Solution, m int) []float64 {
	lo := make([]float64, m)
	hi := make([]float64, m)
	for j := range m {
		lo[j], hi[j] = math.Inf(1), math.Inf(-1)
	}
	any := false
	for _, s := range sols {
		if !s.Feasible {
			continue
		}
		any = true
		for j, f := range s.Objectives {
			lo[j], hi[j] = min(lo[j], f), max(hi[j], f)
		}
	}
	if !any {
		return nil
	}
	ref := make([]float64, m)
	for j := range ref {
		span := hi[j] - lo[j]
		if span == 0 {
			span = math.Abs(hi[j])
		}
		if span == 0 {
			span = 1 / referenceMargin
		}
		ref[j] = hi[j] + referenceMargin*span
	}
	return ref
}
