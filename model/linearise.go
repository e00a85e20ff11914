package model

import "math"

// Statistical (equivalent) linearisation of the damper (Caughey 1963,
// J. Acoust. Soc. Am. 35(11):1706-1711; Roberts & Spanos, "Random
// Vibration and Statistical Linearization", Wiley 1990, ch. 5).
//
// For a zero-mean Gaussian wheel velocity v with standard deviation σ the
// mean-square-optimal linear slope is c_eq = E[f(v) v]/σ² = E[f'(v)] (by
// Gaussian integration by parts), and the mean force is E[f(v)]. A
// direction's curve (see hardware.go) is
//
//	f(v) = c (v + Σ_j (s_j - s_(j-1)) (v - v_j)⁺),  v > 0,  s_0 = 1,
//
// so with u_j = v_j/σ, φ the standard normal density and Q = 1 - Φ, the
// sum over its segments of slope times probability mass and its mean are
//
//	c_eq,dir = c (1/2 - Σ_j (s_(j-1) - s_j) Q(u_j))
//	E[f]_dir = σ c (φ(0) - Σ_j (s_(j-1) - s_j)(φ(u_j) - u_j Q(u_j)))
//
// from E[1; v > v_j] = Q(u_j), E[v; v > 0] = σ φ(0) and
// E[v - v_j; v > v_j] = σ (φ(u_j) - u_j Q(u_j)). Rebound alike with its
// sign: c_eq = c_eq,bump + c_eq,rebound, E[f] = E[f]_bump - E[f]_rebound.
// With one knee (v_b, r_b) this is
//
//	c_eq = c_b (1/2 - (1 - r_b) Q(u_b)) + c_r (1/2 - (1 - r_r) Q(u_r)).
//
// Coulomb friction F sign(v) adds E[F |v|]/σ² = F sqrt(2/π)/σ to c_eq
// (Roberts & Spanos 1990, ch. 5, the Coulomb oscillator) and nothing to
// E[f]; at σ = 0 (a damper that does not move) it adds nothing.

// invSqrt2Pi is φ(0) = 1/sqrt(2π).
const invSqrt2Pi = 0.3989422804014327

// normQ is the upper tail Q(u) = 1 - Φ(u) of the standard normal.
func normQ(u float64) float64 { return 0.5 * math.Erfc(u/math.Sqrt2) }

// normPDF is the standard normal density φ(u).
func normPDF(u float64) float64 { return invSqrt2Pi * math.Exp(-0.5*u*u) }

// branchEq returns the contribution of one direction (low-speed slope c,
// first knee vk with slope factor r, further stages st) to c_eq and to
// E[f]/σ, for velocity sd sigma.
func branchEq(c, vk, r float64, st *stages, sigma float64) (ceq, meanPerSigma float64) {
	if vk <= 0 || sigma <= 0 {
		// Linear branch, or σ = 0 where u = ∞ and no knee is reached.
		return c / 2, c * invSqrt2Pi
	}
	slope, mean := 0.5, invSqrt2Pi
	knee := func(v, drop float64) {
		if drop == 0 {
			return
		}
		u := v / sigma
		q := normQ(u)
		slope -= drop * q
		mean -= drop * (normPDF(u) - u*q)
	}
	knee(vk, 1-r)
	prev := r
	for j := 0; j < st.n; j++ {
		knee(st.v[j], prev-st.r[j])
		prev = st.r[j]
	}
	return c * slope, c * mean
}

// Equivalent returns the equivalent linear slope c_eq (N s/m) and the mean
// force E[f] (N) of the damper at the wheel for a zero-mean Gaussian wheel
// velocity of standard deviation sigma (m/s); the mean is positive when
// the damper pushes body and wheel apart on average (bump-dominant).
func (d *wheelDamper) Equivalent(sigma float64) (ceq, mean float64) {
	cb, mb := branchEq(d.cb, d.vb, d.rb, &d.sb, sigma)
	cr, mr := branchEq(d.cr, d.vr, d.rr, &d.sr, sigma)
	ceq = cb + cr
	if d.fric > 0 && sigma > 0 {
		ceq += d.fric * sqrt2OverPi / sigma
	}
	return ceq, sigma * (mb - mr)
}

// sqrt2OverPi is sqrt(2/π).
const sqrt2OverPi = 0.7978845608028654
