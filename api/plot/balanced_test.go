package plot

import (
	"errors"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

func TestBalancedSolution(t *testing.T) {
	t.Parallel()
	// The hand-worked example of TestBalanced as solutions.
	var sols []*pb.Solution
	for _, z := range [][]float64{{1, 9}, {2, 5}, {4, 3}, {7, 2}, {9, 1}} {
		sols = append(sols, &pb.Solution{Objectives: z})
	}
	if got, err := BalancedSolution(sols); err != nil || got != 2 {
		t.Errorf("BalancedSolution = %d, %v; want 2, nil", got, err)
	}
	sols[3].Objectives = []float64{7}
	sols[1].Objectives = []float64{2, 1.0 / zero()}
	_, err := BalancedSolution(sols)
	var ve *model.ValidationError
	if !errors.As(err, &ve) || len(ve.Problems) != 2 ||
		ve.Problems[0].Field != "solutions[1].objectives[1]" || ve.Problems[1].Field != "solutions[3].objectives" {
		t.Errorf("error %v, want problems at solutions[1].objectives[1] and solutions[3].objectives", err)
	}
}

// zero is 0 at run time, so 1/zero() is +Inf without a constant division.
func zero() float64 { return 0 }
