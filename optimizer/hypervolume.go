package optimizer

import (
	"cmp"
	"slices"
	"sort"
)

// Hypervolume returns the exact hypervolume of points against the
// reference point ref: the measure of the region of objective space that is
// dominated by at least one point and dominates ref,
//
//	HV = λ( ∪_i [p_i1, r_1] × … × [p_iM, r_M] ),
//
// in the product of the objectives' units (Zitzler & Thiele 1999). Points
// that do not lie strictly below ref in every objective contribute nothing
// and are skipped, so are points with a NaN coordinate. M is len(ref), 1 to
// 3:
//
//   - M = 1: r_1 − min p_1.
//   - M = 2: sort by f1 and add the horizontal slab each point adds to the
//     staircase, O(n log n).
//   - M = 3: the dimension sweep of N. Beume, C. M. Fonseca, M.
//     López-Ibáñez, L. Paquete and J. Vahrenhold, "On the complexity of
//     computing the hypervolume indicator", IEEE Transactions on
//     Evolutionary Computation 13(5):1075-1082, 2009,
//     doi:10.1109/TEVC.2009.2015575: points in increasing f3 are inserted
//     into the 2-D staircase of (f1, f2), whose area, updated at each
//     insertion, is integrated over f3. The staircase is a sorted slice
//     here, O(n log n) comparisons plus O(n²) moved words in the worst
//     case.
//
// The points are sorted first, so the result is bit-identical for any
// order of the same points. It panics with ErrShape if len(ref) is not 1 to
// 3 or a point's length differs from len(ref).
func Hypervolume(points [][]float64, ref []float64) float64 {
	m := len(ref)
	if m < 1 || m > MaxObjectives {
		panic(ErrShape)
	}
	var pts [][]float64
	for _, p := range points {
		if len(p) != m {
			panic(ErrShape)
		}
		inside := true
		for j := range p {
			if !(p[j] < ref[j]) {
				inside = false
				break
			}
		}
		if inside {
			pts = append(pts, p)
		}
	}
	if len(pts) == 0 {
		return 0
	}
	switch m {
	case 1:
		lo := pts[0][0]
		for _, p := range pts[1:] {
			lo = min(lo, p[0])
		}
		return ref[0] - lo
	case 2:
		slices.SortFunc(pts, lexicographic)
		return hv2(pts, ref)
	default:
		slices.SortFunc(pts, func(a, b []float64) int {
			if c := cmp.Compare(a[2], b[2]); c != 0 {
				return c
			}
			return lexicographic(a, b)
		})
		return hv3(pts, ref)
	}
}

// lexicographic orders vectors by their first differing coordinate.
func lexicographic(a, b []float64) int {
	for j := range a {
		if c := cmp.Compare(a[j], b[j]); c != 0 {
			return c
		}
	}
	return 0
}

// hv2 is the 2-D hypervolume of pts sorted by (f1, f2), all inside ref.
// Each point lower in f2 than every point before it adds the slab
// [p1, r1] × [p2, previous lowest f2).
func hv2(pts [][]float64, ref []float64) float64 {
	var area float64
	low := ref[1]
	for _, p := range pts {
		if p[1] < low {
			area += (ref[0] - p[0]) * (low - p[1])
			low = p[1]
		}
	}
	return area
}

// step is one corner of a 2-D staircase.
type step struct{ x, y float64 }

// hv3 is the 3-D hypervolume of pts sorted by f3, all inside ref.
func hv3(pts [][]float64, ref []float64) float64 {
	var (
		stairs []step // non-dominated (f1, f2) so far: x ascending, y descending
		area   float64
		volume float64
	)
	for i, p := range pts {
		if i > 0 {
			volume += area * (p[2] - pts[i-1][2])
		}
		var added float64
		stairs, added = insertStep(stairs, step{p[0], p[1]}, ref[0], ref[1])
		area += added
	}
	return volume + area*(ref[2]-pts[len(pts)-1][2])
}

// insertStep inserts p into the staircase st (bounded by rx, ry) and
// returns the new staircase and the area p adds to the region it
// dominates.
//
// With st sorted by x ascending (hence y descending), let i be the first
// corner with x ≥ p.x. p is dominated if corner i−1 has y ≤ p.y or corner i
// sits at x = p.x with y ≤ p.y. Otherwise the corners i…j−1 with y ≥ p.y are
// dominated by p and leave. Between p.x and the next corner the region is
// covered down to the height h of the corner on the left (ry if none), so p
// adds Σ (x_next − x) (h − p.y) over those intervals up to corner j (or rx).
func insertStep(st []step, p step, rx, ry float64) ([]step, float64) {
	i := sort.Search(len(st), func(k int) bool { return st[k].x >= p.x })
	if i > 0 && st[i-1].y <= p.y {
		return st, 0
	}
	if i < len(st) && st[i].x == p.x && st[i].y <= p.y {
		return st, 0
	}
	h := ry
	if i > 0 {
		h = st[i-1].y
	}
	j := i
	x := p.x
	var added float64
	for j < len(st) && st[j].y >= p.y {
		added += (st[j].x - x) * (h - p.y)
		x, h = st[j].x, st[j].y
		j++
	}
	end := rx
	if j < len(st) {
		end = st[j].x
	}
	added += (end - x) * (h - p.y)
	// Replace st[i:j] by p.
	st = slices.Replace(st, i, j, p)
	return st, added
}
