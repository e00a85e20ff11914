package api

import (
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/model"
)

// hardwareFromProto sets the damper hardware of an axle (stages,
// blow-off, friction, gas force) from a; more stages than the model
// holds are recorded under path ("spec.design_space.base.front").
func hardwareFromProto(a *pb.AxleDamping, out *model.AxleDamping, path string, p *problems) {
	out.StagesBump = stagesFromProto(a.GetStagesBump(), joinPath(path+".", "stages_bump"), p)
	out.StagesRebound = stagesFromProto(a.GetStagesRebound(), joinPath(path+".", "stages_rebound"), p)
	out.BlowOffBump, out.BlowOffRebound = a.GetBlowOffBumpN(), a.GetBlowOffReboundN()
	out.Friction, out.GasForce = a.GetFrictionN(), a.GetGasForceN()
}

func stagesFromProto(st []*pb.DamperStage, path string, p *problems) [model.MaxStages]model.Stage {
	var out [model.MaxStages]model.Stage
	if len(st) > model.MaxStages {
		p.add(path, "at most %d stages beyond the first knee, got %d", model.MaxStages, len(st))
	}
	for j := 0; j < len(st) && j < model.MaxStages; j++ {
		out[j] = model.Stage{Velocity: st[j].GetVelocityMPerS(), Factor: st[j].GetFactor()}
	}
	return out
}

// stagesToProto converts the given stages (the list ends at the first
// zero velocity).
func stagesToProto(st []model.Stage) []*pb.DamperStage {
	var out []*pb.DamperStage
	for _, s := range st {
		if s.Velocity == 0 {
			break
		}
		out = append(out, &pb.DamperStage{VelocityMPerS: s.Velocity, Factor: s.Factor})
	}
	return out
}

// hardwareToProto writes the hardware of an axle into out.
func hardwareToProto(a *model.AxleDamping, out *pb.AxleDamping) {
	out.StagesBump, out.StagesRebound = stagesToProto(a.StagesBump[:]), stagesToProto(a.StagesRebound[:])
	out.BlowOffBumpN, out.BlowOffReboundN = a.BlowOffBump, a.BlowOffRebound
	out.FrictionN, out.GasForceN = a.Friction, a.GasForce
}

// adjustersFromProto converts the adjusters; every value is the
// model's to check.
func adjustersFromProto(a *pb.Adjusters) model.Adjusters {
	var out model.Adjusters
	for ax, d := range [2]*pb.DamperAdjusters{a.GetFront(), a.GetRear()} {
		out.Axles[ax] = model.DamperAdjusters{
			LowBump: adjusterFromProto(d.GetLowBump()), LowRebound: adjusterFromProto(d.GetLowRebound()),
			HighBump: adjusterFromProto(d.GetHighBump()), HighRebound: adjusterFromProto(d.GetHighRebound()),
		}
	}
	return out
}

func adjusterFromProto(a *pb.Adjuster) model.Adjuster {
	out := model.Adjuster{Clicks: int(a.GetClicks()), Stiffest: a.GetStiffest(), Softest: a.GetSoftest()}
	if t := a.GetDyno(); t != nil {
		out.Dyno = &model.DynoTable{Velocity: cloneOrNil(t.GetVelocityMPerS())}
		for _, r := range t.GetRows() {
			out.Dyno.Force = append(out.Dyno.Force, cloneOrNil(r.GetForceN()))
		}
	}
	return out
}

// clicksToProto converts the clicks of every corner.
func clicksToProto(cs []model.CornerClicks) []*pb.CornerClicks {
	var out []*pb.CornerClicks
	for _, c := range cs {
		out = append(out, &pb.CornerClicks{Corner: cornerPositions[c.Corner], LowBump: int32(c.LowBump),
			LowRebound: int32(c.LowRebound), HighBump: int32(c.HighBump), HighRebound: int32(c.HighRebound)})
	}
	return out
}

// bandToProto converts the out-of-band excesses.
func bandToProto(es []model.BandExcess) []*pb.BandExcess {
	var out []*pb.BandExcess
	for _, e := range es {
		out = append(out, &pb.BandExcess{Corner: cornerPositions[e.Corner], Rebound: e.Rebound, SpeedMPerS: e.Speed,
			ForceN: e.Force, SoftestForceN: e.Softest, StiffestForceN: e.Stiffest, OverN: e.Over, Above: e.Above})
	}
	return out
}

// BandExcessText words an out-of-band excess of a solution as the
// model's BandExcess.String does, for the CLI and the page.
func BandExcessText(e *pb.BandExcess) string {
	c := model.FL
	for i, p := range cornerPositions {
		if p == e.GetCorner() {
			c = i
		}
	}
	return model.BandExcess{Corner: c, Rebound: e.GetRebound(), Speed: e.GetSpeedMPerS(), Force: e.GetForceN(),
		Softest: e.GetSoftestForceN(), Stiffest: e.GetStiffestForceN(), Over: e.GetOverN(), Above: e.GetAbove()}.String()
}

// ClicksText words the clicks of one corner as CornerClicks.String does.
func ClicksText(c *pb.CornerClicks) string {
	i := model.FL
	for k, p := range cornerPositions {
		if p == c.GetCorner() {
			i = k
		}
	}
	return model.CornerClicks{Corner: i, LowBump: int(c.GetLowBump()), LowRebound: int(c.GetLowRebound()),
		HighBump: int(c.GetHighBump()), HighRebound: int(c.GetHighRebound())}.String()
}

// addAdjusting adds the clicks and the out-of-band check of the spec's
// adjusters (study.Spec.Adjusting) to a solution about to be answered,
// the excesses also as warnings. They are worked out when a solution is
// shown, never stored with it (see study.Adjusting). A setup the model
// cannot check gets a warning instead.
func addAdjusting(sol *pb.Solution, spec *study.Spec) {
	var p problems
	su := setupFromProto(sol.GetSetup(), "setup", &p)
	if len(p) > 0 {
		return
	}
	a, err := spec.Adjusting(su)
	if err != nil {
		sol.Warnings = append(sol.Warnings, "adjuster range: "+err.Error())
		return
	}
	sol.Clicks, sol.OutOfBand = clicksToProto(a.Clicks), bandToProto(a.OutOfBand)
	sol.Warnings = append(sol.Warnings, a.Warnings()...)
}
