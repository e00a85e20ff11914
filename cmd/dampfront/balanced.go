package main

import (
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

// balancedIndex is the position of the balanced point of a front
// (model.Balanced), -1 for an empty front. The objectives of a stored
// front are finite and of one length (the server writes them so); a
// front that is not is taken as having no balanced point.
func balancedIndex(sols []*pb.Solution) int {
	b, err := plot.BalancedSolution(sols)
	if err != nil {
		return -1
	}
	return b
}
