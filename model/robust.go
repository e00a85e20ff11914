package model

import (
	"fmt"
	"math"
	"sync"
)

// robustSet is what makes a Problem robust: one problem per uncertain
// car, each on an evaluator of its own (built once per job, with its own
// response cache), and how their values are combined.
type robustSet struct {
	members []*Problem
	weights []float64 // sum to 1
	measure RobustMeasure
	k       float64
	scratch sync.Pool // *robustScratch
}

// robustScratch holds one evaluation's values: vals[j·nObj + i] is
// objective i on car j.
type robustScratch struct {
	vals, viol []float64
}

// RobustFigures are a setup's objective values over the uncertain cars:
// per objective, the weighted mean, standard deviation and worst (largest)
// value over the points.
type RobustFigures struct {
	Mean, SD, Worst []float64
}

// NewRobustProblem returns the robust form of nominal: the same genes,
// objectives and constraints, each setup evaluated on every car of
// evals (one per point, Perturbation.Apply of the nominal car, made with
// EvaluatorOptions.DampingReference the nominal car and the same cases),
// its objectives combined by u's measure with the points' weights, and
// each constraint's violation the worst over the cars: a limit (lift-off,
// bump-stop contact) must hold for the car that runs, whichever it is,
// and a mean of violations would let a bad car hide behind good ones.
// Normalised objectives keep the nominal problem's reference values, so
// that every car is measured in the same units.
//
// Score on the result is the nominal car's scoring, EvaluateGenes the
// robust one; Robust reports the spread.
func NewRobustProblem(nominal *Problem, u *Uncertainty, points []UncertainPoint, evals []*Evaluator) (*Problem, error) {
	if len(points) != len(evals) || len(points) == 0 {
		panic(fmt.Sprintf("model: %d uncertain points for %d evaluators", len(points), len(evals)))
	}
	rs := &robustSet{measure: u.Measure, k: u.K}
	for j, e := range evals {
		if e.Cases() != nominal.eval.Cases() || e.TransientCases() != nominal.eval.TransientCases() {
			panic("model: an uncertain car's evaluator has other cases than the nominal one")
		}
		rs.members = append(rs.members, newMemberProblem(nominal, e))
		rs.weights = append(rs.weights, points[j].Weight)
	}
	nObj, nCon := nominal.NumObjectives(), nominal.NumConstraints()
	rs.scratch.New = func() any {
		return &robustScratch{vals: make([]float64, len(evals)*nObj), viol: make([]float64, nCon)}
	}
	s := newMemberProblem(nominal, nominal.eval)
	s.robust = rs
	return s, nil
}

// newMemberProblem is nominal's problem on evaluator e, sharing its
// reference values.
func newMemberProblem(nominal *Problem, e *Evaluator) *Problem {
	s := &Problem{eval: e, design: nominal.design, genes: nominal.genes, objectives: nominal.objectives,
		constraints: nominal.constraints, reference: nominal.reference}
	s.pool.New = func() any {
		return &Result{Cases: make([]CaseMetrics, e.Cases()), Transients: make([]TransientMetrics, e.TransientCases())}
	}
	return s
}

// IsRobust reports whether the problem evaluates setups over uncertain cars.
func (s *Problem) IsRobust() bool { return s.robust != nil }

// RobustPoints is the number of uncertain cars per setup, 0 for a
// nominal problem.
func (s *Problem) RobustPoints() int {
	if s.robust == nil {
		return 0
	}
	return len(s.robust.members)
}

// EvaluateRobust evaluates setup st on every uncertain car and writes the
// robust objectives to obj and the worst violations to viol; figures,
// when not nil, receive the spread (its slices are allocated when short).
// It panics on a nominal problem.
func (s *Problem) EvaluateRobust(st Setup, obj, viol []float64, figures *RobustFigures) error {
	rs := s.robust
	sc := rs.scratch.Get().(*robustScratch)
	defer rs.scratch.Put(sc)
	nObj := len(s.objectives)
	for j := range viol {
		viol[j] = 0
	}
	for j, m := range rs.members {
		r := m.pool.Get().(*Result)
		err := m.eval.Evaluate(st, r)
		if err == nil {
			m.Score(r, sc.vals[j*nObj:(j+1)*nObj], sc.viol)
		}
		m.pool.Put(r)
		if err != nil {
			return fmt.Errorf("uncertain car %d of %d: %w", j+1, len(rs.members), err)
		}
		for i, v := range sc.viol {
			if v > viol[i] || math.IsNaN(v) {
				viol[i] = v
			}
		}
	}
	for i := 0; i < nObj; i++ {
		mean, sd, worst := rs.spread(sc.vals, i, nObj)
		obj[i] = rs.combine(mean, sd, worst)
		if figures != nil {
			figures.grow(nObj)
			figures.Mean[i], figures.SD[i], figures.Worst[i] = mean, sd, worst
		}
	}
	return nil
}

// spread is objective i's weighted mean, standard deviation
// sqrt(Σ w_j (f_j - mean)²) and largest value over the cars (NaN when a
// value is NaN). The sums run in the cars' order, so a setup's figures
// are the same bits on every run.
func (rs *robustSet) spread(vals []float64, i, nObj int) (mean, sd, worst float64) {
	worst = math.Inf(-1)
	for j, w := range rs.weights {
		f := vals[j*nObj+i]
		mean += w * f
		if f > worst || math.IsNaN(f) {
			worst = f
		}
	}
	v := 0.0
	for j, w := range rs.weights {
		d := vals[j*nObj+i] - mean
		v += w * d * d
	}
	return mean, math.Sqrt(v), worst
}

// combine is the measure's objective from the spread (see RobustMeasure).
func (rs *robustSet) combine(mean, sd, worst float64) float64 {
	switch rs.measure {
	case RobustWorst:
		return worst
	case RobustMeanSD:
		return mean + rs.k*sd
	}
	return mean
}

func (f *RobustFigures) grow(n int) {
	if len(f.Mean) < n {
		f.Mean, f.SD, f.Worst = make([]float64, n), make([]float64, n), make([]float64, n)
	}
}
