package optimizer

import (
	"math"
	"testing"
)

// fractionWithin reports whether an observed fraction k/n is within z
// binomial standard errors of p.
func fractionWithin(k, n int, p, z float64) bool {
	return math.Abs(float64(k)/float64(n)-p) <= z*math.Sqrt(p*(1-p)/float64(n))
}

// TestSBXSpreadLaw checks the SBX spread-factor distribution of Deb &
// Agrawal (1995), eq. for P(β): far from the bounds (α = 2) the children of
// parents y1, y2 have spread β = |c2 − c1| / |y2 − y1| with
//
//	F(β) = ½ β^(η+1) for β ≤ 1,  F(β) = 1 − ½ β^−(η+1) for β > 1.
//
// Observed fractions must lie within 4 binomial standard errors.
func TestSBXSpreadLaw(t *testing.T) {
	t.Parallel()
	const (
		draws = 200_000
		eta   = 20.0
		z     = 4 // standard errors; false failure probability 6×10⁻⁵ per check
	)
	bounds := []Bound{{-1e6, 1e6}}
	rng := streamRand(11, 0, 0, 0)
	checks := []float64{0.8, 0.95, 1, 1.03, 1.1}
	below := make([]int, len(checks))
	crossed, sumErr := 0, 0.0
	for range draws {
		a, b := []float64{0.3}, []float64{0.7}
		if !sbx(a, b, bounds, eta, rng) {
			continue
		}
		crossed++
		beta := math.Abs(a[0]-b[0]) / 0.4
		for i, c := range checks {
			if beta <= c {
				below[i]++
			}
		}
		sumErr = max(sumErr, math.Abs(a[0]+b[0]-1))
	}
	if !fractionWithin(crossed, draws, 0.5, z) {
		t.Errorf("%d of %d genes crossed, want half", crossed, draws)
	}
	for i, c := range checks {
		want := 0.5 * math.Pow(c, eta+1)
		if c > 1 {
			want = 1 - 0.5*math.Pow(c, -(eta+1))
		}
		if !fractionWithin(below[i], crossed, want, z) {
			t.Errorf("F(%v) observed %.4f, want %.4f", c, float64(below[i])/float64(crossed), want)
		}
	}
	// Without truncation SBX keeps the parents' mean; 1e-15 is a few ulps
	// of the sum 1.
	if sumErr > 1e-15 {
		t.Errorf("children's sum differs from the parents' by %g", sumErr)
	}
}

// TestSBXBounds checks that children stay in the box for parents anywhere
// in it, including on the bounds.
func TestSBXBounds(t *testing.T) {
	t.Parallel()
	bounds := []Bound{{0, 1}, {-2, 3}, {5, 5}}
	rng := streamRand(12, 0, 0, 0)
	for range 100_000 {
		a := []float64{rng.Float64(), -2 + 5*rng.Float64(), 5}
		b := []float64{rng.Float64(), 3, 5}
		if rng.Intn(4) == 0 {
			a[0] = 0
		}
		sbx(a, b, bounds, 2, rng)
		for i := range a {
			for _, v := range []float64{a[i], b[i]} {
				if !(v >= bounds[i].Lo && v <= bounds[i].Hi) {
					t.Fatalf("gene %d = %v outside %v", i, v, bounds[i])
				}
			}
		}
	}
}

// TestPolynomialMutationLaw checks the bounded polynomial mutation of Deb &
// Deb (2014) at x = 0.5 in [0, 1] (δ1 = δ2 = ½): half the mutants lie below
// x, and P(x' ≤ 0.5 + q) for q < 0 is the u that gives δq = q,
//
//	u = ((1+q)^(η+1) − ½^(η+1)) / (2 (1 − ½^(η+1))),
//
// by inverting the formula in polyMutate; and at x = lo, mutants never go
// below lo. Fractions must lie within 4 binomial standard errors.
func TestPolynomialMutationLaw(t *testing.T) {
	t.Parallel()
	const (
		draws = 200_000
		eta   = 20.0
		z     = 4
	)
	bounds := []Bound{{0, 1}}
	rng := streamRand(13, 0, 0, 0)
	qs := []float64{-0.2, -0.05, -0.01}
	below := make([]int, len(qs))
	lower := 0
	for range draws {
		x := []float64{0.5}
		polyMutate(x, bounds, 1, eta, rng)
		if x[0] < 0.5 {
			lower++
		}
		for i, q := range qs {
			if x[0] <= 0.5+q {
				below[i]++
			}
		}
		y := []float64{0}
		polyMutate(y, bounds, 1, eta, rng)
		if y[0] < 0 || y[0] > 1 {
			t.Fatalf("mutant %v outside [0, 1]", y[0])
		}
	}
	if !fractionWithin(lower, draws, 0.5, z) {
		t.Errorf("%d of %d mutants below x, want half", lower, draws)
	}
	c := math.Pow(0.5, eta+1)
	for i, q := range qs {
		want := (math.Pow(1+q, eta+1) - c) / (2 * (1 - c))
		if !fractionWithin(below[i], draws, want, z) {
			t.Errorf("P(x' ≤ %v) observed %.4f, want %.4f", 0.5+q, float64(below[i])/draws, want)
		}
	}
}

// TestMutationProbability checks that each gene mutates with probability
// p_m, within 4 binomial standard errors, and that p_m = 0 changes nothing.
func TestMutationProbability(t *testing.T) {
	t.Parallel()
	const genes, rounds = 10, 20_000
	bounds := make([]Bound, genes)
	for i := range bounds {
		bounds[i] = Bound{0, 1}
	}
	rng := streamRand(14, 0, 0, 0)
	changed := 0
	for range rounds {
		x := make([]float64, genes)
		for i := range x {
			x[i] = 0.25 + 0.5*rng.Float64()
		}
		y := append([]float64(nil), x...)
		polyMutate(y, bounds, 0.1, 20, rng)
		for i := range x {
			if x[i] != y[i] {
				changed++
			}
		}
		if polyMutate(y, bounds, 0, 20, rng) {
			t.Fatal("p_m = 0 mutated a gene")
		}
	}
	if !fractionWithin(changed, genes*rounds, 0.1, 4) {
		t.Errorf("%d of %d genes mutated, want 10%%", changed, genes*rounds)
	}
}
