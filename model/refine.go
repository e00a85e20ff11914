package model

import (
	"fmt"
	"math"
)

// Refinement of a setup's objectives and constraints on the nonlinear car:
// the time-domain check (Verify) gives every road-case metric with its
// statistical error, and the objectives and constraints are read from
// those metrics as the search reads them from the linear ones.
//
// Statistical error of a refined value. Each row of the check carries the
// statistical error of its time-domain value (Verify: σ/(2 sqrt(B_e T))
// for a standard deviation, Bendat & Piersol 2010 ch. 8; the batch-means
// error for a mean shift). A per-case value g(m_1, m_2, ...) of several
// metrics gets, to first order, the error
//
//	e_g = Σ_i |∂g/∂m_i| e_i,
//
// the bound sd(Σ a_i X_i) ≤ Σ |a_i| sd(X_i) that holds whatever the
// correlation of the metrics of one run (the triangle inequality of the
// standard deviation, Minkowski's inequality). The road cases are
// independent runs (case i draws its road from the stream (seed, i)), so
// the aggregate f(g_1, g_2, ...) over the cases takes
//
//	e_f = sqrt(Σ_c (∂f/∂g_c e_c)²),
//
// and the worst-case aggregation the error of its worst case. A
// constraint's value (the worst corner and case) takes the error of the
// row where the worst is reached. The errors of Verify are upper bounds
// for a linear car, so these are too.

// RefineSource says where a refined objective or constraint comes from.
type RefineSource int

const (
	// RefineTimeDomain: recomputed from the time-domain metrics, with
	// their statistical error.
	RefineTimeDomain RefineSource = iota + 1
	// RefineLinear: no time-domain counterpart (the aero outputs, the
	// modal ratios, the reference points): the linear value is kept, and
	// its error is 0 by convention.
	RefineLinear
	// RefineTransient: read on the manoeuvre and kerb cases, already on
	// the nonlinear time-domain model: unchanged, error 0.
	RefineTransient
)

func (s RefineSource) String() string {
	switch s {
	case RefineTimeDomain:
		return "time_domain"
	case RefineLinear:
		return "linear"
	case RefineTransient:
		return "transient"
	}
	return fmt.Sprintf("refine_source(%d)", int(s))
}

// Refined is a setup's objectives and constraints on the nonlinear car.
type Refined struct {
	Objectives      []float64 // in each objective's SI unit
	ObjectiveErrors []float64 // statistical error of each, same unit; 0 unless RefineTimeDomain
	ObjectiveSource []RefineSource
	// Violations are max(0, value/limit - 1) as the search scores them,
	// on the time-domain metrics where the constraint has a counterpart.
	Violations      []float64
	ViolationErrors []float64 // statistical error of value/limit (-)
	ViolationSource []RefineSource
	// FeasibilityUnsettled is set when some time-domain constraint's
	// value/limit - 1 lies within sigmas of its statistical errors of 0:
	// whether the setup meets it is not settled by the record.
	FeasibilityUnsettled bool
}

// objectiveHasTime reports whether a road objective has a time-domain
// counterpart: the time-domain metrics have no aero outputs.
func objectiveHasTime(k ObjectiveKind) bool {
	return k != ObjectiveDownforce && k != ObjectiveBalance
}

// constraintHasTime reports whether a road constraint has one: the modal
// ratios and the reference points are the linear model's.
func constraintHasTime(k ConstraintKind) bool {
	return k == ConstraintLiftOff || k == ConstraintBumpStop || k == ConstraintTravel || k == ConstraintJacking
}

// Refine reads the problem's objectives and constraints from the
// time-domain check rep of a setup (Verify on the problem's car and road
// cases, in their order), with their statistical errors (see above).
// linearObj and linearViol are the setup's linear values (Score), kept
// where there is no time-domain counterpart or the value is already from
// the nonlinear transient cases. sigmas is the number of statistical
// errors within which a constraint's feasibility counts as unsettled.
func (s *Problem) Refine(rep *VerifyReport, linearObj, linearViol []float64, sigmas float64) (*Refined, error) {
	if len(rep.Cases) != len(s.eval.cases) || len(linearObj) != len(s.objectives) || len(linearViol) != len(s.constraints) {
		return nil, fmt.Errorf("refine: %d checked cases, %d objectives, %d violations for a problem of %d cases, %d objectives, %d constraints",
			len(rep.Cases), len(linearObj), len(linearViol), len(s.eval.cases), len(s.objectives), len(s.constraints))
	}
	r := &Result{Setup: rep.Setup, Cases: make([]CaseMetrics, len(rep.Cases))}
	for c := range rep.Cases {
		r.Cases[c] = rep.Cases[c].Time.CaseMetrics
	}
	out := &Refined{}
	for j := range s.objectives {
		o := &s.objectives[j]
		v, e, src := linearObj[j], 0.0, RefineLinear
		switch {
		case o.Kind.OnTransients():
			src = RefineTransient
		case objectiveHasTime(o.Kind):
			v, e, src = s.ObjectiveValue(j, r), s.objectiveError(j, r, rep), RefineTimeDomain
		}
		out.Objectives = append(out.Objectives, v)
		out.ObjectiveErrors = append(out.ObjectiveErrors, e)
		out.ObjectiveSource = append(out.ObjectiveSource, src)
	}
	for j := range s.constraints {
		c := &s.constraints[j]
		v, e, src := linearViol[j], 0.0, RefineLinear
		switch {
		case c.Kind.OnTransients():
			src = RefineTransient
		case constraintHasTime(c.Kind):
			worst, werr := constraintWorstError(c, rep)
			q := worst/c.Limit - 1
			v, e, src = math.Max(0, q), werr/c.Limit, RefineTimeDomain
			if e > 0 && math.Abs(q) <= sigmas*e {
				out.FeasibilityUnsettled = true
			}
		}
		out.Violations = append(out.Violations, v)
		out.ViolationErrors = append(out.ViolationErrors, e)
		out.ViolationSource = append(out.ViolationSource, src)
	}
	return out, nil
}

// rowError is the statistical error of a row of a checked case, 0 when
// the check has no such row or no finite error for it.
func rowError(vc *VerifyCase, metric string) float64 {
	r, ok := vc.Row(metric)
	if !ok || !r.Judged() {
		return 0
	}
	return r.StatError
}

// objectiveError is the statistical error of road objective j on the
// time-domain metrics r of the check rep (see the comment at the top).
func (s *Problem) objectiveError(j int, r *Result, rep *VerifyReport) float64 {
	o := &s.objectives[j]
	n := len(r.Cases)
	g := make([]float64, n)  // per-case values
	eg := make([]float64, n) // their errors
	var wsum float64
	worst := 0
	for c := 0; c < n; c++ {
		g[c] = caseObjective(o, &r.Cases[c])
		eg[c] = caseObjectiveError(o, &r.Cases[c], &rep.Cases[c])
		wsum += s.eval.cases[c].rc.weight()
		if g[c] > g[worst] {
			worst = c
		}
	}
	f := s.ObjectiveValue(j, r)
	var sum float64
	for c := 0; c < n; c++ {
		w := s.eval.cases[c].rc.weight()
		var d float64 // ∂f/∂g_c
		switch o.Aggregation {
		case AggregateWorst:
			if c != worst {
				continue
			}
			d = 1
		case AggregateNormalised:
			// f = F_ref S, S = sqrt(Σ w (g/r)²/W): ∂f/∂g_c = F_ref w_c g_c/(r_c² W S),
			// and F_ref/S = F_ref²/f.
			ref := s.reference[j][c]
			fref := f / math.Sqrt(normalisedSquare(s, j, r, wsum))
			d = fref * fref * w * g[c] / (ref * ref * wsum * f)
		default:
			// f = sqrt(Σ w g²/W): ∂f/∂g_c = w_c g_c/(W f).
			d = w * g[c] / (wsum * f)
		}
		if f == 0 {
			d = 0
		}
		sum += d * eg[c] * d * eg[c]
	}
	return math.Sqrt(sum)
}

// normalisedSquare is S² = Σ_c w_c (g_c/r_c)²/W of a normalised objective.
func normalisedSquare(s *Problem, j int, r *Result, wsum float64) float64 {
	o := &s.objectives[j]
	var sum float64
	for c := range r.Cases {
		q := caseObjective(o, &r.Cases[c]) / s.reference[j][c]
		sum += s.eval.cases[c].rc.weight() * q * q
	}
	return sum / wsum
}

// caseObjectiveError is Σ_i |∂g/∂m_i| e_i of a road objective's per-case
// value g (caseObjective) on the time-domain metrics m of checked case
// vc.
func caseObjectiveError(o *Objective, m *CaseMetrics, vc *VerifyCase) float64 {
	g := caseObjective(o, m)
	if !(g > 0) {
		return 0
	}
	// ride is the error contribution of one axle's platform term
	// σ² + d², d = shift - target: |σ| e_σ + |d| e_d, times ∂g/∂(σ²+d²)·2.
	ride := func(ax int) float64 {
		d := m.RideHeightShift[ax] - o.TargetShift[ax]
		return math.Abs(m.RideHeightSD[ax])*rowError(vc, axleMetric("ride_height_sd_m", ax)) +
			math.Abs(d)*rowError(vc, axleMetric("ride_height_shift_m", ax))
	}
	switch o.Kind {
	case ObjectiveGrip:
		// g = sqrt(Σ r_i²/4), r_i = σ_i/F_i: ∂g/∂r_i = r_i/(4g).
		e := 0.0
		for i, r := range m.TyreLoadSDRel {
			e += math.Abs(r) / (4 * g) * rowError(vc, cornerMetric("tyre_load_sd_n", i)) / m.StaticTyreLoad[i]
		}
		return e
	case ObjectivePlatform:
		// g = sqrt((P_f + P_r)/2): ∂g/∂σ = σ/(2g), ∂g/∂d = d/(2g).
		return (ride(Front) + ride(Rear)) / (2 * g)
	case ObjectiveFrontPlatform:
		return ride(Front) / g
	case ObjectiveRearPlatform:
		return ride(Rear) / g
	case ObjectivePitch:
		return rowError(vc, "pitch_sd_rad")
	case ObjectiveRoll:
		return rowError(vc, "roll_sd_rad")
	case ObjectiveHeaveAccel:
		return rowError(vc, "heave_accel_sd_m_per_s2")
	}
	return 0
}

// constraintWorstError is the largest value a road constraint limits over
// every checked case and corner on the time-domain metrics, and the
// statistical error of the row where it is first reached.
func constraintWorstError(c *Constraint, rep *VerifyReport) (worst, err float64) {
	for k := range rep.Cases {
		vc := &rep.Cases[k]
		m := &vc.Time.CaseMetrics
		take := func(v float64, metric string) {
			if v > worst {
				worst, err = v, rowError(vc, metric)
			}
		}
		for i := 0; i < 4; i++ {
			switch c.Kind {
			case ConstraintLiftOff:
				take(m.LiftOffProbability[i], cornerMetric("lift_off_fraction", i))
			case ConstraintBumpStop:
				take(m.BumpStopProbability[i], cornerMetric("bump_stop_fraction", i))
				if i < 2 {
					take(m.PackerProbability[i], axleMetric("packer_fraction", i))
				}
			case ConstraintTravel:
				take(m.TravelSD[i], cornerMetric("travel_sd_m", i))
			case ConstraintJacking:
				if i < 2 {
					take(math.Abs(m.RideHeightShift[i]), axleMetric("ride_height_shift_m", i))
				}
			}
		}
	}
	return worst, err
}
