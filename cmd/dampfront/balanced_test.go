package main

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

func solutions(objs ...[2]float64) []*pb.Solution {
	out := make([]*pb.Solution, len(objs))
	for i, o := range objs {
		out[i] = &pb.Solution{Index: int32(i), Objectives: o[:]}
	}
	return out
}

// The balanced point on fronts whose answer is worked by hand here.
func TestBalancedIndex(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name  string
		front []*pb.Solution
		want  int
	}{
		{"empty", nil, -1},
		{"one point", solutions([2]float64{0.08, 0.002}), 0},
		// A straight front f2 = 3e-3 - 0.01 f1 in trade-like units; after
		// normalisation the points are u1 = 0, 1/4, 1/2, 3/4, 1 on
		// u2 = 1 - u1, so the middle (1/2, 1/2) is point 2 itself.
		{"straight front, scales differ by 1e2", solutions(
			[2]float64{0.08, 2.2e-3}, [2]float64{0.09, 2.1e-3}, [2]float64{0.10, 2.0e-3},
			[2]float64{0.11, 1.9e-3}, [2]float64{0.12, 1.8e-3}), 2},
		// The convex front f1 f2 = 8 at f1 = 1, 2, 4, 8: normalised
		// u = (f - 1)/7 gives (0, 1), (1/7, 3/7), (3/7, 1/7), (1, 0).
		// Squared distances to (1/2, 1/2): 1/2, 13/98, 13/98, 1/2: a
		// tie between points 1 and 2, which goes to the lower index.
		{"convex front, tie", solutions([2]float64{1, 8}, [2]float64{2, 4}, [2]float64{4, 2}, [2]float64{8, 1}), 1},
		// Same, with point 2 nudged towards the middle: (3/7 + 0.01, ...)
		// has squared distance 13/98 - 0.00143 + 1e-4 < 13/98.
		{"convex front, nudged", solutions([2]float64{1, 8}, [2]float64{2, 4}, [2]float64{4.07, 2}, [2]float64{8, 1}), 2},
		// An objective without spread maps to 0 and does not choose.
		{"flat second objective", solutions([2]float64{1, 5}, [2]float64{2, 5}, [2]float64{3, 5}), 1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			if got := balancedIndex(tt.front); got != tt.want {
				t.Errorf("balancedIndex = %d, want %d", got, tt.want)
			}
		})
	}
}

// shownRows keeps the ends, the balanced point and about the asked number.
func TestShownRows(t *testing.T) {
	t.Parallel()
	tests := []struct {
		n, rows, balanced int
		want              []int
	}{
		{5, 0, 2, []int{0, 1, 2, 3, 4}},
		{5, 9, 2, []int{0, 1, 2, 3, 4}},
		// k (n-1)/(rows-1) for k = 0..3 with n = 10: 0, 3, 6, 9; plus 4.
		{10, 4, 4, []int{0, 3, 4, 6, 9}},
		{10, 1, 5, []int{0, 5}},
	}
	for _, tt := range tests {
		show := shownRows(tt.n, tt.rows, tt.balanced)
		var got []int
		for i, s := range show {
			if s {
				got = append(got, i)
			}
		}
		if len(got) != len(tt.want) {
			t.Errorf("shownRows(%d, %d, %d) = %v, want %v", tt.n, tt.rows, tt.balanced, got, tt.want)
			continue
		}
		for i := range got {
			if got[i] != tt.want[i] {
				t.Errorf("shownRows(%d, %d, %d) = %v, want %v", tt.n, tt.rows, tt.balanced, got, tt.want)
				break
			}
		}
	}
}
