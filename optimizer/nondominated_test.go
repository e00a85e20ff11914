package optimizer

import (
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// TestConstrainedDominates checks the three rules of constrained
// domination of Deb (2000), §3 (as restated by Deb et al. 2002, §IV,
// Definition 1).
func TestConstrainedDominates(t *testing.T) {
	t.Parallel()
	inf := math.Inf(1)
	cases := []struct {
		name string
		a    []float64
		va   float64
		b    []float64
		vb   float64
		want bool
	}{
		{"both feasible, a dominates", []float64{1, 2}, 0, []float64{2, 2}, 0, true},
		{"both feasible, b dominates", []float64{2, 2}, 0, []float64{1, 2}, 0, false},
		{"both feasible, incomparable", []float64{1, 3}, 0, []float64{2, 2}, 0, false},
		{"both feasible, equal", []float64{1, 2}, 0, []float64{1, 2}, 0, false},
		{"feasible beats infeasible with better objectives", []float64{9, 9}, 0, []float64{0, 0}, 0.1, true},
		{"infeasible loses to feasible", []float64{0, 0}, 0.1, []float64{9, 9}, 0, false},
		{"smaller violation wins", []float64{9, 9}, 0.1, []float64{0, 0}, 0.2, true},
		{"larger violation loses", []float64{0, 0}, 0.2, []float64{9, 9}, 0.1, false},
		{"equal violations, neither", []float64{0, 0}, 0.2, []float64{9, 9}, 0.2, false},
		{"failed loses to infeasible", []float64{0, 0}, inf, []float64{9, 9}, 5, false},
		{"infeasible beats failed", []float64{9, 9}, 5, []float64{math.NaN(), math.NaN()}, inf, true},
		{"two failed, neither", []float64{math.NaN(), math.NaN()}, inf, []float64{math.NaN(), math.NaN()}, inf, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			if got := ConstrainedDominates(tc.a, tc.va, tc.b, tc.vb); got != tc.want {
				t.Errorf("got %v, want %v", got, tc.want)
			}
		})
	}
}

func TestTotalViolation(t *testing.T) {
	t.Parallel()
	cases := []struct {
		viol []float64
		want float64
	}{
		{nil, 0},
		{[]float64{0, -3, 0}, 0},
		{[]float64{0.5, -3, 0.25}, 0.75},
		{[]float64{0.5, math.NaN()}, math.Inf(1)},
		{[]float64{math.Inf(1)}, math.Inf(1)},
	}
	for _, tc := range cases {
		if got := TotalViolation(tc.viol); got != tc.want {
			t.Errorf("TotalViolation(%v) = %v, want %v", tc.viol, got, tc.want)
		}
	}
}

// TestNonDominatedSortHand checks fronts worked out by hand from the
// definitions of Deb et al. (2002), §III-A.
func TestNonDominatedSortHand(t *testing.T) {
	t.Parallel()
	inf := math.Inf(1)
	cases := []struct {
		name string
		obj  [][]float64
		viol []float64
		want [][]int
	}{
		{
			// A(1,5) B(2,3) C(3,4) D(4,1) E(5,5) F(2,4): A, B, D are
			// dominated by nobody; F only by B; C by B and F; E by all.
			name: "six points",
			obj:  [][]float64{{1, 5}, {2, 3}, {3, 4}, {4, 1}, {5, 5}, {2, 4}},
			want: [][]int{{0, 1, 3}, {5}, {2}, {4}},
		},
		{
			name: "duplicates share a front",
			obj:  [][]float64{{1, 1}, {2, 2}, {1, 1}},
			want: [][]int{{0, 2}, {1}},
		},
		{
			name: "three objectives",
			obj:  [][]float64{{1, 2, 3}, {3, 2, 1}, {2, 2, 2}, {3, 3, 3}},
			want: [][]int{{0, 1, 2}, {3}},
		},
		{
			// Feasible points first by Pareto rank, then infeasible ones by
			// total violation, failed evaluations last; objectives of
			// infeasible points do not matter.
			name: "constrained",
			obj:  [][]float64{{5, 5}, {0, 0}, {1, 1}, {6, 6}, {math.NaN(), math.NaN()}, {2, 9}, {9, 2}},
			viol: []float64{0, 0.5, 0.2, 0, inf, 0.2, inf},
			want: [][]int{{0}, {3}, {2, 5}, {1}, {4, 6}},
		},
		{name: "empty", obj: nil, want: nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			if got := NonDominatedSort(tc.obj, tc.viol); !reflect.DeepEqual(got, tc.want) {
				t.Errorf("got %v, want %v", got, tc.want)
			}
		})
	}
}

// TestNonDominatedSortLaws checks, on random sets, the properties that
// define the fronts: every point is in one front; no point dominates
// another of its own front; every point of front k > 1 is dominated by
// some point of front k − 1.
func TestNonDominatedSortLaws(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(7, 8))
	for trial := range 50 {
		m := 2 + trial%2
		pts := randomPoints(rng, 40, m, trial%2 == 0)
		fronts := NonDominatedSort(pts, nil)
		var all []int
		for k, f := range fronts {
			all = append(all, f...)
			for _, p := range f {
				for _, q := range f {
					if Dominates(pts[p], pts[q]) {
						t.Fatalf("trial %d: %d dominates %d in front %d", trial, p, q, k)
					}
				}
				if k > 0 && !slices.ContainsFunc(fronts[k-1], func(q int) bool { return Dominates(pts[q], pts[p]) }) {
					t.Fatalf("trial %d: %d in front %d not dominated by front %d", trial, p, k, k-1)
				}
			}
		}
		slices.Sort(all)
		for i, p := range all {
			if p != i {
				t.Fatalf("trial %d: fronts do not partition the points: %v", trial, all)
			}
		}
	}
}
