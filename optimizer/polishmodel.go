package optimizer

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// linearModelStep proposes one more neighbour of x inside its box, from
// the corners already evaluated around it (seen): it fits each objective
// a linear model in the moved genes by least squares, f(y) ≈ f(x) +
// J (y - x), and solves the linear programme
//
//	maximise t  subject to  J d + t·margin ≤ 0,  lo ≤ d ≤ hi,
//
// with lo and hi the box clipped to the bounds: the move the model says
// lowers every objective by the most margins at once. A box's corners
// are the vertices of the box but not of this programme's feasible set,
// so a move that lowers every objective can lie inside the box while no
// corner does (a narrow cone of such moves between two corners). It
// returns false when the model promises no gain of at least one margin
// (t < 1), cannot be fitted or the programme has no solution. The
// programme is the multiobjective steepest-descent subproblem of
// J. Fliege and B. F. Svaiter, "Steepest descent methods for
// multicriteria optimization", Math. Methods Oper. Res. 51(3):479-494,
// 2000 (from memory), with the box as its trust region and each
// objective scaled by its margin, on gradients fitted by regression
// instead of computed; it is solved by gonum's simplex
// (optimize/convex/lp).
func linearModelStep(x *Solution, seen []Solution, moved []int, radius []float64, bounds []Bound, margin []float64) ([]float64, bool) {
	k, m := len(moved), len(x.Objectives)
	if k == 0 || len(seen) < k+1 {
		return nil, false
	}
	dy := mat.NewDense(len(seen), k, nil)
	df := mat.NewDense(len(seen), m, nil)
	for r, s := range seen {
		for c, i := range moved {
			dy.Set(r, c, s.Genes[i]-x.Genes[i])
		}
		for j := range m {
			df.Set(r, j, s.Objectives[j]-x.Objectives[j])
		}
	}
	var jt mat.Dense // k × m: column j is objective j's gradient
	if err := jt.Solve(dy, df); err != nil {
		return nil, false
	}
	// Variables (d_1..d_k, t), free; G z ≤ h.
	n := k + 1
	var g []float64
	var h []float64
	row := func(coef []float64, rhs float64) { g, h = append(g, coef...), append(h, rhs) }
	for j := range m {
		coef := make([]float64, n)
		for c := range k {
			coef[c] = jt.At(c, j)
		}
		coef[k] = margin[j]
		row(coef, 0)
	}
	lo, hi := make([]float64, k), make([]float64, k)
	for c, i := range moved {
		lo[c] = max(-radius[i], bounds[i].Lo-x.Genes[i])
		hi[c] = min(radius[i], bounds[i].Hi-x.Genes[i])
		up, down := make([]float64, n), make([]float64, n)
		up[c], down[c] = 1, -1
		row(up, hi[c])
		row(down, -lo[c])
	}
	capT := make([]float64, n)
	capT[k] = 1
	row(capT, 1e6)
	obj := make([]float64, n)
	obj[k] = -1
	c, a, b := lp.Convert(obj, mat.NewDense(len(h), n, g), h, nil, nil)
	_, z, err := lp.Simplex(c, a, b, 1e-10, nil)
	if err != nil {
		return nil, false
	}
	// Convert splits each free variable into a positive and a negative
	// part, in that order: variable v is z[v] - z[n+v].
	t := z[k] - z[n+k]
	if !(t >= 1) || math.IsInf(t, 0) {
		return nil, false
	}
	y := slices.Clone(x.Genes)
	for c, i := range moved {
		d := min(hi[c], max(lo[c], z[c]-z[n+c]))
		y[i] = min(bounds[i].Hi, max(bounds[i].Lo, x.Genes[i]+d))
	}
	return y, true
}
