package optimizer

import (
	"math"
	"slices"
)

// CrowdingDistance fills dst[k] with the crowding distance of point
// front[k] within the front (Deb et al. 2002, §III-B). For each objective m
// the members are ordered by f_m and
//
//	d_k += (f_m(next of k) − f_m(previous of k)) / (f_m^max − f_m^min),
//
// with +Inf for the first and last member. An objective on which every
// member has the same value adds nothing (its range is 0). A front of one or
// two members is all +Inf. Ties in f_m are ordered by index, so the result
// does not depend on the order of front. The objectives must be finite.
//
// It panics with ErrShape if len(dst) != len(front).
func CrowdingDistance(dst []float64, obj [][]float64, front []int) {
	if len(dst) != len(front) {
		panic(ErrShape)
	}
	l := len(front)
	if l <= 2 {
		for k := range dst {
			dst[k] = math.Inf(1)
		}
		return
	}
	for k := range dst {
		dst[k] = 0
	}
	pos := make([]int, l) // positions into front, sorted per objective
	for m := range obj[front[0]] {
		for k := range pos {
			pos[k] = k
		}
		slices.SortFunc(pos, func(a, b int) int {
			fa, fb := obj[front[a]][m], obj[front[b]][m]
			switch {
			case fa < fb:
				return -1
			case fa > fb:
				return 1
			}
			return front[a] - front[b]
		})
		lo, hi := obj[front[pos[0]]][m], obj[front[pos[l-1]]][m]
		span := hi - lo
		if !(span > 0) {
			continue
		}
		dst[pos[0]] = math.Inf(1)
		dst[pos[l-1]] = math.Inf(1)
		for k := 1; k < l-1; k++ {
			dst[pos[k]] += (obj[front[pos[k+1]]][m] - obj[front[pos[k-1]]][m]) / span
		}
	}
}
