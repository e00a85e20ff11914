package model

import (
	"fmt"
	"math"
	"sync"
)

// ObjectiveKind names a per-case ride metric to minimise.
type ObjectiveKind int

const (
	// ObjectiveGrip is the RMS over the four corners of the normalised
	// tyre-load standard deviation, sqrt(mean_i (σ_Fi/F_static,i)²) (-).
	ObjectiveGrip ObjectiveKind = iota + 1
	// ObjectivePlatform is what the aero sees, both axles together:
	// sqrt(½ Σ_axles (σ_h² + (shift - target)²)) (m). The static offset
	// is needed: under statistical linearisation with equal knees and
	// high-speed factors every RMS metric depends on bump and rebound only
	// through c_eq, and only the mean shift tells the split apart.
	ObjectivePlatform
	// ObjectiveFrontPlatform is sqrt(σ_h² + (shift - target)²) at the front (m).
	ObjectiveFrontPlatform
	// ObjectiveRearPlatform is the same at the rear (m).
	ObjectiveRearPlatform
	// ObjectivePitch is the pitch standard deviation relative to the road (rad).
	ObjectivePitch
	// ObjectiveRoll is the roll standard deviation relative to the road (rad).
	ObjectiveRoll
	// ObjectiveHeaveAccel is the heave acceleration standard deviation (m/s²).
	ObjectiveHeaveAccel
	// ObjectiveDownforce is the downforce's variation about the operating
	// point, sqrt(σ_D² + ΔD²) (N): its standard deviation and its mean
	// change from jacking (CaseMetrics.DownforceSD, DownforceShift).
	//
	// How it relates to ObjectivePlatform: both are the ride heights'
	// standard deviation and jacking shift together, but the platform
	// weighs the two axles equally in metres and ignores how they move
	// together, while the downforce weighs them by the aero map's slopes
	// at speed and takes their covariance: σ_D² = kᵀ Σ_h k with
	// k = -1ᵀ K_a. Front and rear moving in phase (heave) add up; a
	// cross-term map can make them cancel. On a car without aero it is 0.
	ObjectiveDownforce
	// ObjectiveBalance is the aero balance's (front share of the
	// downforce) variation about the operating point, sqrt(σ_β² + Δβ²)
	// (-). It sees the part of the ride-height motion that moves the
	// balance: for a linear per-axle map whose axle stiffnesses are in
	// the ratio of the axle downforces it is pitch alone (heave leaves the
	// balance where it is), otherwise a mix that the map decides. The
	// jacking shift is in it for the reason given at ObjectivePlatform.
	ObjectiveBalance
)

var objectiveNames = map[ObjectiveKind]string{
	ObjectiveGrip: "grip", ObjectivePlatform: "platform", ObjectiveFrontPlatform: "front_platform",
	ObjectiveRearPlatform: "rear_platform", ObjectivePitch: "pitch", ObjectiveRoll: "roll",
	ObjectiveHeaveAccel: "heave_accel", ObjectiveDownforce: "downforce", ObjectiveBalance: "balance",
}

func (k ObjectiveKind) String() string {
	if n, ok := objectiveNames[k]; ok {
		return n
	}
	return fmt.Sprintf("objective(%d)", int(k))
}

// Unit returns the SI unit of the objective's value.
func (k ObjectiveKind) Unit() string {
	if k.OnTransients() {
		return k.transientUnit()
	}
	switch k {
	case ObjectiveGrip:
		return "-"
	case ObjectivePitch, ObjectiveRoll:
		return "rad"
	case ObjectiveHeaveAccel:
		return "m/s^2"
	case ObjectiveDownforce:
		return "N"
	case ObjectiveBalance:
		return "-"
	default:
		return "m"
	}
}

// Objective is one minimised quantity.
type Objective struct {
	Kind        ObjectiveKind
	Aggregation Aggregation
	// TargetShift is the wanted mean ride-height change per axle (m) for
	// the platform objectives; zero by default.
	TargetShift [2]float64
}

// ConstraintKind names a limit on the metrics.
type ConstraintKind int

const (
	// ConstraintLiftOff limits every tyre's lift-off probability (-).
	ConstraintLiftOff ConstraintKind = iota + 1
	// ConstraintBumpStop limits every corner's bump-stop contact
	// probability and every heave element's packer contact probability
	// (the packer is the heave element's bump stop) (-).
	ConstraintBumpStop
	// ConstraintTravel limits every corner's travel standard deviation (m).
	ConstraintTravel
	// ConstraintJacking limits |mean ride-height shift| at each axle (m).
	ConstraintJacking
	// ConstraintModalRatio keeps one mode's modal damping ratio at the
	// equivalent slopes (CaseMetrics.ModalDampingRatio) within a band
	// [Lower, Limit] on every case (-): a band, not only an upper limit.
	ConstraintModalRatio
	// ConstraintFloorContact limits every reference point's probability of
	// touching the ground (PointMetrics.ContactProbability) on every case
	// (-). The platform objective keeps the ride-height variation small on
	// average; this keeps the lowest points off the ground at the case
	// where they come nearest.
	ConstraintFloorContact
)

var constraintNames = map[ConstraintKind]string{
	ConstraintLiftOff: "lift_off", ConstraintBumpStop: "bump_stop", ConstraintTravel: "travel", ConstraintJacking: "jacking",
	ConstraintModalRatio: "modal_ratio", ConstraintFloorContact: "floor_contact",
}

func (k ConstraintKind) String() string {
	if n, ok := constraintNames[k]; ok {
		return n
	}
	return fmt.Sprintf("constraint(%d)", int(k))
}

// limitName names the plausible range of the kind's limit: a
// probability in (0, 1], a travel or a shift in metres.
func (k ConstraintKind) limitName() string {
	switch k {
	case ConstraintTravel:
		return "Constraint.travel_m"
	case ConstraintJacking:
		return "Constraint.jacking_m"
	case ConstraintModalRatio:
		return "Constraint.modal_ratio"
	case ConstraintUnloadedTime, ConstraintStopTime:
		return "Constraint.time_s"
	default:
		return "Constraint.probability"
	}
}

// Constraint is an upper limit on a metric, over every case and corner;
// a modal-ratio constraint is a band on one mode.
type Constraint struct {
	Kind  ConstraintKind
	Limit float64 // SI, in the plausible range of its kind (see ConstraintKind.limitName); the band's upper end for ConstraintModalRatio
	// Mode is the mode of a ConstraintModalRatio (index into ModeNames).
	Mode int
	// Lower is the band's lower end for ConstraintModalRatio (-), in
	// [0, Limit); 0 leaves only the upper end.
	Lower float64
}

// String names the constraint: its kind, and the mode of a band.
func (c Constraint) String() string {
	if c.Kind == ConstraintModalRatio && c.Mode >= 0 && c.Mode < nDOF {
		return fmt.Sprintf("%s ratio", ModeNames[c.Mode])
	}
	return c.Kind.String()
}

// bandWorst is a modal-ratio band's violation over the cases of r,
// max(0, worst case's bandViolation), with the ratio and the first case
// where it is reached.
func bandWorst(c *Constraint, r *Result) (viol, ratio float64, at int) {
	worst := math.Inf(-1)
	for i := range r.Cases {
		v := c.bandViolation(&r.Cases[i])
		if math.IsNaN(v) {
			return v, r.Cases[i].ModalDampingRatio[c.Mode], i
		}
		if v > worst {
			worst, at = v, i
		}
	}
	if len(r.Cases) > 0 {
		ratio = r.Cases[at].ModalDampingRatio[c.Mode]
	}
	return math.Max(0, worst), ratio, at
}

// bandViolation is a modal-ratio band's violation on one case:
// max(ζ/limit - 1, lower/ζ - 1), <= 0 inside the band.
func (c *Constraint) bandViolation(m *CaseMetrics) float64 {
	z := m.ModalDampingRatio[c.Mode]
	v := z/c.Limit - 1
	if c.Lower > 0 {
		v = math.Max(v, c.Lower/z-1)
	}
	return v
}

// caseObjective is the per-case value of an objective.
func caseObjective(o *Objective, m *CaseMetrics) float64 {
	plat := func(ax int) float64 {
		d := m.RideHeightShift[ax] - o.TargetShift[ax]
		return m.RideHeightSD[ax]*m.RideHeightSD[ax] + d*d
	}
	switch o.Kind {
	case ObjectiveGrip:
		s := 0.0
		for _, r := range m.TyreLoadSDRel {
			s += r * r
		}
		return math.Sqrt(s / 4)
	case ObjectivePlatform:
		return math.Sqrt((plat(Front) + plat(Rear)) / 2)
	case ObjectiveFrontPlatform:
		return math.Sqrt(plat(Front))
	case ObjectiveRearPlatform:
		return math.Sqrt(plat(Rear))
	case ObjectivePitch:
		return m.PitchSD
	case ObjectiveRoll:
		return m.RollSD
	case ObjectiveHeaveAccel:
		return m.HeaveAccelSD
	case ObjectiveDownforce:
		return math.Hypot(m.DownforceSD, m.DownforceShift)
	case ObjectiveBalance:
		return math.Hypot(m.BalanceSD, m.BalanceShift)
	}
	return math.NaN()
}

// caseConstraint is the per-case value a constraint limits.
func caseConstraint(c *Constraint, m *CaseMetrics) float64 {
	if c.Kind == ConstraintFloorContact {
		return m.MaxFloorContact()
	}
	worst := 0.0
	for i := 0; i < 4; i++ {
		switch c.Kind {
		case ConstraintLiftOff:
			worst = math.Max(worst, m.LiftOffProbability[i])
		case ConstraintBumpStop:
			worst = math.Max(worst, m.BumpStopProbability[i])
			if i < 2 {
				worst = math.Max(worst, m.PackerProbability[i])
			}
		case ConstraintTravel:
			worst = math.Max(worst, m.TravelSD[i])
		case ConstraintJacking:
			if i < 2 {
				worst = math.Max(worst, math.Abs(m.RideHeightShift[i]))
			}
		}
	}
	return worst
}

// Problem is the search problem: genes to setup, setup to objectives and
// constraint violations. It is safe for concurrent use and allocates
// nothing per evaluation once warm.
type Problem struct {
	eval        *Evaluator
	design      DesignSpace
	genes       []Gene
	objectives  []Objective
	constraints []Constraint
	pool        sync.Pool
	// reference holds, per objective, its value on every road case for
	// the reference setup; nil for objectives not normalised.
	reference [][]float64
	// robust, when not nil, evaluates every setup over uncertain cars
	// (NewRobustProblem).
	robust *robustSet
}

// NewProblem checks the design space, objectives and constraints (see
// ValidateProblem).
func NewProblem(e *Evaluator, d DesignSpace, objectives []Objective, constraints []Constraint) (*Problem, error) {
	if err := ValidateProblem(d, objectives, constraints); err != nil {
		return nil, err
	}
	if err := ValidateAeroOutputs(e.Vehicle(), objectives, constraints); err != nil {
		return nil, err
	}
	if err := checkTransientObjectives(e, objectives); err != nil {
		return nil, err
	}
	s := &Problem{eval: e, design: d, genes: d.Genes(), objectives: objectives, constraints: constraints}
	s.pool.New = func() any {
		return &Result{Cases: make([]CaseMetrics, e.Cases()), Transients: make([]TransientMetrics, e.TransientCases())}
	}
	if s.normalises() {
		if err := s.SetReference(d.Middle()); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// ValidateProblem checks what NewProblem is given besides the evaluator:
// the design space (paths under "design."), one to three distinct known
// objectives with finite target shifts, and known constraints with
// limits > 0.
func ValidateProblem(d DesignSpace, objectives []Objective, constraints []Constraint) error {
	var p problems
	p.merge("design.", d.Validate())
	if len(objectives) < 1 || len(objectives) > 3 {
		p.add("objectives", "needs 1 to 3 objectives, got %d", len(objectives))
	}
	seen := map[ObjectiveKind]bool{}
	for i, o := range objectives {
		f := fmt.Sprintf("objectives[%d]", i)
		if _, ok := objectiveNames[o.Kind]; !ok {
			p.add(f+".kind", "unknown objective %d", int(o.Kind))
		}
		if seen[o.Kind] {
			p.add(f+".kind", "objective %s given twice", o.Kind)
		}
		seen[o.Kind] = true
		if o.Aggregation < AggregateMeanSquare || o.Aggregation > AggregateNormalised {
			p.add(f+".aggregation", "unknown aggregation %d", int(o.Aggregation))
		}
		p.in(f+".target_shift_m[0]", o.TargetShift[0], "Objective.target_shift_m")
		p.in(f+".target_shift_m[1]", o.TargetShift[1], "Objective.target_shift_m")
	}
	for i, c := range constraints {
		f := fmt.Sprintf("constraints[%d]", i)
		if _, ok := constraintNames[c.Kind]; !ok {
			p.add(f+".kind", "unknown constraint %d", int(c.Kind))
			p.positive(f+".limit", c.Limit) // its range depends on the kind
			continue
		}
		p.in(f+".limit", c.Limit, c.Kind.limitName())
		if c.Kind == ConstraintModalRatio {
			if c.Mode < 0 || c.Mode >= nDOF {
				p.add(f+".mode", "unknown mode %d", c.Mode)
			}
			if !(c.Lower >= 0) || c.Lower >= c.Limit {
				p.add(f+".lower", "must be in [0, limit %g), got %g", c.Limit, c.Lower)
			}
		} else if c.Lower != 0 {
			p.add(f+".lower", "is for a modal-ratio band only, got %g on %s", c.Lower, c.Kind)
		}
	}
	return p.err()
}

// ValidateAeroOutputs checks the objectives and constraints that need
// something of the vehicle: the downforce and balance objectives need
// aero (without it they are 0 for every setup), the floor-contact
// constraint needs reference points. Paths as in ValidateProblem.
func ValidateAeroOutputs(v *Vehicle, objectives []Objective, constraints []Constraint) error {
	var p problems
	for i, o := range objectives {
		if (o.Kind == ObjectiveDownforce || o.Kind == ObjectiveBalance) && !v.Aero.has() {
			p.add(fmt.Sprintf("objectives[%d].kind", i), "objective %s needs aero on the vehicle (vehicle.aero): without it the value is 0 for every setup", o.Kind)
		}
	}
	for i, c := range constraints {
		if c.Kind == ConstraintFloorContact && len(v.ReferencePoints) == 0 {
			p.add(fmt.Sprintf("constraints[%d].kind", i), "constraint %s needs reference points on the vehicle (vehicle.reference_points)", c.Kind)
		}
	}
	return p.err()
}

// Genes lists the searched variables.
func (s *Problem) Genes() []Gene { return s.genes }

// Design returns the design space.
func (s *Problem) Design() *DesignSpace { return &s.design }

// Evaluator returns the problem's evaluator.
func (s *Problem) Evaluator() *Evaluator { return s.eval }

// Objectives returns the objectives.
func (s *Problem) Objectives() []Objective { return s.objectives }

// Constraints returns the constraints.
func (s *Problem) Constraints() []Constraint { return s.constraints }

// NumObjectives is len(Objectives()).
func (s *Problem) NumObjectives() int { return len(s.objectives) }

// NumConstraints is len(Constraints()).
func (s *Problem) NumConstraints() int { return len(s.constraints) }

// EvaluateGenes evaluates the setup decoded from x and writes the
// objective values to obj and the constraint violations to viol
// (max(0, value/limit - 1), 0 when satisfied).
//
// A robust problem (NewRobustProblem) gives the robust objectives and
// the worst violations over its uncertain cars (EvaluateRobust).
func (s *Problem) EvaluateGenes(x, obj, viol []float64) error {
	if s.robust != nil {
		return s.EvaluateRobust(s.design.Decode(x), obj, viol, nil)
	}
	r := s.pool.Get().(*Result)
	defer s.pool.Put(r)
	if err := s.eval.Evaluate(s.design.Decode(x), r); err != nil {
		return err
	}
	s.Score(r, obj, viol)
	return nil
}

// Score computes objectives and violations of an evaluated result.
func (s *Problem) Score(r *Result, obj, viol []float64) {
	for j := range s.objectives {
		obj[j] = s.ObjectiveValue(j, r)
	}
	for j := range s.constraints {
		c := &s.constraints[j]
		if c.Kind == ConstraintModalRatio {
			viol[j], _, _ = bandWorst(c, r)
			continue
		}
		worst, _ := constraintWorst(c, r)
		viol[j] = math.Max(0, worst/c.Limit-1)
	}
}

// constraintWorst is the largest value c limits over every case and
// corner of r, and the first case where it is reached; NaN, and its case,
// when a value is NaN.
func constraintWorst(c *Constraint, r *Result) (worst float64, at int) {
	if c.Kind.OnTransients() {
		return transientWorst(c, r)
	}
	for i := range r.Cases {
		v := caseConstraint(c, &r.Cases[i])
		if math.IsNaN(v) {
			return v, i
		}
		if v > worst {
			worst, at = v, i
		}
	}
	return worst, at
}

// DefaultObjectives are grip and platform, mean square over the cases.
func DefaultObjectives() []Objective {
	return []Objective{{Kind: ObjectiveGrip}, {Kind: ObjectivePlatform}}
}
