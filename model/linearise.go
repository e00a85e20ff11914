package model

import "math"

// Statistical (equivalent) linearisation of the piecewise-linear damper
// (Caughey 1963, J. Acoust. Soc. Am. 35(11):1706-1711; Roberts & Spanos,
// "Random Vibration and Statistical Linearization", Wiley 1990, ch. 5).
//
// For a zero-mean Gaussian wheel velocity v with standard deviation σ the
// mean-square-optimal linear slope is c_eq = E[f(v) v]/σ² = E[f'(v)] (by
// Gaussian integration by parts), and the mean force is E[f(v)]. With the
// bump branch slope c_b up to the knee v_b and r_b·c_b above it (rebound
// alike), u = v_knee/σ, φ the standard normal density and Q = 1 - Φ:
//
//	c_eq = c_b (1/2 - (1 - r_b) Q(u_b)) + c_r (1/2 - (1 - r_r) Q(u_r))
//	E[f] = σ c_b (φ(0) - (1 - r_b)(φ(u_b) - u_b Q(u_b)))
//	     - σ c_r (φ(0) - (1 - r_r)(φ(u_r) - u_r Q(u_r)))
//
// The first follows from E[f'] = c_b (P(0<v<v_b) + r_b P(v>v_b)) + rebound
// alike; the second from E[v; v>0] = σ φ(0) and
// E[v - v_b; v > v_b] = σ (φ(u) - u Q(u)). A branch without a knee is
// linear: its terms are c/2 and σ c φ(0).

// invSqrt2Pi is φ(0) = 1/sqrt(2π).
const invSqrt2Pi = 0.3989422804014327

// normQ is the upper tail Q(u) = 1 - Φ(u) of the standard normal.
func normQ(u float64) float64 { return 0.5 * math.Erfc(u/math.Sqrt2) }

// normPDF is the standard normal density φ(u).
func normPDF(u float64) float64 { return invSqrt2Pi * math.Exp(-0.5*u*u) }

// branchEq returns the contribution of one branch (slope c, knee vk,
// high-speed factor r) to c_eq and to E[f]/σ, for velocity sd sigma.
func branchEq(c, vk, r, sigma float64) (ceq, meanPerSigma float64) {
	if vk <= 0 || r == 1 || sigma <= 0 {
		// Linear branch, or σ = 0 where u = ∞ and the knee is never reached.
		return c / 2, c * invSqrt2Pi
	}
	u := vk / sigma
	q := normQ(u)
	ceq = c * (0.5 - (1-r)*q)
	meanPerSigma = c * (invSqrt2Pi - (1-r)*(normPDF(u)-u*q))
	return ceq, meanPerSigma
}

// Equivalent returns the equivalent linear slope c_eq (N s/m) and the mean
// force E[f] (N) of the damper at the wheel for a zero-mean Gaussian wheel
// velocity of standard deviation sigma (m/s); the mean is positive when
// the damper pushes body and wheel apart on average (bump-dominant).
func (d wheelDamper) Equivalent(sigma float64) (ceq, mean float64) {
	cb, mb := branchEq(d.cb, d.vb, d.rb, sigma)
	cr, mr := branchEq(d.cr, d.vr, d.rr, sigma)
	return cb + cr, sigma * (mb - mr)
}
