package api

import (
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/model"
)

// setupFromProto converts a setup; a missing axle is recorded under path.
func setupFromProto(s *pb.Setup, path string, p *problems) model.Setup {
	if s == nil {
		p.add(path, "is required")
		return model.Setup{}
	}
	var out model.Setup
	for ax, a := range [2]*pb.AxleDamping{s.GetFront(), s.GetRear()} {
		if a == nil {
			p.add(joinPath(path+".", model.AxleNames[ax]), "is required")
			continue
		}
		out.Axles[ax] = axleFromProto(a, joinPath(path+".", model.AxleNames[ax]), p)
	}
	for ax, a := range [2]*pb.AxleDamping{s.GetFrontHeave(), s.GetRearHeave()} {
		if a != nil {
			out.Heave[ax] = axleFromProto(a, joinPath(path+".", model.AxleNames[ax]+"_heave"), p)
		}
	}
	return out
}

// axleFromProto converts one axle's setting; a shape problem (too many
// stages) is recorded under path.
func axleFromProto(a *pb.AxleDamping, path string, p *problems) model.AxleDamping {
	out := model.AxleDamping{
		BumpRatio: a.GetBumpRatio(), ReboundRatio: a.GetReboundRatio(),
		KneeBump: a.GetKneeBumpMPerS(), KneeRebound: a.GetKneeReboundMPerS(),
		HighSpeedBump: a.GetHighSpeedBumpFactor(), HighSpeedRebound: a.GetHighSpeedReboundFactor(),
	}
	hardwareFromProto(a, &out, path, p)
	return out
}

func axleToProto(a model.AxleDamping) *pb.AxleDamping {
	out := &pb.AxleDamping{
		BumpRatio: a.BumpRatio, ReboundRatio: a.ReboundRatio,
		KneeBumpMPerS: a.KneeBump, KneeReboundMPerS: a.KneeRebound,
		HighSpeedBumpFactor: a.HighSpeedBump, HighSpeedReboundFactor: a.HighSpeedRebound,
	}
	hardwareToProto(&a, out)
	return out
}

func setupToProto(s model.Setup) *pb.Setup {
	out := &pb.Setup{Front: axleToProto(s.Axles[model.Front]), Rear: axleToProto(s.Axles[model.Rear])}
	if s.Heave[model.Front] != (model.AxleDamping{}) {
		out.FrontHeave = axleToProto(s.Heave[model.Front])
	}
	if s.Heave[model.Rear] != (model.AxleDamping{}) {
		out.RearHeave = axleToProto(s.Heave[model.Rear])
	}
	return out
}

// designFromProto converts a design space; a nil range or base axle
// stays nil, for the study's defaults. Shape problems are recorded under
// path ("spec.design_space").
func designFromProto(d *pb.DesignSpace, path string, p *problems) study.Design {
	r := d.GetRatios()
	out := study.Design{
		Ratios:       [4]*model.Range{rangeOrNil(r.GetFrontBump()), rangeOrNil(r.GetFrontRebound()), rangeOrNil(r.GetRearBump()), rangeOrNil(r.GetRearRebound())},
		Symmetric:    d.GetSymmetric(),
		Knee:         [2]*model.Range{rangeOrNil(d.GetFrontKneeMPerS()), rangeOrNil(d.GetRearKneeMPerS())},
		HighSpeed:    [2]*model.Range{rangeOrNil(d.GetFrontHighSpeedFactor()), rangeOrNil(d.GetRearHighSpeedFactor())},
		SnapToClicks: d.GetSnapToClicks(),
		HeaveRatio:   [2]*model.Range{rangeOrNil(d.GetFrontHeaveRatio()), rangeOrNil(d.GetRearHeaveRatio())},
	}
	for ax, a := range [2]*pb.AxleDamping{d.GetBase().GetFront(), d.GetBase().GetRear()} {
		if a != nil {
			b := axleFromProto(a, joinPath(path+".", "base."+model.AxleNames[ax]), p)
			out.Base[ax] = &b
		}
	}
	for ax, a := range [2]*pb.AxleDamping{d.GetBase().GetFrontHeave(), d.GetBase().GetRearHeave()} {
		if a != nil {
			b := axleFromProto(a, joinPath(path+".", "base."+model.AxleNames[ax]+"_heave"), p)
			out.HeaveBase[ax] = &b
		}
	}
	return out
}

func rangeFromProto(r *pb.Range) model.Range { return model.Range{Min: r.GetMin(), Max: r.GetMax()} }

func rangeOrNil(r *pb.Range) *model.Range {
	if r == nil {
		return nil
	}
	out := rangeFromProto(r)
	return &out
}

// objectiveKinds and constraintKinds pair the enums with the model's.
var (
	objectiveKinds = map[pb.ObjectiveKind]model.ObjectiveKind{
		pb.ObjectiveKind_OBJECTIVE_KIND_GRIP:           model.ObjectiveGrip,
		pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM:       model.ObjectivePlatform,
		pb.ObjectiveKind_OBJECTIVE_KIND_FRONT_PLATFORM: model.ObjectiveFrontPlatform,
		pb.ObjectiveKind_OBJECTIVE_KIND_REAR_PLATFORM:  model.ObjectiveRearPlatform,
		pb.ObjectiveKind_OBJECTIVE_KIND_PITCH:          model.ObjectivePitch,
		pb.ObjectiveKind_OBJECTIVE_KIND_ROLL:           model.ObjectiveRoll,
		pb.ObjectiveKind_OBJECTIVE_KIND_HEAVE_ACCEL:    model.ObjectiveHeaveAccel,
		pb.ObjectiveKind_OBJECTIVE_KIND_DOWNFORCE:      model.ObjectiveDownforce,
		pb.ObjectiveKind_OBJECTIVE_KIND_BALANCE:        model.ObjectiveBalance,

		pb.ObjectiveKind_OBJECTIVE_KIND_DRIVER_RESPONSE:   model.ObjectiveDriverResponse,
		pb.ObjectiveKind_OBJECTIVE_KIND_TRANSIENT_BALANCE: model.ObjectiveTransientBalance,
		pb.ObjectiveKind_OBJECTIVE_KIND_KERB_LOAD_LOSS:    model.ObjectiveKerbLoadLoss,
	}
	aggregations = map[pb.Aggregation]model.Aggregation{
		pb.Aggregation_AGGREGATION_UNSPECIFIED: model.AggregateMeanSquare,
		pb.Aggregation_AGGREGATION_MEAN_SQUARE: model.AggregateMeanSquare,
		pb.Aggregation_AGGREGATION_WORST:       model.AggregateWorst,
		pb.Aggregation_AGGREGATION_NORMALISED:  model.AggregateNormalised,
	}
	constraintKinds = map[pb.ConstraintKind]model.ConstraintKind{
		pb.ConstraintKind_CONSTRAINT_KIND_LIFT_OFF:      model.ConstraintLiftOff,
		pb.ConstraintKind_CONSTRAINT_KIND_BUMP_STOP:     model.ConstraintBumpStop,
		pb.ConstraintKind_CONSTRAINT_KIND_TRAVEL:        model.ConstraintTravel,
		pb.ConstraintKind_CONSTRAINT_KIND_JACKING:       model.ConstraintJacking,
		pb.ConstraintKind_CONSTRAINT_KIND_MODAL_RATIO:   model.ConstraintModalRatio,
		pb.ConstraintKind_CONSTRAINT_KIND_FLOOR_CONTACT: model.ConstraintFloorContact,
		pb.ConstraintKind_CONSTRAINT_KIND_UNLOADED_TIME: model.ConstraintUnloadedTime,
		pb.ConstraintKind_CONSTRAINT_KIND_STOP_TIME:     model.ConstraintStopTime,
	}
)

// objectivesFromProto converts the objectives under path
// ("spec.objectives"), recording enum values out of range; the count,
// repeats and target shifts are the study's to check.
func objectivesFromProto(objs []*pb.Objective, path string, p *problems) []model.Objective {
	out := make([]model.Objective, len(objs))
	for i, o := range objs {
		f := fmt.Sprintf("%s[%d]", path, i)
		kind, ok := objectiveKinds[o.GetKind()]
		if !ok {
			p.add(f+".kind", "must be one of the OBJECTIVE_KIND_ values other than UNSPECIFIED, got %v", o.GetKind())
		}
		agg, ok := aggregations[o.GetAggregation()]
		if !ok {
			p.add(f+".aggregation", "unknown aggregation %d", int32(o.GetAggregation()))
		}
		out[i] = model.Objective{Kind: kind, Aggregation: agg, TargetShift: [2]float64{o.GetFrontTargetShiftM(), o.GetRearTargetShiftM()}}
	}
	return out
}

func objectiveToProto(o model.Objective) *pb.Objective {
	out := &pb.Objective{FrontTargetShiftM: o.TargetShift[0], RearTargetShiftM: o.TargetShift[1]}
	for k, v := range objectiveKinds {
		if v == o.Kind {
			out.Kind = k
		}
	}
	out.Aggregation = pb.Aggregation_AGGREGATION_MEAN_SQUARE
	switch o.Aggregation {
	case model.AggregateWorst:
		out.Aggregation = pb.Aggregation_AGGREGATION_WORST
	case model.AggregateNormalised:
		out.Aggregation = pb.Aggregation_AGGREGATION_NORMALISED
	}
	return out
}

// constraintKindToProto is the API's kind of a model's constraint kind.
func constraintKindToProto(k model.ConstraintKind) pb.ConstraintKind {
	for pk, mk := range constraintKinds {
		if mk == k {
			return pk
		}
	}
	return pb.ConstraintKind_CONSTRAINT_KIND_UNSPECIFIED
}

// constraintsFromProto converts the constraints under path
// ("spec.constraints"), recording kinds out of range; the limits are the
// study's to check.
func constraintsFromProto(cons []*pb.Constraint, path string, p *problems) []model.Constraint {
	out := make([]model.Constraint, len(cons))
	for i, c := range cons {
		kind, ok := constraintKinds[c.GetKind()]
		if !ok {
			p.add(fmt.Sprintf("%s[%d].kind", path, i), "must be one of the CONSTRAINT_KIND_ values other than UNSPECIFIED, got %v", c.GetKind())
		}
		out[i] = model.Constraint{Kind: kind, Limit: c.GetLimit(), Lower: c.GetLower(), Mode: int(c.GetMode()) - 1}
		switch {
		case kind == model.ConstraintModalRatio && c.GetMode() == pb.ModeName_MODE_NAME_UNSPECIFIED:
			p.add(fmt.Sprintf("%s[%d].mode", path, i), "must name the mode of a modal-ratio band (MODE_NAME_HEAVE, ...)")
		case kind != model.ConstraintModalRatio && c.GetMode() != pb.ModeName_MODE_NAME_UNSPECIFIED:
			p.add(fmt.Sprintf("%s[%d].mode", path, i), "is for CONSTRAINT_KIND_MODAL_RATIO only, got %v on %v", c.GetMode(), c.GetKind())
		}
	}
	return out
}

func adjustmentFromProto(a *pb.Adjustment) model.Adjustment {
	return model.Adjustment{
		BumpSoftest: a.GetBumpSoftestRatio(), BumpStiffest: a.GetBumpStiffestRatio(),
		ReboundSoftest: a.GetReboundSoftestRatio(), ReboundStiffest: a.GetReboundStiffestRatio(),
	}
}
