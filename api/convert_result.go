package api

import (
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/model"
)

// cornerPositions are the enum values of the model's corner indices.
var cornerPositions = [4]pb.CornerPosition{
	model.FL: pb.CornerPosition_CORNER_POSITION_FRONT_LEFT,
	model.FR: pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT,
	model.RL: pb.CornerPosition_CORNER_POSITION_REAR_LEFT,
	model.RR: pb.CornerPosition_CORNER_POSITION_REAR_RIGHT,
}

// solutionToProto converts a solution's detail.
func solutionToProto(s *study.Solution) *pb.Solution {
	out := &pb.Solution{Genes: s.Genes, Setup: setupToProto(s.Setup), Objectives: s.Objectives, Violations: s.Violations,
		Feasible: s.Feasible, InfeasibleReason: s.InfeasibleReason, Warnings: s.Warnings, Robust: robustToProto(s.Robust)}
	for i := range s.Cases {
		out.CaseMetrics = append(out.CaseMetrics, caseMetricsToProto(&s.Cases[i]))
	}
	if s.Curves != nil {
		out.DamperCurves = damperCurvesToProto(s.Curves)
	}
	for i := range s.Transients {
		out.TransientMetrics = append(out.TransientMetrics, transientMetricsToProto(&s.Transients[i]))
	}
	for _, sf := range s.Shortfalls {
		name := ""
		if sf.Constraint.Kind.OnTransients() {
			name = s.Transients[sf.Case].Case
		} else {
			name = s.Cases[sf.Case].Metrics.Case
		}
		out.Shortfalls = append(out.Shortfalls, shortfallToProto(sf, name))
	}
	return finiteSolution(out)
}

// shortfallToProto converts a violated constraint's shortfall, reached on
// the named road case.
func shortfallToProto(sf model.Shortfall, roadCase string) *pb.ConstraintShortfall {
	return &pb.ConstraintShortfall{Kind: constraintKindToProto(sf.Constraint.Kind), Limit: sf.Constraint.Limit,
		Worst: sf.Worst, RoadCase: roadCase, Over: sf.Over, Violation: sf.Violation}
}

// caseMetricsToProto converts one road case's metrics, with the modes at
// its speed and its warnings.
func caseMetricsToProto(c *study.CaseDetail) *pb.CaseMetrics {
	m := &c.Metrics
	out := &pb.CaseMetrics{
		RoadCase:           m.Case,
		Front:              axleMetricsToProto(m, model.Front),
		Rear:               axleMetricsToProto(m, model.Rear),
		PitchSdRad:         m.PitchSD,
		RollSdRad:          m.RollSD,
		HeaveAccelSdMPerS2: m.HeaveAccelSD,
		PitchShiftRad:      m.PitchShift,
		Iterations:         int32(m.Iterations),
		Warnings:           c.Warnings,
		Modes:              caseModesToProto(c),
		AtSpeed:            operatingPointToProto(&m.AtSpeed),
		Aero:               aeroMetricsToProto(m),
	}
	for _, p := range m.ReferencePoints() {
		out.ReferencePoints = append(out.ReferencePoints, &pb.ReferencePointMetrics{Name: p.Name, HeightAtSpeedM: p.HeightAtSpeed,
			HeightShiftM: p.Shift, HeightSdM: p.SD, ContactProbability: p.ContactProbability})
	}
	for i := 0; i < 4; i++ {
		out.Corners = append(out.Corners, &pb.CornerMetrics{
			Corner:                  cornerPositions[i],
			TyreLoadSdN:             m.TyreLoadSD[i],
			StaticTyreLoadN:         m.StaticTyreLoad[i],
			RelativeTyreLoadSd:      m.TyreLoadSDRel[i],
			LiftOffProbability:      m.LiftOffProbability[i],
			TravelSdM:               m.TravelSD[i],
			BumpStopProbability:     m.BumpStopProbability[i],
			DamperVelocitySdMPerS:   m.DamperVelocitySD[i],
			EquivalentDampingNSPerM: m.EquivalentDamping[i],
			MeanDamperForceN:        m.MeanDamperForce[i],
			TravelShiftM:            m.TravelShift[i],
			CompressionAtSpeedM:     m.AtSpeed.Compression[i],
			BumpStopGapAtSpeedM:     m.AtSpeed.BumpStopGap[i],
		})
	}
	return out
}

// axleMetricsToProto converts one axle's metrics, its heave element's
// included.
func axleMetricsToProto(m *model.CaseMetrics, ax int) *pb.AxleMetrics {
	return &pb.AxleMetrics{RideHeightSdM: m.RideHeightSD[ax], RideHeightShiftM: m.RideHeightShift[ax],
		HeaveTravelSdM: m.HeaveTravelSD[ax], HeaveVelocitySdMPerS: m.HeaveVelocitySD[ax],
		PackerProbability: m.PackerProbability[ax], HeaveEquivalentDampingNSPerM: m.HeaveEquivalentDamping[ax],
		PackerGapAtSpeedM: m.AtSpeed.PackerGap[ax]}
}

// aeroMetricsToProto converts the downforce and balance figures; nil
// without downforce at the case's speed.
func aeroMetricsToProto(m *model.CaseMetrics) *pb.AeroMetrics {
	if m.AtSpeed.Downforce == [2]float64{} {
		return nil
	}
	return &pb.AeroMetrics{BalanceAtSpeed: m.AtSpeed.Balance(), DownforceSdN: m.DownforceSD, DownforceShiftN: m.DownforceShift,
		BalanceSd: m.BalanceSD, BalanceShift: m.BalanceShift}
}

// operatingPointToProto converts the car at a case's speed (the per-corner
// figures go to CornerMetrics).
func operatingPointToProto(op *model.OperatingPoint) *pb.OperatingPoint {
	return &pb.OperatingPoint{
		FrontRideHeightM:             op.RideHeight[model.Front],
		RearRideHeightM:              op.RideHeight[model.Rear],
		FrontRideHeightChangeM:       op.RideHeightChange[model.Front],
		RearRideHeightChangeM:        op.RideHeightChange[model.Rear],
		PitchRad:                     op.Pitch,
		FrontDownforceN:              op.Downforce[model.Front],
		RearDownforceN:               op.Downforce[model.Rear],
		FrontFrontAeroStiffnessNPerM: op.AeroStiffness[model.Front][model.Front],
		FrontRearAeroStiffnessNPerM:  op.AeroStiffness[model.Front][model.Rear],
		RearFrontAeroStiffnessNPerM:  op.AeroStiffness[model.Rear][model.Front],
		RearRearAeroStiffnessNPerM:   op.AeroStiffness[model.Rear][model.Rear],
		NewtonIterations:             int32(op.Iterations),
	}
}

// caseModesToProto converts a road case's modes, heave, pitch and roll
// with their hand figures beside.
func caseModesToProto(c *study.CaseDetail) []*pb.Mode {
	out := make([]*pb.Mode, len(c.Modes))
	for i, m := range c.Modes {
		out[i] = modeToProto(&m)
		if i < len(c.Hand) && c.Hand[i].Name == m.Name {
			out[i].HandDampingRatio, out[i].HandReason = c.Hand[i].HandRatio, c.Hand[i].Reason
		}
	}
	return out
}

func modeToProto(m *model.Mode) *pb.Mode {
	return &pb.Mode{Name: m.Name, UndampedFrequencyHz: m.UndampedFrequencyHz, ModalDampingRatio: m.DampingRatio,
		DampedFrequencyHz: m.DampedFrequencyHz, PairDampingRatio: m.PairDampingRatio, Overdamped: m.Overdamped,
		DecayRatesPerS: m.DecayRates}
}

func damperCurvesToProto(curves []model.DamperCurve) []*pb.DamperCurve {
	out := make([]*pb.DamperCurve, len(curves))
	for i := range curves {
		c := &curves[i]
		out[i] = &pb.DamperCurve{
			Corner:                 cornerPositions[c.Corner],
			VelocityMPerS:          c.Velocity,
			ForceN:                 c.Force,
			SoftestForceN:          c.Softest,
			StiffestForceN:         c.Stiffest,
			BumpSlopeNSPerM:        c.BumpSlope,
			ReboundSlopeNSPerM:     c.ReboundSlope,
			KneeBumpMPerS:          c.KneeBump,
			KneeReboundMPerS:       c.KneeRebound,
			HighSpeedBumpFactor:    c.HighSpeedBump,
			HighSpeedReboundFactor: c.HighSpeedRebound,
			StagesBump:             stagesToProto(c.StagesBump),
			StagesRebound:          stagesToProto(c.StagesRebound),
			BlowOffBumpN:           c.BlowOffBump,
			BlowOffReboundN:        c.BlowOffRebound,
			FrictionN:              c.Friction,
			GasForceN:              c.GasForce,
		}
	}
	return out
}

// heaveCurvesToProto converts heave damper curves (nil when none).
func heaveCurvesToProto(curves []model.HeaveCurve) []*pb.HeaveDamperCurve {
	var out []*pb.HeaveDamperCurve
	for i := range curves {
		dc := damperCurvesToProto([]model.DamperCurve{curves[i].DamperCurve})[0]
		dc.Corner = pb.CornerPosition_CORNER_POSITION_UNSPECIFIED
		out = append(out, &pb.HeaveDamperCurve{Axle: pb.AxlePosition(curves[i].Axle + 1), Curve: dc})
	}
	return out
}
