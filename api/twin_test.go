package api

import (
	"slices"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// split is a solution whose setup has the given front and rear bump and
// rebound ratios.
func split(fb, fr, rb, rr float64) *pb.Solution {
	return &pb.Solution{Setup: &pb.Setup{
		Front: &pb.AxleDamping{BumpRatio: fb, ReboundRatio: fr, KneeBumpMPerS: 0.05, KneeReboundMPerS: 0.05},
		Rear:  &pb.AxleDamping{BumpRatio: rb, ReboundRatio: rr, KneeBumpMPerS: 0.05, KneeReboundMPerS: 0.05},
	}}
}

// The same-sum twin keeps each axle's sum and the rest of the damper
// (hand-worked: (1.2 + 0.4)/2 = 0.8, (0.9 + 0.3)/2 = 0.6, exact in binary
// to the last bit of the sums); the picks are the balanced point first,
// then the largest splits Σ|bump − rebound| (1.4, 0.6, 0.2 by hand).
func TestSameSumTwinAndSplitPicks(t *testing.T) {
	t.Parallel()
	s := split(1.2, 0.4, 0.9, 0.3)
	twin, err := SameSumTwin(s.GetSetup())
	if err != nil {
		t.Fatal(err)
	}
	f, r := twin.GetFront(), twin.GetRear()
	if f.GetBumpRatio() != (1.2+0.4)/2 || f.GetReboundRatio() != f.GetBumpRatio() || r.GetBumpRatio() != (0.9+0.3)/2 ||
		r.GetReboundRatio() != r.GetBumpRatio() || f.GetKneeBumpMPerS() != 0.05 || r.GetKneeReboundMPerS() != 0.05 {
		t.Errorf("twin %v of %v", twin, s.GetSetup())
	}
	if _, err := SameSumTwin(split(-1, 0.5, 0.5, 0.5).GetSetup()); err == nil {
		t.Error("a setup with a negative ratio has a twin")
	}
	front := []*pb.Solution{split(0.5, 0.5, 0.5, 0.5), split(0.6, 0.5, 0.5, 0.4), s, split(0.8, 0.5, 0.5, 0.8), split(0.7, 0.7, 0.6, 0.6)}
	if got, want := SplitPicks(front, 4, 2), []int{4, 2, 3}; !slices.Equal(got, want) {
		t.Errorf("picks %v, want %v", got, want)
	}
	if got, want := SplitPicks(front, -1, 9), []int{2, 3, 1, 0, 4}; !slices.Equal(got, want) {
		t.Errorf("picks without a balanced point %v, want %v", got, want)
	}
}
