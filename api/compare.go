package api

import (
	"math"

	"dampfront/optimizer"
)

// comparison is where a candidate's objective vector z stands against a
// front F (all objectives minimised).
type comparison struct {
	// dominated: some f in F has f_j <= z_j for every j and f_j < z_j
	// for one (Pareto dominance).
	dominated bool
	// epsilon is
	//
	//	ε = max_{f∈F} min_j (z_j − f_j) = −I_ε+(F, {z}),
	//
	// I_ε+ the additive epsilon indicator of E. Zitzler, L. Thiele,
	// M. Laumanns, C. M. Fonseca and V. Grunert da Fonseca, "Performance
	// assessment of multiobjective optimizers: an analysis and review",
	// IEEE Transactions on Evolutionary Computation 7(2):117-132, 2003,
	// doi:10.1109/TEVC.2003.810758. ε > 0: some front point is better by
	// at least ε in every objective; ε <= 0: no front point is better in
	// every objective.
	epsilon float64
	// normalized is ε with each objective divided by the front's extent
	// in it (see extents).
	normalized float64
	// nearest is the index in F of a point attaining the normalised ε
	// (the first one; the raw ε mixes units when the objectives' differ),
	// and gaps are z − F[nearest] in the objectives' units.
	nearest int
	gaps    []float64
}

// compareWithFront compares z with the front F, which must not be empty
// and whose points have len(z) objectives.
func compareWithFront(z []float64, front [][]float64) comparison {
	scale := extents(front)
	c := comparison{epsilon: math.Inf(-1), normalized: math.Inf(-1)}
	for k, f := range front {
		if optimizer.Dominates(f, z) {
			c.dominated = true
		}
		e, n := math.Inf(1), math.Inf(1)
		for j := range z {
			d := z[j] - f[j]
			e = math.Min(e, d)
			n = math.Min(n, d/scale[j])
		}
		c.epsilon = math.Max(c.epsilon, e)
		if n > c.normalized {
			c.normalized, c.nearest = n, k
		}
	}
	c.gaps = make([]float64, len(z))
	for j := range z {
		c.gaps[j] = z[j] - front[c.nearest][j]
	}
	return c
}

// extents returns per objective max − min over the front, or |max| when
// that is 0 (a front of one point), or 1 when that is 0 too, so that
// every scale is positive.
func extents(front [][]float64) []float64 {
	m := len(front[0])
	out := make([]float64, m)
	for j := 0; j < m; j++ {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, f := range front {
			lo, hi = math.Min(lo, f[j]), math.Max(hi, f[j])
		}
		out[j] = hi - lo
		if out[j] == 0 {
			out[j] = math.Abs(hi)
		}
		if out[j] == 0 {
			out[j] = 1
		}
	}
	return out
}
