package plot

import (
	"errors"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// BalancedSolution returns the position in sols of the balanced point of
// their objectives (model.Balanced), -1 when sols is empty. Field paths in
// its error read "solutions[i].objectives[j]".
func BalancedSolution(sols []*pb.Solution) (int, error) {
	z := make([][]float64, len(sols))
	for i, s := range sols {
		z[i] = s.GetObjectives()
	}
	b, err := model.Balanced(z)
	var ve *model.ValidationError
	if errors.As(err, &ve) {
		for k, p := range ve.Problems {
			// "objectives[i]..." -> "solutions[i].objectives..."
			i, rest, _ := strings.Cut(strings.TrimPrefix(p.Field, "objectives["), "]")
			ve.Problems[k].Field = "solutions[" + i + "].objectives" + rest
		}
	}
	return b, err
}
