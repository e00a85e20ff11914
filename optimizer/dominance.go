package optimizer

import "math"

// Dominates reports whether a Pareto-dominates b under minimisation:
//
//	a ≺ b  ⇔  a_j ≤ b_j for every j  and  a_j < b_j for some j.
//
// It panics with ErrShape if the lengths differ.
func Dominates(a, b []float64) bool {
	if len(a) != len(b) {
		panic(ErrShape)
	}
	strict := false
	for j := range a {
		if a[j] > b[j] {
			return false
		}
		if a[j] < b[j] {
			strict = true
		}
	}
	return strict
}

// ConstrainedDominates reports whether a, with total constraint violation
// va, constrained-dominates b, with total violation vb (Deb 2000, §3;
// Deb et al. 2002, §IV):
//
//	va = 0 and vb > 0,           or
//	va > 0, vb > 0 and va < vb,  or
//	va = vb = 0 and a ≺ b.
//
// Violations come from TotalViolation; +Inf marks a failed evaluation,
// which dominates nothing and is dominated by every evaluated point.
func ConstrainedDominates(a []float64, va float64, b []float64, vb float64) bool {
	switch {
	case va == 0 && vb == 0:
		return Dominates(a, b)
	case va == 0:
		return true
	case vb == 0:
		return false
	default:
		return va < vb
	}
}

// TotalViolation returns Σ max(0, v_k), the total constraint violation of
// Deb (2000). A NaN or +Inf violation gives +Inf.
func TotalViolation(viol []float64) float64 {
	var sum float64
	for _, v := range viol {
		if math.IsNaN(v) {
			return math.Inf(1)
		}
		if v > 0 {
			sum += v
		}
	}
	return sum
}

// compareConstrained returns −1 if a constrained-dominates b, 1 if b
// constrained-dominates a, and 0 otherwise, in one pass over the
// objectives.
func compareConstrained(a []float64, va float64, b []float64, vb float64) int {
	switch {
	case va == 0 && vb == 0:
		if len(a) != len(b) {
			panic(ErrShape)
		}
		aBetter, bBetter := false, false
		for j := range a {
			if a[j] < b[j] {
				aBetter = true
			} else if b[j] < a[j] {
				bBetter = true
			}
		}
		switch {
		case aBetter && !bBetter:
			return -1
		case bBetter && !aBetter:
			return 1
		}
		return 0
	case va == 0:
		return -1
	case vb == 0:
		return 1
	case va < vb:
		return -1
	case vb < va:
		return 1
	}
	return 0
}
