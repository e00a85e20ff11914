package model

import "math"

// Unit returns the SI unit of the value the constraint limits.
func (k ConstraintKind) Unit() string {
	if k == ConstraintTravel || k == ConstraintJacking {
		return "m"
	}
	if k.OnTransients() {
		return "s"
	}
	return "-"
}

// Shortfall is how far an evaluated setup is from meeting one constraint.
type Shortfall struct {
	Constraint Constraint
	// Worst is the largest value the constraint limits over every case
	// and corner, in the constraint's unit (ConstraintKind.Unit).
	Worst float64
	// Case is the index of the road case where Worst is reached (the
	// first such case); of the manoeuvre or kerb case (Result.Transients)
	// for a constraint on them (ConstraintKind.OnTransients).
	Case int
	// Over is Worst − Limit, in the constraint's unit; ≤ 0 when met. For
	// a modal-ratio band Worst is the ratio farthest outside it and Over
	// its distance outside, max(Worst − Limit, Lower − Worst).
	Over float64
	// Violation is max(0, Worst/Limit − 1), what the search minimises.
	Violation float64
}

// Shortfalls returns, for every constraint in order, how far the result
// is from meeting it.
func (s *Problem) Shortfalls(r *Result) []Shortfall {
	out := make([]Shortfall, len(s.constraints))
	for j, c := range s.constraints {
		sf := Shortfall{Constraint: c}
		if c.Kind == ConstraintModalRatio {
			// Worst is the ratio where the band is missed most, Over how
			// far outside the band it lies.
			sf.Violation, sf.Worst, sf.Case = bandWorst(&s.constraints[j], r)
			sf.Over = math.Max(sf.Worst-c.Limit, c.Lower-sf.Worst)
			out[j] = sf
			continue
		}
		sf.Worst, sf.Case = constraintWorst(&s.constraints[j], r)
		sf.Over = sf.Worst - c.Limit
		sf.Violation = math.Max(0, sf.Worst/c.Limit-1)
		out[j] = sf
	}
	return out
}
