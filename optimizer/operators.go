package optimizer

import (
	"math"
	"math/rand"
)

// sbxMinGap is the smallest parent gap |x1 − x2| for which SBX acts on a
// gene; below it the spread factor's bounds 1 + 2(x − lo)/(x2 − x1) overflow
// to Inf and the children would equal the parents anyway.
const sbxMinGap = 1e-14

// sbx recombines a and b in place by bounded simulated binary crossover
// (Deb & Agrawal 1995) and reports whether any gene changed.
//
// Each gene is recombined with probability 1/2. With parents y1 < y2 in
// [lo, hi], u uniform on [0, 1) and η = eta, the spread factor β of the
// children is drawn from the SBX density
//
//	P(β) = ½(η+1) β^η           for β ≤ 1,
//	P(β) = ½(η+1) / β^(η+2)     for β > 1,
//
// truncated so that the child stays inside its bound. For the child below
// the parents the largest admissible spread is b = 1 + 2(y1 − lo)/(y2 − y1);
// with α = 2 − b^−(η+1) (the probability mass below b, times 2) the inverse
// cumulative distribution gives
//
//	βq = (uα)^(1/(η+1))                 if u ≤ 1/α,
//	βq = (1/(2 − uα))^(1/(η+1))         otherwise,
//
// and c1 = ½((y1 + y2) − βq (y2 − y1)). The child above uses the same u with
// b = 1 + 2(hi − y2)/(y2 − y1): c2 = ½((y1 + y2) + βq (y2 − y1)). Without
// bounds (b → ∞, α = 2) c1 + c2 = y1 + y2. The children are clipped to
// [lo, hi] against rounding and handed to a and b in random order. This is
// the bounded form of Deb's later descriptions of SBX, written here from
// memory of the formula.
func sbx(a, b []float64, bounds []Bound, eta float64, rng *rand.Rand) bool {
	changed := false
	for i := range a {
		if rng.Float64() > 0.5 {
			continue
		}
		x1, x2 := a[i], b[i]
		if math.Abs(x1-x2) <= sbxMinGap {
			continue
		}
		lo, hi := bounds[i].Lo, bounds[i].Hi
		y1, y2 := min(x1, x2), max(x1, x2)
		d := y2 - y1
		u := rng.Float64()
		c1 := 0.5 * ((y1 + y2) - sbxSpread(u, 1+2*(y1-lo)/d, eta)*d)
		c2 := 0.5 * ((y1 + y2) + sbxSpread(u, 1+2*(hi-y2)/d, eta)*d)
		c1 = min(max(c1, lo), hi)
		c2 = min(max(c2, lo), hi)
		if rng.Float64() <= 0.5 {
			c1, c2 = c2, c1
		}
		if c1 != x1 || c2 != x2 {
			changed = true
		}
		a[i], b[i] = c1, c2
	}
	return changed
}

// sbxSpread is the spread factor βq for uniform u and largest admissible
// spread beta (see sbx).
func sbxSpread(u, beta, eta float64) float64 {
	alpha := 2 - math.Pow(beta, -(eta+1))
	if u <= 1/alpha {
		return math.Pow(u*alpha, 1/(eta+1))
	}
	return math.Pow(1/(2-u*alpha), 1/(eta+1))
}

// polyMutate mutates x in place by bounded polynomial mutation and reports
// whether any gene changed (Deb & Deb 2014; the unbounded form is from
// K. Deb and M. Goyal, "A combined genetic adaptive search (GeneAS) for
// engineering design", Computer Science and Informatics 26(4):30-45, 1996).
//
// Each gene is mutated with probability pm. With x in [lo, hi], δ1 = (x −
// lo)/(hi − lo), δ2 = (hi − x)/(hi − lo), u uniform on [0, 1) and η = eta:
//
//	δq = [2u + (1 − 2u)(1 − δ1)^(η+1)]^(1/(η+1)) − 1          if u ≤ ½,
//	δq = 1 − [2(1 − u) + 2(u − ½)(1 − δ2)^(η+1)]^(1/(η+1))    otherwise,
//
// and x' = x + δq (hi − lo). δq runs over [−δ1, δ2], so x' stays in
// [lo, hi] (clipped against rounding); half the mutants fall below x, half
// above, and far from the bounds δq follows the polynomial density
// ½(η+1)(1 − |δ|)^η. Formula written here from memory of Deb & Deb (2014).
func polyMutate(x []float64, bounds []Bound, pm, eta float64, rng *rand.Rand) bool {
	changed := false
	p := 1 / (eta + 1)
	for i := range x {
		if rng.Float64() >= pm {
			continue
		}
		lo, hi := bounds[i].Lo, bounds[i].Hi
		if !(hi > lo) {
			continue
		}
		y := x[i]
		w := hi - lo
		u := rng.Float64()
		var dq float64
		if u <= 0.5 {
			xy := 1 - (y-lo)/w
			dq = math.Pow(2*u+(1-2*u)*math.Pow(xy, eta+1), p) - 1
		} else {
			xy := 1 - (hi-y)/w
			dq = 1 - math.Pow(2*(1-u)+2*(u-0.5)*math.Pow(xy, eta+1), p)
		}
		y = min(max(y+dq*w, lo), hi)
		if y != x[i] {
			changed = true
		}
		x[i] = y
	}
	return changed
}
