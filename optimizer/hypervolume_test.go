package optimizer

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// hvTol is for hand cases whose exact value is a short sum of products of
// small binary fractions: only rounding of a few operations remains.
const hvTol = 1e-12

// TestHypervolumeHand checks small cases computed by hand (inclusion-
// exclusion of the boxes [p, r]).
func TestHypervolumeHand(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		pts  [][]float64
		ref  []float64
		want float64
	}{
		// 1-D: r − min.
		{"1D", [][]float64{{3}, {1}, {2}}, []float64{4}, 3},
		// Staircase (1,3), (2,2), (3,1) under (4,4): slabs y∈[3,4]: 3,
		// y∈[2,3]: 2, y∈[1,2]: 1.
		{"2D staircase", [][]float64{{1, 3}, {2, 2}, {3, 1}}, []float64{4, 4}, 6},
		// A dominated point (3,3) and a duplicate add nothing.
		{"2D dominated and duplicate", [][]float64{{1, 3}, {2, 2}, {3, 1}, {3, 3}, {2, 2}}, []float64{4, 4}, 6},
		// Points on or beyond the reference add nothing.
		{"2D outside", [][]float64{{1, 3}, {4, 0}, {0, 5}, {math.NaN(), 0}}, []float64{4, 4}, 3},
		// Equal f1: only the lower one counts: (1,1) box 3·3.
		{"2D equal f1", [][]float64{{1, 2}, {1, 1}}, []float64{4, 4}, 9},
		// One box 1·2·3.
		{"3D single", [][]float64{{0, 0, 0}}, []float64{1, 2, 3}, 6},
		// Boxes 2·2·1 and 1·1·2 overlapping in [1,2]³: 4 + 2 − 1.
		{"3D two", [][]float64{{0, 0, 1}, {1, 1, 0}}, []float64{2, 2, 2}, 5},
		// Unit vectors under (2,2,2): three boxes of 4, pairwise overlaps
		// of 2, triple overlap 1: 12 − 6 + 1.
		{"3D three", [][]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}, []float64{2, 2, 2}, 7},
		// Same with a dominated point and one outside.
		{"3D three plus", [][]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {1, 1, 1}, {0, 0, 2}}, []float64{2, 2, 2}, 7},
		// Equal f1 and f3 in 3-D: (0,1,0) is dominated by (0,0,0).
		{"3D equal coordinates", [][]float64{{0, 1, 0}, {0, 0, 0}}, []float64{1, 2, 1}, 2},
		// A later point in f3 removing two staircase corners: (0,2,0) and
		// (2,0,0) under (3,3,2) cover 3 + 3 − 1 = 5 for z∈[0,1]; (0,0,1)
		// covers 9 for z∈[1,2].
		{"3D corners replaced", [][]float64{{0, 2, 0}, {2, 0, 0}, {0, 0, 1}}, []float64{3, 3, 2}, 14},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			if got := Hypervolume(tc.pts, tc.ref); !scalar.EqualWithinAbsOrRel(got, tc.want, hvTol, hvTol) {
				t.Errorf("got %v, want %v", got, tc.want)
			}
		})
	}
}

// cellHypervolume is an independent exact hypervolume for small sets: the
// coordinates of the points and the reference cut the box into cells, and
// a cell counts when its lower corner is weakly dominated by a point.
// O(n^(M+1)); for checks only.
func cellHypervolume(pts [][]float64, ref []float64) float64 {
	m := len(ref)
	axes := make([][]float64, m)
	for j := range m {
		axes[j] = []float64{ref[j]}
		for _, p := range pts {
			if p[j] < ref[j] {
				axes[j] = append(axes[j], p[j])
			}
		}
		slices.Sort(axes[j])
		axes[j] = slices.Compact(axes[j])
	}
	var vol float64
	idx := make([]int, m)
	corner := make([]float64, m)
	for {
		size := 1.0
		for j := range m {
			corner[j] = axes[j][idx[j]]
			if idx[j]+1 >= len(axes[j]) {
				size = 0
			} else {
				size *= axes[j][idx[j]+1] - corner[j]
			}
		}
		if size > 0 {
			for _, p := range pts {
				in := true
				for j := range m {
					if !(p[j] <= corner[j]) {
						in = false
						break
					}
				}
				if in {
					vol += size
					break
				}
			}
		}
		j := 0
		for ; j < m; j++ {
			idx[j]++
			if idx[j] < len(axes[j]) {
				break
			}
			idx[j] = 0
		}
		if j == m {
			return vol
		}
	}
}

// randomPoints returns n points with coordinates on a coarse grid of
// multiples of 1/8 in [0, 1) (so that ties in every coordinate occur) or
// uniform, from a seeded source.
func randomPoints(rng *rand.Rand, n, m int, coarse bool) [][]float64 {
	pts := make([][]float64, n)
	for i := range pts {
		pts[i] = make([]float64, m)
		for j := range m {
			if coarse {
				pts[i][j] = float64(rng.IntN(8)) / 8
			} else {
				pts[i][j] = rng.Float64()
			}
		}
	}
	return pts
}

// TestHypervolumeCells compares with the cell decomposition on random sets
// in 2-D and 3-D, with ties (coarse grid) and without, and checks that the
// result is bit-identical under permutation of the points.
func TestHypervolumeCells(t *testing.T) {
	t.Parallel()
	// cellTol: both sums add at most a few hundred products of numbers in
	// [0, 1], so they agree to rounding.
	const cellTol = 1e-12
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 200 {
		m := 2 + trial%2
		n := 1 + rng.IntN(12)
		pts := randomPoints(rng, n, m, trial%4 < 2)
		ref := make([]float64, m)
		for j := range ref {
			ref[j] = 1
		}
		got := Hypervolume(pts, ref)
		want := cellHypervolume(pts, ref)
		if !scalar.EqualWithinAbsOrRel(got, want, cellTol, cellTol) {
			t.Fatalf("trial %d: %d points in %d-D: got %v, cells give %v", trial, n, m, got, want)
		}
		rng.Shuffle(len(pts), func(i, j int) { pts[i], pts[j] = pts[j], pts[i] })
		if again := Hypervolume(pts, ref); math.Float64bits(again) != math.Float64bits(got) {
			t.Fatalf("trial %d: permuted points give %v, not %v", trial, again, got)
		}
	}
}

// TestHypervolumeMonteCarlo compares the 3-D sweep on 300 points near a
// sphere with a seeded Monte Carlo estimate: S uniform samples in the box
// [0, r]³; the fraction p̂ dominated has binomial standard error
// √(p(1−p)/S), and the test allows 4 standard errors (a false failure
// probability of 6×10⁻⁵ for a fresh seed).
func TestHypervolumeMonteCarlo(t *testing.T) {
	t.Parallel()
	const samples = 400_000
	rng := rand.New(rand.NewPCG(3, 4))
	pts := make([][]float64, 300)
	for i := range pts {
		a, b := rng.Float64()*math.Pi/2, rng.Float64()*math.Pi/2
		r := 1 + 0.2*rng.Float64()
		pts[i] = []float64{r * math.Cos(a) * math.Cos(b), r * math.Cos(a) * math.Sin(b), r * math.Sin(a)}
	}
	ref := []float64{1.3, 1.2, 1.1}
	box := ref[0] * ref[1] * ref[2]
	hits := 0
	for range samples {
		x := []float64{rng.Float64() * ref[0], rng.Float64() * ref[1], rng.Float64() * ref[2]}
		for _, p := range pts {
			if p[0] <= x[0] && p[1] <= x[1] && p[2] <= x[2] {
				hits++
				break
			}
		}
	}
	p := float64(hits) / samples
	se := box * math.Sqrt(p*(1-p)/samples)
	got := Hypervolume(pts, ref)
	t.Logf("sweep %.6f, Monte Carlo %.6f ± %.6f", got, p*box, se)
	if math.Abs(got-p*box) > 4*se {
		t.Errorf("sweep %v, Monte Carlo %v, more than 4 standard errors (%v) apart", got, p*box, se)
	}
}

// TestHypervolumeDimensions checks that a 3-D set in the plane f3 = 0 has
// the 2-D hypervolume times r3 (the sweep has one slab).
func TestHypervolumeDimensions(t *testing.T) {
	t.Parallel()
	const tol = 1e-12 // one extra multiplication by r3
	rng := rand.New(rand.NewPCG(5, 6))
	pts2 := randomPoints(rng, 50, 2, false)
	pts3 := make([][]float64, len(pts2))
	for i, p := range pts2 {
		pts3[i] = []float64{p[0], p[1], 0}
	}
	h2 := Hypervolume(pts2, []float64{1, 1})
	h3 := Hypervolume(pts3, []float64{1, 1, 2.5})
	if !scalar.EqualWithinAbsOrRel(h3, 2.5*h2, tol, tol) {
		t.Errorf("3-D %v, 2.5 × 2-D %v", h3, 2.5*h2)
	}
}

func TestHypervolumePanics(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		pts  [][]float64
		ref  []float64
	}{
		{"no objectives", nil, nil},
		{"four objectives", nil, []float64{1, 1, 1, 1}},
		{"short point", [][]float64{{0}}, []float64{1, 1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			defer func() {
				if r := recover(); r != ErrShape {
					t.Errorf("recovered %v, want ErrShape", r)
				}
			}()
			Hypervolume(tc.pts, tc.ref)
		})
	}
}
