package model

import (
	"fmt"
	"math"
)

// Objectives on the manoeuvre and kerb cases. Each is aggregated, like
// the road objectives, over the cases it applies to, with their weights
// (see Aggregation); the road objectives stay on the road cases.
const (
	// ObjectiveDriverResponse is TransientMetrics.Response on the
	// manoeuvre cases (-): how far roll and pitch stray from where the
	// springs would hold them, by overshoot or by lag. Under braking the
	// front dampers work in bump and the rear in rebound, on release the
	// reverse: the split of bump and rebound shows here.
	ObjectiveDriverResponse ObjectiveKind = iota + 101
	// ObjectiveTransientBalance is LLTDResponse.MaxDeviation on the
	// manoeuvre cases with a lateral input (-): how far the front share
	// of the lateral load transfer strays from its steady value while
	// the car rolls (the dampers move transfer between the axles).
	ObjectiveTransientBalance
	// ObjectiveKerbLoadLoss is Σ_i TransientMetrics.LoadLoss[i] on the
	// kerb cases (s): the load the four tyres lose below static over
	// the strike, in static-load seconds.
	ObjectiveKerbLoadLoss
)

// Constraints on the manoeuvre and kerb cases, over every such case and
// corner.
const (
	// ConstraintUnloadedTime limits TransientMetrics.TimeBelow (s): the
	// time a tyre carries less than the set fraction of its static load.
	ConstraintUnloadedTime ConstraintKind = iota + 101
	// ConstraintStopTime limits TransientMetrics.BumpStopTime (s).
	ConstraintStopTime
)

func init() {
	objectiveNames[ObjectiveDriverResponse] = "driver_response"
	objectiveNames[ObjectiveTransientBalance] = "transient_balance"
	objectiveNames[ObjectiveKerbLoadLoss] = "kerb_load_loss"
	constraintNames[ConstraintUnloadedTime] = "unloaded_time"
	constraintNames[ConstraintStopTime] = "stop_time"
}

// OnTransients reports whether the objective is taken on the manoeuvre
// and kerb cases.
func (k ObjectiveKind) OnTransients() bool {
	return k == ObjectiveDriverResponse || k == ObjectiveTransientBalance || k == ObjectiveKerbLoadLoss
}

// OnTransients reports whether the constraint is taken on the manoeuvre
// and kerb cases.
func (k ConstraintKind) OnTransients() bool {
	return k == ConstraintUnloadedTime || k == ConstraintStopTime
}

// transientUnit is the SI unit of a transient objective's value.
func (k ObjectiveKind) transientUnit() string {
	if k == ObjectiveKerbLoadLoss {
		return "s"
	}
	return "-"
}

// transientObjective is objective o's value on one transient case, and
// whether it applies there.
func transientObjective(o *Objective, m *TransientMetrics) (float64, bool) {
	switch o.Kind {
	case ObjectiveDriverResponse:
		return m.Response, m.Kind == KindManoeuvre
	case ObjectiveTransientBalance:
		return m.LLTD.MaxDeviation, m.Kind == KindManoeuvre && m.LLTD.Defined
	case ObjectiveKerbLoadLoss:
		s := 0.0
		for _, l := range m.LoadLoss {
			s += l
		}
		return s, m.Kind == KindKerb
	}
	return math.NaN(), false
}

// caseValue is objective o's value on case c of r and the case's weight:
// road case c for a road objective, transient case c for the others; ok
// is false where the objective does not apply.
func (s *Problem) caseValue(o *Objective, r *Result, c int) (v, w float64, ok bool) {
	if o.Kind.OnTransients() {
		v, ok = transientObjective(o, &r.Transients[c])
		return v, s.eval.transients[c].weight, ok
	}
	return caseObjective(o, &r.Cases[c]), s.eval.cases[c].rc.weight(), true
}

// caseCount is the number of cases objective o is read on (some may not
// apply, see caseValue).
func caseCount(o *Objective, r *Result) int {
	if o.Kind.OnTransients() {
		return len(r.Transients)
	}
	return len(r.Cases)
}

// transientWorst is the largest value a transient constraint limits over
// every transient case and corner, and the first case where it is
// reached (an index into Result.Transients).
func transientWorst(c *Constraint, r *Result) (worst float64, at int) {
	for k := range r.Transients {
		m := &r.Transients[k]
		vals := &m.TimeBelow
		if c.Kind == ConstraintStopTime {
			vals = &m.BumpStopTime
		}
		for _, v := range vals {
			if math.IsNaN(v) {
				return v, k
			}
			if v > worst {
				worst, at = v, k
			}
		}
	}
	return worst, at
}

// checkTransientObjectives refuses an objective on the transient cases
// that none of the evaluator's cases gives, naming it.
func checkTransientObjectives(e *Evaluator, objectives []Objective) error {
	var p problems
	for j, o := range objectives {
		if !o.Kind.OnTransients() {
			continue
		}
		found := false
		for _, c := range e.transients {
			switch o.Kind {
			case ObjectiveKerbLoadLoss:
				found = found || c.kind == KindKerb
			case ObjectiveTransientBalance:
				found = found || (c.kind == KindManoeuvre && !math.IsNaN(c.lltdSS))
			default:
				found = found || c.kind == KindManoeuvre
			}
		}
		if !found {
			need := "a manoeuvre case"
			switch o.Kind {
			case ObjectiveKerbLoadLoss:
				need = "a kerb case"
			case ObjectiveTransientBalance:
				need = "a manoeuvre case with a lateral input"
			}
			p.add(fmt.Sprintf("objectives[%d].kind", j), "%s needs %s, and the job has none", o.Kind, need)
		}
	}
	return p.err()
}
