package model

import (
	"fmt"
	"math"
)

// Aggregation combines a per-case objective g_c over the road cases with
// their weights w_c.
type Aggregation int

const (
	// AggregateMeanSquare is the weighted root mean square,
	//
	//	f = sqrt(Σ_c w_c g_c² / Σ_c w_c).
	//
	// Case c makes the share w_c g_c² / Σ w g² of f²: the roughest case
	// counts most.
	AggregateMeanSquare Aggregation = iota
	// AggregateWorst is max_c g_c: the worst case alone.
	AggregateWorst
	// AggregateNormalised weighs every case by its change relative to a
	// reference setup (see Problem.SetReference), whose per-case values
	// are r_c:
	//
	//	f = F_ref · sqrt(Σ_c w_c (g_c/r_c)² / Σ_c w_c),
	//	F_ref = sqrt(Σ_c w_c r_c² / Σ_c w_c).
	//
	// Case c makes the share w_c (g_c/r_c)² / Σ w (g/r)² of f², so at the
	// reference setup each case makes w_c/Σ w whatever its roughness. F_ref
	// keeps f in the objective's unit and equal to the mean square at the
	// reference; it scales f by a constant, so the front is the one of the
	// mean of the squared ratios.
	AggregateNormalised
)

var aggregationNames = map[Aggregation]string{
	AggregateMeanSquare: "mean_square", AggregateWorst: "worst", AggregateNormalised: "normalised",
}

func (a Aggregation) String() string {
	if n, ok := aggregationNames[a]; ok {
		return n
	}
	return fmt.Sprintf("aggregation(%d)", int(a))
}

// Middle returns the setup at the middle of every gene's bounds, the
// default reference of normalised objectives.
func (d *DesignSpace) Middle() Setup {
	genes := d.Genes()
	x := make([]float64, len(genes))
	for i, g := range genes {
		x[i] = (g.Min + g.Max) / 2
	}
	return d.Decode(x)
}

// normalises reports whether any objective is normalised.
func (s *Problem) normalises() bool {
	for _, o := range s.objectives {
		if o.Aggregation == AggregateNormalised {
			return true
		}
	}
	return false
}

// SetReference evaluates ref and makes its per-case values the reference
// of the normalised objectives. NewProblem sets the middle of the design
// space (DesignSpace.Middle); call SetReference before the problem is used
// to set another. Every normalised objective must be finite and > 0 on
// every case at the reference, or the error names the objective and case.
func (s *Problem) SetReference(ref Setup) error {
	var p problems
	var r Result
	if err := s.eval.Evaluate(ref, &r); err != nil {
		p.add("reference_setup", "cannot be evaluated: %v", err)
		return p.err()
	}
	table := make([][]float64, len(s.objectives))
	for j := range s.objectives {
		o := &s.objectives[j]
		if o.Aggregation != AggregateNormalised {
			continue
		}
		table[j] = make([]float64, caseCount(o, &r))
		for c := range table[j] {
			v, _, ok := s.caseValue(o, &r, c)
			if !ok {
				continue
			}
			if !(v > 0) || math.IsInf(v, 0) {
				p.add(fmt.Sprintf("objectives[%d].aggregation", j), "normalised %s needs the reference setup's value on every case > 0, got %g on %q", o.Kind, v, caseName(&r, o, c))
			}
			table[j][c] = v
		}
	}
	if err := p.err(); err != nil {
		return err
	}
	s.reference = table
	return nil
}

// ObjectiveValue returns objective j's value for an evaluated result.
func (s *Problem) ObjectiveValue(j int, r *Result) float64 {
	o := &s.objectives[j]
	n := caseCount(o, r)
	switch o.Aggregation {
	case AggregateWorst:
		worst := math.Inf(-1)
		for c := 0; c < n; c++ {
			if v, _, ok := s.caseValue(o, r, c); ok {
				worst = math.Max(worst, v)
			}
		}
		return worst
	case AggregateNormalised:
		ref := s.reference[j]
		var sum, refSum, wsum float64
		for c := 0; c < n; c++ {
			v, w, ok := s.caseValue(o, r, c)
			if !ok {
				continue
			}
			q := v / ref[c]
			sum += w * q * q
			refSum += w * ref[c] * ref[c]
			wsum += w
		}
		return math.Sqrt(refSum/wsum) * math.Sqrt(sum/wsum)
	}
	var sum, wsum float64
	for c := 0; c < n; c++ {
		v, w, ok := s.caseValue(o, r, c)
		if !ok {
			continue
		}
		sum += w * v * v
		wsum += w
	}
	return math.Sqrt(sum / wsum)
}

// CaseShares returns, for objective j and an evaluated result, the share
// of each case it is read on (the road cases; Result.Transients for an
// objective on them, 0 where it does not apply) in the objective's
// square under its aggregation (see
// Aggregation): fractions summing to 1; for the worst case, 1 for the
// worst case and 0 for the others.
func (s *Problem) CaseShares(j int, r *Result) []float64 {
	o := &s.objectives[j]
	out := make([]float64, caseCount(o, r))
	var sum, most float64
	worst := -1
	for c := range out {
		g, w, ok := s.caseValue(o, r, c)
		if !ok {
			continue
		}
		if worst < 0 || g > most {
			worst, most = c, g
		}
		if o.Aggregation == AggregateNormalised {
			g /= s.reference[j][c]
		}
		out[c] = w * g * g
		sum += out[c]
	}
	for c := range out {
		if o.Aggregation == AggregateWorst {
			out[c] = 0
			if c == worst {
				out[c] = 1
			}
			continue
		}
		out[c] /= sum
	}
	return out
}

// caseName names case c of objective o's cases.
func caseName(r *Result, o *Objective, c int) string {
	if o.Kind.OnTransients() {
		return r.Transients[c].Case
	}
	return r.Cases[c].Case
}
