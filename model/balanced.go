package model

import (
	"fmt"
	"math"
)

// Balanced returns the index of the balanced point of a set of objective
// vectors (each in the same order and units): every objective is scaled
// to [0, 1] over the set,
//
//	u_ij = (z_ij - min_k z_kj) / (max_k z_kj - min_k z_kj),
//
// and the point nearest the middle of the scaled box in the Euclidean norm,
//
//	argmin_i Σ_j (u_ij - 1/2)²,
//
// wins; ties go to the lower index. An objective with no spread scales to
// 0 everywhere and so does not change the choice. It returns -1 for an
// empty set, and a *ValidationError naming the element ("objectives[i]" or
// "objectives[i][j]") for vectors
// of unequal length or values that are not finite.
//
// On a two-objective front, which runs from (0, 1) to (1, 0) once scaled,
// this is the point that gives up about as much of each objective as the
// front allows: a presentation choice for the first setup to look at, not
// an optimum.
func Balanced(objectives [][]float64) (int, error) {
	return balanced(objectives, func(i, j int) string {
		if j < 0 {
			return fmt.Sprintf("objectives[%d]", i)
		}
		return fmt.Sprintf("objectives[%d][%d]", i, j)
	})
}

// balanced is Balanced with field paths from path (j < 0 names vector i).
func balanced(objectives [][]float64, path func(i, j int) string) (int, error) {
	if len(objectives) == 0 {
		return -1, nil
	}
	m := len(objectives[0])
	var probs []FieldError
	for i, z := range objectives {
		if len(z) != m {
			probs = append(probs, FieldError{Field: path(i, -1),
				Reason: fmt.Sprintf("has %d values, want %d like the first", len(z), m)})
			continue
		}
		for j, v := range z {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				probs = append(probs, FieldError{Field: path(i, j),
					Reason: fmt.Sprintf("must be a finite number, got %v", v)})
			}
		}
	}
	if len(probs) > 0 {
		return -1, &ValidationError{Problems: probs}
	}
	lo := make([]float64, m)
	hi := make([]float64, m)
	for j := range lo {
		lo[j], hi[j] = math.Inf(1), math.Inf(-1)
	}
	for _, z := range objectives {
		for j, v := range z {
			lo[j], hi[j] = math.Min(lo[j], v), math.Max(hi[j], v)
		}
	}
	best, bestD := -1, math.Inf(1)
	for i, z := range objectives {
		d := 0.0
		for j, v := range z {
			u := 0.0
			if hi[j] > lo[j] {
				u = (v - lo[j]) / (hi[j] - lo[j])
			}
			d += (u - 0.5) * (u - 0.5)
		}
		if d < bestD {
			best, bestD = i, d
		}
	}
	return best, nil
}
