package model

import (
	"errors"
	"math"
	"testing"
)

func TestBalanced(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		z    [][]float64
		want int
	}{
		// Worked by hand: both objectives span 1..9, so u = (z - 1)/8:
		// (0, 1), (0.125, 0.5), (0.375, 0.25), (0.75, 0.125), (1, 0), at
		// squared distances from (1/2, 1/2) of 0.5, 0.140625, 0.078125,
		// 0.203125, 0.5: the third point wins.
		{"hand-worked", [][]float64{{1, 9}, {2, 5}, {4, 3}, {7, 2}, {9, 1}}, 2},
		// The same points shuffled: the winner moves with its point.
		{"shuffled", [][]float64{{7, 2}, {9, 1}, {4, 3}, {1, 9}, {2, 5}}, 2},
		// Scaling an objective (units: % instead of a fraction, mm instead
		// of m) does not change u, so not the choice.
		{"scaled", [][]float64{{100, 9000}, {200, 5000}, {400, 3000}, {700, 2000}, {900, 1000}}, 2},
		// The two ends are equally far from the middle: the lower index wins.
		{"tie", [][]float64{{0, 1}, {1, 0}}, 0},
		// No spread in the second objective: it adds 1/4 to every point,
		// and the first decides: u = 0, 0.4, 1, nearest 1/2 is 0.4.
		{"flat objective", [][]float64{{0, 3}, {2, 3}, {5, 3}}, 1},
		// Three objectives, worked by hand: the first two span 0..4, the
		// third 1..4, so u = (0, 1, 1/3), (1/2, 1/2, 0), (1, 0, 1) at
		// squared distances 0.528, 0.25, 0.75: the second wins.
		{"three objectives", [][]float64{{0, 4, 2}, {2, 2, 1}, {4, 0, 4}}, 1},
		{"single", [][]float64{{3, 3}}, 0},
		{"empty", nil, -1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got, err := Balanced(tc.z)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("Balanced = %d, want %d", got, tc.want)
			}
		})
	}
}

// Unequal vectors and values that are not finite are named, every one.
func TestBalancedRejectsBadVectors(t *testing.T) {
	t.Parallel()
	_, err := Balanced([][]float64{{1, 2}, {1, math.NaN()}, {3, 4}, {5}})
	var ve *ValidationError
	if !errors.As(err, &ve) || len(ve.Problems) != 2 ||
		ve.Problems[0].Field != "objectives[1][1]" || ve.Problems[1].Field != "objectives[3]" {
		t.Errorf("got %v; want objectives[1][1] and objectives[3] named", err)
	}
}
