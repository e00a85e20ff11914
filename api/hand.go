package api

import (
	"context"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// EstimateByHand works out the hand method (model.HandMethod) for a
// request: the RPC of the same name, and the CLI's hand command in its own
// process, with no server. Unset targets and adjustment take the
// common-practice defaults. Bad input is an InvalidArgument status naming
// each field by its path in the request.
func EstimateByHand(req *pb.EstimateByHandRequest) (*pb.EstimateByHandResponse, error) {
	var p problems
	t := model.DefaultHandTargets()
	v := vehicleFromProto(req.GetVehicle(), "vehicle", &p)
	if req.GetTargets() != nil {
		t.Setup = setupFromProto(req.GetTargets(), "targets", &p)
	}
	if req.GetAdjustment() != nil {
		t.Adjustment = adjustmentFromProto(req.GetAdjustment())
	}
	t.Speed = req.GetSpeedMPerS()
	if err := p.err(); err != nil {
		return nil, err
	}
	p.mergeModel(under("vehicle."), v.Validate())
	p.mergeModel(under("targets."), t.Setup.Validate())
	p.mergeModel(under("adjustment."), t.Adjustment.Validate())
	if s := t.Speed; !(s >= 0) || s > 1e3 {
		p.add("speed_m_per_s", "must be in [0, 1000] m/s, got %g", s)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	r, err := model.HandMethod(&v, t)
	if err != nil {
		return nil, toStatus(err, nil)
	}
	return handToProto(r), nil
}

func handToProto(r *model.HandReport) *pb.EstimateByHandResponse {
	a := r.Targets.Adjustment
	out := &pb.EstimateByHandResponse{
		Targets: setupToProto(r.Targets.Setup),
		Adjustment: &pb.Adjustment{BumpSoftestRatio: a.BumpSoftest, BumpStiffestRatio: a.BumpStiffest,
			ReboundSoftestRatio: a.ReboundSoftest, ReboundStiffestRatio: a.ReboundStiffest},
		SpeedMPerS: r.Targets.Speed,
		Caution:    model.Caution,
	}
	branch := func(b *model.HandBranch) *pb.HandBranch {
		return &pb.HandBranch{Ratio: b.Ratio, SlopeNSPerM: b.Slope, KneeMPerS: b.Knee, KneeForceN: b.KneeForce,
			HighSpeedSlopeNSPerM: b.HighSpeedSlope, SoftestSlopeNSPerM: b.SoftestSlope, StiffestSlopeNSPerM: b.StiffestSlope,
			SoftestKneeForceN: b.SoftestKneeForce, StiffestKneeForceN: b.StiffestKneeForce}
	}
	for i := range r.Corners {
		c := &r.Corners[i]
		out.Corners = append(out.Corners, &pb.HandCorner{
			Corner: cornerPositions[c.Corner], WheelRateNPerM: c.WheelRate, TyreRateNPerM: c.TyreRate,
			RideRateNPerM: c.RideRate, SprungMassKg: c.SprungMass, DamperMotionRatio: c.DamperMotionRatio,
			RideFrequencyHz: c.RideFrequencyHz, RideFrequencyWithTyreHz: c.RideFrequencyTyreHz,
			CriticalDampingWheelNSPerM: c.CriticalWheel, CriticalDampingDamperNSPerM: c.CriticalDamper,
			Bump: branch(&c.Bump), Rebound: branch(&c.Rebound),
		})
	}
	for i := range r.Axles {
		a := &r.Axles[i]
		ha := &pb.HandAxle{Axle: model.AxleNames[a.Axle], HeaveRateNPerM: a.HeaveRate, HeaveSpringRateNPerM: a.HeaveSpringRate,
			SprungMassKg: a.SprungMass, HeaveFrequencyHz: a.HeaveFrequencyHz, HeaveMotionRatio: a.HeaveMotionRatio,
			CriticalDampingHeaveNSPerM: a.CriticalHeave, CriticalDampingElementNSPerM: a.CriticalElement}
		if a.Bump.Ratio != 0 {
			ha.Bump, ha.Rebound = branch(&a.Bump), branch(&a.Rebound)
		}
		out.Axles = append(out.Axles, ha)
	}
	for i := range r.Modes {
		m := &r.Modes[i]
		out.Modes = append(out.Modes, &pb.HandMode{Name: m.Name, HandFrequencyHz: m.HandFrequencyHz, HandDampingRatio: m.HandRatio,
			TyreShare: m.TyreShare, TyreDampingRatio: m.TyreRatio, Modal: modeToProto(&m.Modal), Reason: m.Reason})
	}
	return out
}

// EstimateByHand serves the RPC; the work is small (two eigenproblems of
// the car), so it takes no slot.
func (s *Server) EstimateByHand(_ context.Context, req *pb.EstimateByHandRequest) (*pb.EstimateByHandResponse, error) {
	return EstimateByHand(req)
}
