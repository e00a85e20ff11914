package optimizer

import (
	"fmt"
	"math"
)

// Bound is the closed interval [Lo, Hi] of one gene, in the gene's own unit.
// Lo == Hi fixes the gene.
type Bound struct{ Lo, Hi float64 }

// Problem is what the search evaluates.
//
// Implementations must be safe for concurrent use and pure: the same x
// gives the same output, bit for bit, whichever goroutine asks and in
// whatever order. Evaluate must not modify or retain x, obj or viol.
type Problem interface {
	// Bounds returns the box of the genes; its length is the number of
	// genes. It is read once, when a Search is made.
	Bounds() []Bound
	// NumObjectives returns the number of minimised objectives, 1 to 3.
	NumObjectives() int
	// NumConstraints returns the number of constraints, 0 or more.
	NumConstraints() int
	// Evaluate fills obj (all minimised) and viol (constraint violations,
	// 0 = satisfied, >0 = amount violated; a negative value is read as 0).
	// An error, or a NaN or infinite objective or violation, marks the
	// individual infeasible with that reason; it never aborts the run.
	Evaluate(x []float64, obj, viol []float64) error
}

// MaxObjectives is the largest number of objectives the search accepts;
// the hypervolume is exact up to it.
const MaxObjectives = 3

// problemShape is what a Search reads from a Problem once and keeps.
type problemShape struct {
	bounds []Bound
	nObj   int
	nCon   int
}

// readProblem checks p and copies its shape.
func readProblem(p Problem) (problemShape, error) {
	if p == nil {
		return problemShape{}, &FieldError{Field: "Problem", Msg: "is nil"}
	}
	b := p.Bounds()
	if len(b) == 0 {
		return problemShape{}, &FieldError{Field: "Problem.Bounds", Msg: "has no genes"}
	}
	for i, bi := range b {
		if math.IsNaN(bi.Lo) || math.IsInf(bi.Lo, 0) || math.IsNaN(bi.Hi) || math.IsInf(bi.Hi, 0) {
			return problemShape{}, &FieldError{Field: fmt.Sprintf("Problem.Bounds[%d]", i), Msg: fmt.Sprintf("must be finite, got [%g, %g]", bi.Lo, bi.Hi)}
		}
		if bi.Lo > bi.Hi {
			return problemShape{}, &FieldError{Field: fmt.Sprintf("Problem.Bounds[%d]", i), Msg: fmt.Sprintf("has Lo %g above Hi %g", bi.Lo, bi.Hi)}
		}
	}
	m := p.NumObjectives()
	if m < 1 || m > MaxObjectives {
		return problemShape{}, &FieldError{Field: "Problem.NumObjectives", Msg: fmt.Sprintf("must be 1 to %d, got %d", MaxObjectives, m)}
	}
	c := p.NumConstraints()
	if c < 0 {
		return problemShape{}, &FieldError{Field: "Problem.NumConstraints", Msg: fmt.Sprintf("must not be negative, got %d", c)}
	}
	return problemShape{bounds: append([]Bound(nil), b...), nObj: m, nCon: c}, nil
}
