package optimizer

import (
	"context"
	"fmt"
	"math"
	"slices"
	"testing"
)

// zdt is one of the ZDT benchmark problems of E. Zitzler, K. Deb and
// L. Thiele, "Comparison of multiobjective evolutionary algorithms:
// empirical results", Evolutionary Computation 8(2):173-195, 2000,
// doi:10.1162/106365600568202, §4 (T1, T2, T3), with n genes in [0, 1]:
//
//	f1 = x1,  g = 1 + 9/(n−1) Σ_{i=2..n} x_i,  f2 = g h(f1, g),
//	ZDT1: h = 1 − √(f1/g),
//	ZDT2: h = 1 − (f1/g)²,
//	ZDT3: h = 1 − √(f1/g) − (f1/g) sin(10π f1).
//
// The Pareto-optimal front is g = 1: f2 = h(f1, 1), the non-dominated part
// of it for ZDT3.
type zdt struct {
	n int
	h func(f1, g float64) float64
}

func (z zdt) Bounds() []Bound {
	b := make([]Bound, z.n)
	for i := range b {
		b[i] = Bound{0, 1}
	}
	return b
}
func (zdt) NumObjectives() int  { return 2 }
func (zdt) NumConstraints() int { return 0 }
func (z zdt) Evaluate(x, obj, _ []float64) error {
	var s float64
	for _, v := range x[1:] {
		s += v
	}
	g := 1 + 9*s/float64(z.n-1)
	obj[0] = x[0]
	obj[1] = g * z.h(x[0], g)
	return nil
}

func zdt1H(f1, g float64) float64 { return 1 - math.Sqrt(f1/g) }
func zdt2H(f1, g float64) float64 { return 1 - (f1/g)*(f1/g) }
func zdt3H(f1, g float64) float64 {
	return 1 - math.Sqrt(f1/g) - f1/g*math.Sin(10*math.Pi*f1)
}

// sampledFront is a sample of an analytic front, sorted by f1 with f2
// strictly falling.
type sampledFront struct{ f1, f2 []float64 }

// analyticFront samples the Pareto-optimal front of a ZDT problem at
// f1 = t², t = k/(n−1), k = 0…n−1 (denser where ZDT1's and ZDT3's fronts
// are steep), and keeps the non-dominated samples.
func analyticFront(h func(f1, g float64) float64, n int) sampledFront {
	var s sampledFront
	low := math.Inf(1)
	for k := range n {
		t := float64(k) / float64(n-1)
		f1, f2 := t*t, h(t*t, 1)
		if f2 < low { // sorted by f1, so lower f2 than all before = non-dominated
			s.f1, s.f2 = append(s.f1, f1), append(s.f2, f2)
			low = f2
		}
	}
	return s
}

// frontSamples is the sample size of the analytic fronts. With
// Δt = 10⁻⁶ consecutive samples are at most 6.5×10⁻⁵ apart (ZDT3's
// steepest part, |d f2/dt| ≤ 1 + 2 + 20π), so a nearest-sample distance
// overstates the distance to the curve by at most 3.3×10⁻⁵.
const frontSamples = 1_000_001

// meanDistance is the generational distance with p = 1 of D. A. Van
// Veldhuizen and G. B. Lamont, "On measuring multiobjective evolutionary
// algorithm performance", Proc. 2000 Congress on Evolutionary Computation,
// pp. 204-211, doi:10.1109/CEC.2000.870296, (1/|A|) Σ_a min_r ‖a − r‖, with
// the analytic front represented by its samples (the convergence metric Υ
// of Deb et al. 2002, §V-B, with a denser sample). The search for the
// nearest sample scans outward in f1 and stops once |Δf1| exceeds the best
// distance found.
func meanDistance(front []Solution, ref sampledFront) float64 {
	var sum float64
	for _, s := range front {
		a := s.Objectives
		i, _ := slices.BinarySearch(ref.f1, a[0])
		best := math.Inf(1)
		for j := i; j < len(ref.f1) && ref.f1[j]-a[0] < best; j++ {
			best = min(best, math.Hypot(ref.f1[j]-a[0], ref.f2[j]-a[1]))
		}
		for j := i - 1; j >= 0 && a[0]-ref.f1[j] < best; j-- {
			best = min(best, math.Hypot(ref.f1[j]-a[0], ref.f2[j]-a[1]))
		}
		sum += best
	}
	return sum / float64(len(front))
}

func objectives(sols []Solution) [][]float64 {
	pts := make([][]float64, len(sols))
	for i, s := range sols {
		pts[i] = s.Objectives
	}
	return pts
}

// TestZDT runs NSGA-II with the settings of Deb et al. (2002), §V (N = 100,
// p_c = 0.9, η_c = η_m = 20, p_m = 1/n, n = 30 genes), for 250 generations
// (25 000 evaluations, the budget of Deb et al. 2002) on ZDT1-3 and
// compares the archive with the analytic front: its hypervolume against
// (1, 1) as a fraction of the analytic front's, and its mean distance to
// the analytic front.
//
// Analytic hypervolumes against (1, 1): ZDT1 ∫₀¹ √f1 df1 = 2/3, ZDT2
// ∫₀¹ f1² df1 = 1/3 (closed form from the front f2 = 1 − √f1, 1 − f1²);
// ZDT3 has no closed form and is computed here numerically from 10⁶
// samples of its analytic front (zdt3Hypervolume: 1.044425, error below
// 1.3×10⁻⁵).
//
// The thresholds leave margin below what seeds 1-3 reach (0.993-0.999 of
// the hypervolume, mean distance 3×10⁻⁴-1.2×10⁻³); they are this test's
// pass marks, not published figures.
//
// The same runs with VariationDifferential (DE/rand/1/bin, F = 0.5, in
// place of SBX) use CR = 0.2: the ZDT problems are separable, where DE
// wants a small CR (Storn & Price 1997, from memory; with CR = 1, the
// damper default, ZDT1 reaches 0.59-0.83 of the hypervolume in the same
// budget). Their marks are looser, again below what seeds 1-3 reach
// (0.979-0.994 of the hypervolume, mean distance 1.5×10⁻³-3.9×10⁻³).
func TestZDT(t *testing.T) {
	t.Parallel()
	variations := []struct {
		v           Variation
		cr          float64
		minFraction float64 // of the analytic hypervolume
		maxDistance float64 // mean distance to the analytic front, objective units
	}{
		{VariationSBX, 0, 0.98, 2e-3},
		{VariationDifferential, 0.2, 0.975, 5e-3},
	}
	zdt3, zdt3Err := zdt3Hypervolume()
	cases := []struct {
		name  string
		h     func(f1, g float64) float64
		exact float64
	}{
		{"ZDT1", zdt1H, 2.0 / 3},
		{"ZDT2", zdt2H, 1.0 / 3},
		{"ZDT3", zdt3H, zdt3},
	}
	for _, tc := range cases {
		ref := analyticFront(tc.h, frontSamples)
		for _, vc := range variations {
			minFraction, maxDistance := vc.minFraction, vc.maxDistance
			for _, seed := range []uint64{1, 2, 3} {
				t.Run(fmt.Sprintf("%s/%v/seed%d", tc.name, vc.v, seed), func(t *testing.T) {
					t.Parallel()
					s := withVariation(DefaultSettings(30), vc.v)
					if vc.v == VariationDifferential {
						s.DifferentialCrossover = vc.cr
					}
					s.Seed = seed
					s.ReferencePoint = []float64{1, 1}
					st := mustNew(t, zdt{n: 30, h: tc.h}, s)
					if err := st.Run(context.Background()); err != nil {
						t.Fatal(err)
					}
					front := st.Front()
					hv := Hypervolume(objectives(front), s.ReferencePoint)
					frac := hv / tc.exact
					gd := meanDistance(front, ref)
					t.Logf("seed %d: %d evaluations, %d archive points, hypervolume %.6f of %.6f (%.4f), mean distance %.2e",
						seed, st.Evaluations(), len(front), hv, tc.exact, frac, gd)
					if frac < minFraction {
						t.Errorf("hypervolume fraction %.4f, want >= %v", frac, minFraction)
					}
					if gd > maxDistance {
						t.Errorf("mean distance to the analytic front %.3g, want <= %v", gd, maxDistance)
					}
					if h := st.History(); h[len(h)-1].Hypervolume != hv {
						t.Errorf("last progress hypervolume %v, archive's %v", h[len(h)-1].Hypervolume, hv)
					}
				})
			}
		}
	}
	if zdt3Err > 2e-5 { // far below the 2% margin of minFraction
		t.Errorf("ZDT3 reference hypervolume uncertain by %g", zdt3Err)
	}
}

// zdt3Hypervolume returns the hypervolume against (1, 1) of ZDT3's analytic
// front from its samples, summed directly as the slabs
// (1 − f1_k)(f2_{k−1} − f2_k) of the staircase (f2_0 = 1), and a bound on its
// error: the samples lie on the front, so the sum is below the true value,
// and the region missed between consecutive samples is at most
// Σ Δf1 |Δf2|.
func zdt3Hypervolume() (hv, bound float64) {
	s := analyticFront(zdt3H, frontSamples)
	prev := 1.0
	for k := range s.f1 {
		if s.f2[k] < 1 {
			hv += (1 - s.f1[k]) * (prev - s.f2[k])
			prev = s.f2[k]
		}
		if k > 0 {
			bound += (s.f1[k] - s.f1[k-1]) * math.Abs(s.f2[k]-s.f2[k-1])
		}
	}
	return hv, bound
}

// TestDTLZ2 runs NSGA-II on the three-objective DTLZ2 (problems_test.go),
// exercising the 3-D archive and hypervolume. The front is the positive
// octant of the unit sphere, so against (1, 1, 1) its hypervolume is the
// unit cube less the octant of the unit ball, 1 − π/6, and the distance of
// a point f ≥ 0 to it is |‖f‖ − 1|. Thresholds are this test's pass marks,
// below what the run reaches (0.965 of the hypervolume, mean distance
// 6×10⁻³: the archive keeps every point nothing seen dominates, and in three
// objectives many near-front points stay so).
func TestDTLZ2(t *testing.T) {
	t.Parallel()
	const (
		minFraction = 0.95
		maxDistance = 1e-2
	)
	s := DefaultSettings(12)
	s.Generations = 250
	s.ReferencePoint = []float64{1, 1, 1}
	st := mustNew(t, dtlz2{n: 12}, s)
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	front := st.Front()
	exact := 1 - math.Pi/6
	hv := Hypervolume(objectives(front), s.ReferencePoint)
	var gd float64
	for _, sol := range front {
		f := sol.Objectives
		gd += math.Abs(math.Sqrt(f[0]*f[0]+f[1]*f[1]+f[2]*f[2]) - 1)
	}
	gd /= float64(len(front))
	t.Logf("%d evaluations, %d archive points, hypervolume %.6f of %.6f (%.4f), mean distance %.2e",
		st.Evaluations(), len(front), hv, exact, hv/exact, gd)
	if hv/exact < minFraction {
		t.Errorf("hypervolume fraction %.4f, want >= %v", hv/exact, minFraction)
	}
	if gd > maxDistance {
		t.Errorf("mean distance %.3g, want <= %v", gd, maxDistance)
	}
}

// withVariation returns s with variation v and, for the differential
// one, its default F and CR.
func withVariation(s Settings, v Variation) Settings {
	s.Variation = v
	if v == VariationDifferential {
		s.DifferentialWeight, s.DifferentialCrossover = DefaultDifferentialWeight, DefaultDifferentialCrossover
	}
	return s
}
