package optimizer

import (
	"math"
	"slices"
)

// poll is a feasible poll point of a compass round that did not lower s:
// the moved gene's value and the objectives there; f is nil when the
// point was not evaluated or not feasible.
type poll struct {
	at float64
	f  []float64
}

// descentStep tries one step from ps.x along a common descent direction
// of the weighted objectives w_j f_j, estimated from the failed poll
// round at step Δ (polls[2i] at x + Δ e_i, polls[2i+1] at x − Δ e_i), and
// reports whether it lowered s.
//
// A compass search stalls where every move along an axis raises one of
// the objectives (a narrow valley across the genes, or the kink of s
// where all its terms are equal) although a move of several genes at once
// lowers them all. The poll points give each objective's gradient in the
// genes scaled to [0, 1] by differences (central where both poll points
// of a gene are feasible, one-sided with x where only one is; a gene with
// none keeps 0), the simplex gradients that
//
//	A. L. Custódio and L. N. Vicente, "Using sampling and simplex
//	derivatives in pattern search methods", SIAM Journal on Optimization
//	18(2):537-555, 2007, doi:10.1137/050646706
//
// (from memory) take from a pattern search's own poll points. Of the
// weighted gradients g_j = w_j ∇f_j, the element of least norm of their
// convex hull, v, gives the direction −v that lowers every objective to
// first order (zero when no such direction exists: the point is Pareto
// critical); this is the steepest common descent direction of
//
//	J. Fliege and B. F. Svaiter, "Steepest descent methods for
//	multicriteria optimization", Mathematical Methods of Operations
//	Research 51(3):479-494, 2000, doi:10.1007/s001860000043
//
// and the MGDA of J.-A. Désidéri, "Multiple-gradient descent algorithm
// (MGDA) for multiobjective optimization", Comptes Rendus Mathématique
// 350(5-6):313-318, 2012, doi:10.1016/j.crma.2012.03.014 (both from
// memory). The step moves the gene that −v moves most by Δ of its range
// and the others in proportion, clipped to the bounds; it costs one
// evaluation.
func (ps *pointSearch) descentStep(polls []poll, step float64) bool {
	b := ps.shape.bounds
	m := len(ps.z)
	x0 := ps.x
	var fx []float64 // objectives at x: the start's, or the last accepted point's
	if ps.best != nil {
		fx = ps.best.Objectives
	} else {
		fx = ps.z
	}
	g := make([][]float64, m)
	for j := range g {
		g[j] = make([]float64, len(b))
	}
	have := false
	for i, bi := range b {
		if bi.Hi <= bi.Lo {
			continue
		}
		scale := bi.Hi - bi.Lo
		up, down := polls[2*i], polls[2*i+1]
		var fa, fb []float64
		var ua, ub float64
		switch {
		case up.f != nil && down.f != nil:
			fa, fb, ua, ub = up.f, down.f, up.at, down.at
		case up.f != nil:
			fa, fb, ua, ub = up.f, fx, up.at, x0[i]
		case down.f != nil:
			fa, fb, ua, ub = fx, down.f, x0[i], down.at
		default:
			continue
		}
		du := (ua - ub) / scale
		for j := range m {
			g[j][i] = ps.w[j] * (fa[j] - fb[j]) / du
		}
		have = true
	}
	if !have {
		return false
	}
	v := minNormHull(g)
	big := 0.0
	for _, vi := range v {
		big = max(big, math.Abs(vi))
	}
	if !(big > 0) || math.IsInf(big, 0) || math.IsNaN(big) {
		return false
	}
	y := slices.Clone(x0)
	for i, bi := range b {
		if bi.Hi > bi.Lo {
			y[i] = min(bi.Hi, max(bi.Lo, x0[i]-step*(bi.Hi-bi.Lo)*v[i]/big))
		}
	}
	if slices.Equal(y, x0) {
		return false
	}
	_, ok := ps.try(y)
	return ok
}

// minNormHull returns the element of least Euclidean norm of the convex
// hull of the vectors g (all of one length), by the algorithm of
// M. Frank and P. Wolfe, "An algorithm for quadratic programming", Naval
// Research Logistics Quarterly 3(1-2):95-110, 1956 (from memory), with
// the exact line search; a fixed number of iterations, exact for two
// vectors after the first.
func minNormHull(g [][]float64) []float64 {
	v := slices.Clone(g[0])
	d := make([]float64, len(v))
	for range 64 {
		t, low := 0, math.Inf(1)
		for j, gj := range g {
			if p := dot(v, gj); p < low {
				t, low = j, p
			}
		}
		for i := range d {
			d[i] = g[t][i] - v[i]
		}
		dd := dot(d, d)
		if dd == 0 {
			break
		}
		// min over γ in [0, 1] of |v + γ d|².
		gamma := min(1, max(0, -dot(v, d)/dd))
		if gamma == 0 {
			break
		}
		for i := range v {
			v[i] += gamma * d[i]
		}
	}
	return v
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}
