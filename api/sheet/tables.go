package sheet

import (
	"bytes"
	"fmt"
	"html/template"
	"math"
	"strings"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
	"dampfront/model"
	"dampfront/model/tradeunit"
)

// sameRel is the relative difference below which two corners' forces are
// one table: equal dampers agree to rounding (the same law).
const sameRel = 1e-9

// forceTables is the forces at the test velocities, corners with equal
// forces in one table (left and right of a symmetric car).
func forceTables(forces []model.TestForces) []ForceTable {
	var out []ForceTable
	var groups [][]int
	for i := range forces {
		placed := false
		for g := range groups {
			if sameForces(&forces[groups[g][0]], &forces[i]) {
				groups[g], placed = append(groups[g], i), true
				break
			}
		}
		if !placed {
			groups = append(groups, []int{i})
		}
	}
	for _, g := range groups {
		names := make([]string, len(g))
		for k, i := range g {
			names[k] = model.CornerNames[forces[i].Corner]
		}
		f := &forces[g[0]]
		out = append(out, forceTable(strings.Join(names, ", "), f.Velocity, &f.Bump, &f.Rebound))
	}
	return out
}

// sameForces reports whether two corners' forces agree to sameRel.
func sameForces(a, b *model.TestForces) bool {
	pairs := [][2][]float64{{a.Bump.Force, b.Bump.Force}, {a.Rebound.Force, b.Rebound.Force},
		{a.Bump.Softest, b.Bump.Softest}, {a.Bump.Stiffest, b.Bump.Stiffest},
		{a.Rebound.Softest, b.Rebound.Softest}, {a.Rebound.Stiffest, b.Rebound.Stiffest}}
	for _, p := range pairs {
		if len(p[0]) != len(p[1]) {
			return false
		}
		for k := range p[0] {
			if math.Abs(p[0][k]-p[1][k]) > sameRel*math.Max(math.Abs(p[0][k]), math.Abs(p[1][k])) {
				return false
			}
		}
	}
	return true
}

// heaveForceTables is one table per heave damper, named by its axle.
func heaveForceTables(forces []model.HeaveTestForces) []ForceTable {
	var out []ForceTable
	for i := range forces {
		f := &forces[i]
		out = append(out, forceTable(model.AxleNames[f.Axle]+" heave", f.Velocity, &f.Bump, &f.Rebound))
	}
	return out
}

// forceTable is one damper's forces at the test velocities in trade
// units, the adjuster band's columns filled when the branches carry one.
func forceTable(name string, velocity []float64, bump, rebound *model.TestBranch) ForceTable {
	t := ForceTable{Corners: name, Band: bump.Softest != nil}
	n := func(xs []float64, k int) string {
		if xs == nil {
			return ""
		}
		return trade(tradeunit.Newton, xs[k], 0)
	}
	for k, v := range velocity {
		t.Rows = append(t.Rows, ForceRow{
			Velocity: trade(tradeunit.MillimetrePerSecond, v, 0),
			Bump:     n(bump.Force, k), BumpMin: n(bump.Min, k), BumpMax: n(bump.Max, k),
			BumpSoft: n(bump.Softest, k), BumpStiff: n(bump.Stiffest, k),
			Rebound: n(rebound.Force, k), RebMin: n(rebound.Min, k), RebMax: n(rebound.Max, k),
			RebSoft: n(rebound.Softest, k), RebStiff: n(rebound.Stiffest, k),
		})
	}
	return t
}

// axleRows is the setting per axle: ratios at the wheel, knees,
// high-speed factors, and the low-speed slopes at the damper of the
// axle's left corner.
func axleRows(s *pb.Setup, hand *pb.EstimateByHandResponse) []AxleRow {
	var out []AxleRow
	for ax, a := range []*pb.AxleDamping{s.GetFront(), s.GetRear()} {
		var bump, rebound float64
		if cs := hand.GetCorners(); 2*ax < len(cs) {
			bump, rebound = cs[2*ax].GetBump().GetSlopeNSPerM(), cs[2*ax].GetRebound().GetSlopeNSPerM()
		}
		out = append(out, axleRow([2]string{"front", "rear"}[ax], a, bump, rebound))
	}
	return out
}

// heaveRows is the setting of each heave damper: its ratios of the axle's
// heave critical damping, knees and slopes at the element (the curves of
// model.HeaveDamperCurves).
func heaveRows(s *pb.Setup, curves []model.HeaveCurve) []AxleRow {
	var out []AxleRow
	for _, c := range curves {
		a := [2]*pb.AxleDamping{s.GetFrontHeave(), s.GetRearHeave()}[c.Axle]
		out = append(out, axleRow(model.AxleNames[c.Axle]+" heave", a, c.BumpSlope, c.ReboundSlope))
	}
	return out
}

// axleRow is one damper's setting row, its low-speed slopes (N s/m at
// the damper) given.
func axleRow(name string, a *pb.AxleDamping, bump, rebound float64) AxleRow {
	return AxleRow{Axle: name,
		BumpRatio: num(a.GetBumpRatio(), 3), ReboundRatio: num(a.GetReboundRatio(), 3),
		KneeBump: trade(tradeunit.MillimetrePerSecond, a.GetKneeBumpMPerS(), 0), KneeRebound: trade(tradeunit.MillimetrePerSecond, a.GetKneeReboundMPerS(), 0),
		HighSpeedBump: num(factorOr1(a.GetHighSpeedBumpFactor()), 2), HighSpeedRebound: num(factorOr1(a.GetHighSpeedReboundFactor()), 2),
		BumpSlopeDamper:    trade(tradeunit.NewtonSecondPerMM, bump, 2),
		ReboundSlopeDamper: trade(tradeunit.NewtonSecondPerMM, rebound, 2)}
}

// factorOr1 is a high-speed factor as the model reads it: 0 (unset)
// means the low-speed slope throughout.
func factorOr1(f float64) float64 {
	if f == 0 {
		return 1
	}
	return f
}

// cornerRows is the per-corner figures of the hand method at the
// solution's ratios: rates, ride frequencies (Gillespie 1992), critical
// damping and the slopes at the damper.
func cornerRows(hand *pb.EstimateByHandResponse) ([]string, []CornerRow) {
	cs := hand.GetCorners()
	names := make([]string, len(cs))
	for i := range cs {
		names[i] = model.CornerNames[i]
	}
	row := func(label string, u tradeunit.Unit, prec int, get func(*pb.HandCorner) float64) CornerRow {
		r := CornerRow{Label: label, Unit: u.Symbol}
		for _, c := range cs {
			r.Values = append(r.Values, trade(u, get(c), prec))
		}
		return r
	}
	n := tradeunit.None
	return names, []CornerRow{
		row("motion ratio, damper/wheel", n, 3, (*pb.HandCorner).GetDamperMotionRatio),
		row("wheel rate", tradeunit.NewtonPerMM, 1, (*pb.HandCorner).GetWheelRateNPerM),
		row("tyre rate", tradeunit.NewtonPerMM, 1, (*pb.HandCorner).GetTyreRateNPerM),
		row("ride rate (wheel and tyre in series)", tradeunit.NewtonPerMM, 1, (*pb.HandCorner).GetRideRateNPerM),
		row("sprung corner mass", tradeunit.Kilogram, 1, (*pb.HandCorner).GetSprungMassKg),
		row("ride frequency, tyre ignored", tradeunit.Hertz, 2, (*pb.HandCorner).GetRideFrequencyHz),
		row("ride frequency, ride rate", tradeunit.Hertz, 2, (*pb.HandCorner).GetRideFrequencyWithTyreHz),
		row("critical damping at the wheel", tradeunit.NewtonSecondPerMM, 2, (*pb.HandCorner).GetCriticalDampingWheelNSPerM),
		row("critical damping at the damper", tradeunit.NewtonSecondPerMM, 2, (*pb.HandCorner).GetCriticalDampingDamperNSPerM),
		row("bump damping ratio", n, 3, func(c *pb.HandCorner) float64 { return c.GetBump().GetRatio() }),
		row("rebound damping ratio", n, 3, func(c *pb.HandCorner) float64 { return c.GetRebound().GetRatio() }),
		row("bump slope at the damper", tradeunit.NewtonSecondPerMM, 2, func(c *pb.HandCorner) float64 { return c.GetBump().GetSlopeNSPerM() }),
		row("rebound slope at the damper", tradeunit.NewtonSecondPerMM, 2, func(c *pb.HandCorner) float64 { return c.GetRebound().GetSlopeNSPerM() }),
	}
}

// Modes is a solution's modes per road case, as the sheet and the job
// page show them.
func Modes(sol *pb.Solution) []CaseModes {
	var out []CaseModes
	for _, cm := range sol.GetCaseMetrics() {
		out = append(out, caseModes(cm))
	}
	return out
}

// caseModes is a road case's modes, an overdamped one as such.
func caseModes(cm *pb.CaseMetrics) CaseModes {
	out := CaseModes{Case: cm.GetRoadCase()}
	for _, m := range cm.GetModes() {
		r := ModeRow{Name: m.GetName(), Undamped: num(m.GetUndampedFrequencyHz(), 2), Ratio: num(m.GetModalDampingRatio(), 2),
			Why: m.GetHandReason(), Overdamped: m.GetOverdamped()}
		if m.GetOverdamped() {
			r.Damped = "overdamped"
		} else {
			r.Damped = num(m.GetDampedFrequencyHz(), 2)
		}
		if m.GetHandDampingRatio() > 0 {
			r.Hand = num(m.GetHandDampingRatio(), 2)
		}
		out.Rows = append(out.Rows, r)
	}
	return out
}

// curvesSVG is the chart of the solution's curves with their adjuster
// band, as an element of the page, or why it cannot be drawn.
func curvesSVG(sol *pb.Solution) (template.HTML, string) {
	if len(sol.GetDamperCurves()) == 0 {
		return "", fmt.Sprintf("solution %d carries no damper curves", sol.GetIndex())
	}
	fig, err := plot.DamperCurves(sol.GetDamperCurves(), plot.CurveOptions{
		Title: fmt.Sprintf("Damper curves at the component, solution %d", sol.GetIndex())})
	if err != nil {
		return "", "the damper curves cannot be drawn: " + err.Error()
	}
	var b bytes.Buffer
	if err := fig.WriteSVG(&b); err != nil {
		return "", "the damper curves cannot be drawn: " + err.Error()
	}
	return plot.InlineSVG(b.Bytes()), ""
}

// clickRows is the click table: each corner's clicks out of its
// adjusters' positions.
func clickRows(adj *pb.Adjusters, clicks []*pb.CornerClicks) []ClickRow {
	var out []ClickRow
	for _, c := range clicks {
		i := api.ModelCorner(c.GetCorner())
		if i < 0 {
			continue
		}
		a := adj.GetFront()
		if i >= 2 {
			a = adj.GetRear()
		}
		of := func(click int32, j *pb.Adjuster) string {
			if click < 0 || j.GetClicks() == 0 {
				return ""
			}
			return fmt.Sprintf("%d of %d", click, j.GetClicks()-1)
		}
		out = append(out, ClickRow{Corner: model.CornerNames[i],
			LowBump: of(c.GetLowBump(), a.GetLowBump()), LowRebound: of(c.GetLowRebound(), a.GetLowRebound()),
			HighBump: of(c.GetHighBump(), a.GetHighBump()), HighRebound: of(c.GetHighRebound(), a.GetHighRebound())})
	}
	return out
}
