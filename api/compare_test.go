package api

import (
	"math"
	"slices"
	"testing"
)

// TestCompareWithFront checks the dominance flag, the epsilon, its
// normalised form, the nearest point and the gaps against values worked
// out by hand from the definitions (Zitzler et al. 2003, additive epsilon
// indicator; Pareto dominance), on a front of three mutually
// non-dominated points and on a front of one point.
func TestCompareWithFront(t *testing.T) {
	t.Parallel()
	// epsTol: the hand values are sums of two short binary fractions,
	// exact but for one rounding of the division by the extent.
	const epsTol = 1e-15
	three := [][]float64{{1, 4}, {2, 2}, {4, 1}} // extents 3 and 3
	one := [][]float64{{0, 5}}                   // extents |0| -> 1 and 5
	// Objectives in units 100 times apart, extents 10 and 1000: for
	// z = (5, 600) the raw minima are -400 (first point) and -5 (second),
	// the normalised ones -0.4 and -0.5, so the raw and the normalised
	// epsilon are attained by different points; nearest follows the
	// normalised one.
	mixed := [][]float64{{0, 1000}, {10, 0}}
	for _, c := range []struct {
		name      string
		front     [][]float64
		z         []float64
		dominated bool
		eps, norm float64
		nearest   int
		gaps      []float64
	}{
		{"a member", three, []float64{2, 2}, false, 0, 0, 1, []float64{0, 0}},
		{"behind a member by 0.5", three, []float64{2.5, 2.5}, true, 0.5, 0.5 / 3, 1, []float64{0.5, 0.5}},
		{"weakly behind", three, []float64{2, 3}, true, 0, 0, 1, []float64{0, 1}},
		{"ahead of all", three, []float64{0.5, 0.5}, false, -1.5, -1.5 / 3, 1, []float64{-1.5, -1.5}},
		{"between members", three, []float64{1.5, 3}, false, -0.5, -0.5 / 3, 1, []float64{-0.5, 1}},
		{"one-point front", one, []float64{1, 10}, true, 1, 1, 0, []float64{1, 5}},
		{"mixed units", mixed, []float64{5, 600}, false, -5, -0.4, 0, []float64{5, -400}},
	} {
		got := compareWithFront(c.z, c.front)
		if got.dominated != c.dominated || math.Abs(got.epsilon-c.eps) > epsTol || math.Abs(got.normalized-c.norm) > epsTol ||
			got.nearest != c.nearest || !slices.Equal(got.gaps, c.gaps) {
			t.Errorf("%s: got %+v, want dominated %v, eps %g, normalised %g, nearest %d, gaps %v",
				c.name, got, c.dominated, c.eps, c.norm, c.nearest, c.gaps)
		}
	}
}
