package optimizer

// Solution is one evaluated point of the design space.
type Solution struct {
	// Genes are the decision variables, in the order of Problem.Bounds.
	Genes []float64
	// Objectives are the minimised objective values, in the problem's
	// units. NaN for every objective when the evaluation failed.
	Objectives []float64
	// Violations are the constraint violations, 0 where satisfied, +Inf
	// for every constraint when the evaluation failed.
	Violations []float64
	// Feasible is true when the evaluation succeeded and every violation
	// is 0.
	Feasible bool
	// Reason says why an infeasible solution is infeasible; empty when
	// feasible.
	Reason string
}

// Progress is the state of a search after one generation.
type Progress struct {
	// Generation is the number of generations completed; 0 is the
	// initial population.
	Generation int
	// Evaluations is the number of calls of Problem.Evaluate so far.
	Evaluations int
	// Hypervolume is the hypervolume of the archive against the
	// reference point (product of the objectives' units); 0 while there
	// is no reference point or no feasible point.
	Hypervolume float64
	// Best holds the lowest value of each objective in the archive; nil
	// while the archive is empty.
	Best []float64
}

func (p Progress) clone() Progress {
	if p.Best != nil {
		p.Best = append([]float64(nil), p.Best...)
	}
	return p
}

func (s Solution) clone() Solution {
	return Solution{
		Genes:      append([]float64(nil), s.Genes...),
		Objectives: append([]float64(nil), s.Objectives...),
		Violations: append([]float64(nil), s.Violations...),
		Feasible:   s.Feasible,
		Reason:     s.Reason,
	}
}
