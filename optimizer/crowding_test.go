package optimizer

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestCrowdingDistanceHand checks distances worked out by hand from Deb et
// al. (2002), §III-B: boundary points +Inf, interior points the sum over
// objectives of the normalised gap between their neighbours.
func TestCrowdingDistanceHand(t *testing.T) {
	t.Parallel()
	// crowdTol: each distance is a sum of two quotients of small integers.
	const crowdTol = 1e-15
	inf := math.Inf(1)
	cases := []struct {
		name  string
		obj   [][]float64
		front []int
		want  []float64
	}{
		{
			// (0,5) (1,3) (3,1) (6,0); f1 range 6, f2 range 5.
			// (1,3): (3−0)/6 + (5−1)/5 = 1.3; (3,1): (6−1)/6 + (3−0)/5.
			name:  "four points",
			obj:   [][]float64{{0, 5}, {1, 3}, {3, 1}, {6, 0}},
			front: []int{0, 1, 2, 3},
			want:  []float64{inf, 1.3, 5.0/6 + 0.6, inf},
		},
		{
			name:  "same front permuted",
			obj:   [][]float64{{0, 5}, {1, 3}, {3, 1}, {6, 0}},
			front: []int{2, 0, 3, 1},
			want:  []float64{5.0/6 + 0.6, inf, inf, 1.3},
		},
		{
			name:  "front of a subset",
			obj:   [][]float64{{0, 5}, {9, 9}, {1, 3}, {3, 1}, {6, 0}},
			front: []int{0, 2, 3, 4},
			want:  []float64{inf, 1.3, 5.0/6 + 0.6, inf},
		},
		{
			// The constant f2 adds nothing: only f1 gaps, (2−0)/4, (4−1)/4.
			name:  "constant objective",
			obj:   [][]float64{{0, 7}, {1, 7}, {2, 7}, {4, 7}},
			front: []int{0, 1, 2, 3},
			want:  []float64{inf, 0.5, 0.75, inf},
		},
		{
			name:  "two points",
			obj:   [][]float64{{0, 1}, {1, 0}},
			front: []int{0, 1},
			want:  []float64{inf, inf},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := make([]float64, len(tc.front))
			CrowdingDistance(got, tc.obj, tc.front)
			for k := range got {
				if !(got[k] == tc.want[k] || scalar.EqualWithinAbsOrRel(got[k], tc.want[k], crowdTol, crowdTol)) {
					t.Errorf("member %d: got %v, want %v", k, got[k], tc.want[k])
				}
			}
		})
	}
}
