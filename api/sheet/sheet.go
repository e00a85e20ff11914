// Package sheet assembles the damper specification sheet of one solution
// of a finished job, the page a damper supplier is handed: per corner the
// forces at the test velocities with their tolerance band and the
// adjuster band, the curves, the damping ratios, ride rates and
// frequencies, the modes with the hand figures beside them, the
// objectives, the job and solution it comes from, and the caution. The
// command line (dampfront sheet) and the job page (a link per solution)
// write it with the one template of this package.
//
// The figures are in trade units (mm/s, N, N/mm, N s/mm, Hz; model/
// tradeunit); the forces come from model.DamperTestForces, the same law
// as the curves the job reports, and the ride figures from the hand
// method (api.EstimateByHand) on the job's car at the solution's ratios.
package sheet

import (
	"fmt"
	"html/template"
	"strconv"
	"strings"
	"time"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/model/tradeunit"
)

// Sheet is the content of one specification sheet, every figure already
// in its trade unit as text.
type Sheet struct {
	Title       string
	Job         string // resource name, "jobs/{id}"
	DisplayName string
	Car         string
	Seed        uint64
	Created     string // RFC 3339, UTC; empty when unknown
	Finished    string
	Index       int32 // the solution's index in the job's front
	Balanced    bool  // the front's balanced point
	Partial     bool  // the job did not run to its end

	Setup      []AxleRow
	Objectives []Figure
	// Robust says how a robust job's objectives were made (api.RobustText);
	// "" without uncertainty.
	Robust     string
	Feasible   bool
	Infeasible string // why not, when not feasible
	// Band is whether the spec gives an adjuster range; OutOfBand names
	// each corner and direction whose damper lies outside it
	// (model.OutOfBand at the test velocities), empty when within.
	Band      bool
	OutOfBand []string
	// Clicks is the click of each adjuster per corner, empty when the
	// spec gives no adjusters.
	Clicks []ClickRow

	Velocities  []string // test velocities, mm/s
	ForceTables []ForceTable
	// HeaveTables is the heave dampers' forces at the element, one per
	// axle with a heave damper; empty for a car without.
	HeaveTables   []ForceTable
	TestNote      string // where the test velocities and the band come from
	CurvesSVG     template.HTML
	CurvesProblem string

	CornerNames []string // FL, FR, RL, RR
	CornerRows  []CornerRow
	// BumpStops is the corners' bump-stop force curves, empty for a car
	// without them.
	BumpStops []BumpStopTable
	Modes     []CaseModes

	Warnings []string
	Caution  string
}

// AxleRow is one axle's setting: ratios at the wheel, knees at the
// damper, high-speed factors.
type AxleRow struct {
	Axle                                string
	BumpRatio, ReboundRatio             string
	KneeBump, KneeRebound               string // mm/s
	HighSpeedBump, HighSpeedRebound     string
	BumpSlopeDamper, ReboundSlopeDamper string // N s/mm at the damper, left corner
}

// Figure is one named value with its unit.
type Figure struct {
	Label, Value, Unit string
}

// ForceTable is the forces of one damper, or of several alike
// (Corners lists them), at the test velocities.
type ForceTable struct {
	Corners string // "FL, FR"
	Rows    []ForceRow
	Band    bool // the adjuster band's columns are filled
}

// ForceRow is one test velocity: the force, its tolerance band and the
// adjuster band, in bump and rebound (magnitudes, N).
type ForceRow struct {
	Velocity                string
	Bump, BumpMin, BumpMax  string
	BumpSoft, BumpStiff     string
	Rebound, RebMin, RebMax string
	RebSoft, RebStiff       string
}

// ClickRow is one corner's clicks: per adjuster (low-speed bump and
// rebound, high-speed bump and rebound) "7 of 20" counted from the
// stiffest (0), or empty where there is no such adjuster.
type ClickRow struct {
	Corner                                     string
	LowBump, LowRebound, HighBump, HighRebound string
}

// CornerRow is one row of the per-corner figures: a label, its unit and
// one value per corner.
type CornerRow struct {
	Label, Unit string
	Values      []string
}

// CaseModes is the modes of one road case at its equivalent slopes.
type CaseModes struct {
	Case string
	Rows []ModeRow
}

// ModeRow is one mode: undamped and damped frequency (or overdamped),
// modal ratio, the hand ratio and why they differ (heave, pitch, roll).
type ModeRow struct {
	Name, Undamped, Damped, Ratio, Hand, Why string
	Overdamped                               bool
}

// testNote says where the test velocities and the tolerance come from.
var testNote = fmt.Sprintf("Test velocities %s mm/s: common damper-dyno practice (no single source), "+
	"two in the low-speed range around the usual knee, then steps of 50 mm/s. Tolerance ±%g %% of the specified force: "+
	"common practice (no single source). Forces at the component (damper velocity), gas force not included; "+
	"rebound forces as magnitudes.", velocityList(), 100*model.DamperForceTolerance)

// Build assembles the sheet of sol, a solution of job's front in the
// full view (metrics, modes, curves); job in the full view (its spec).
// balanced says whether sol is the front's balanced point.
func Build(job *pb.Job, sol *pb.Solution, balanced bool) (*Sheet, error) {
	spec := job.GetSpec()
	if spec == nil {
		return nil, fmt.Errorf("sheet: job %s carries no spec (ask for the full view)", job.GetName())
	}
	s := &Sheet{
		Job: job.GetName(), DisplayName: job.GetDisplayName(), Car: spec.GetVehicle().GetName(), Seed: job.GetSeed(),
		Created: stamp(job.GetCreateTime().AsTime(), job.GetCreateTime() != nil), Finished: stamp(job.GetFinishTime().AsTime(), job.GetFinishTime() != nil),
		Index: sol.GetIndex(), Balanced: balanced, Partial: job.GetPartial(),
		Feasible: sol.GetFeasible(), Infeasible: sol.GetInfeasibleReason(),
		TestNote: testNote, Warnings: sol.GetWarnings(), Caution: model.Caution,
	}
	name := s.DisplayName
	if name == "" {
		name = s.Job
	}
	s.Title = fmt.Sprintf("Damper specification: %s, solution %d", name, s.Index)
	for j, o := range spec.GetObjectives() {
		if j < len(sol.GetObjectives()) {
			s.Objectives = append(s.Objectives, objectiveFigure(o, sol.GetObjectives()[j], ""))
		}
	}
	s.Objectives = append(s.Objectives, robustFigures(spec.GetObjectives(), sol.GetRobust())...)
	s.Robust = api.RobustText(job)
	in, err := api.SpecToModel(spec)
	if err != nil {
		return nil, fmt.Errorf("sheet: the job's spec: %w", err)
	}
	setup, err := api.SetupToModel(sol.GetSetup(), "setup")
	if err != nil {
		return nil, fmt.Errorf("sheet: solution %d: %w", s.Index, err)
	}
	forces, err := model.DamperTestForces(&in.Vehicle, &setup, in.Adjustment, model.BandVelocities)
	if err != nil {
		return nil, fmt.Errorf("sheet: solution %d: %w", s.Index, err)
	}
	band := model.AdjustersOf(in.Adjustment)
	s.Band = band.Given() || len(sol.GetClicks()) > 0
	for _, e := range sol.GetOutOfBand() {
		s.OutOfBand = append(s.OutOfBand, api.BandExcessText(e))
	}
	s.Clicks = clickRows(spec.GetAdjusters(), sol.GetClicks())
	s.Velocities = velocityTexts()
	s.ForceTables = forceTables(forces)
	adj := spec.GetAdjustment()
	if adj == nil {
		adj = &pb.Adjustment{} // no band
	}
	hand, err := api.EstimateByHand(&pb.EstimateByHandRequest{Vehicle: spec.GetVehicle(), Targets: sol.GetSetup(), Adjustment: adj})
	if err != nil {
		return nil, fmt.Errorf("sheet: the hand figures of solution %d: %w", s.Index, err)
	}
	s.Setup = axleRows(sol.GetSetup(), hand)
	if err := s.addHeave(&in.Vehicle, &setup, sol.GetSetup()); err != nil {
		return nil, fmt.Errorf("sheet: solution %d: %w", s.Index, err)
	}
	s.CornerNames, s.CornerRows = cornerRows(hand)
	s.BumpStops = bumpStopTables(&in.Vehicle)
	s.Modes = Modes(sol)
	s.CurvesSVG, s.CurvesProblem = curvesSVG(sol)
	return s, nil
}

// addHeave adds the heave dampers' setting rows and force tables, when
// the setup has heave dampers.
func (s *Sheet) addHeave(v *model.Vehicle, setup *model.Setup, ps *pb.Setup) error {
	curves, err := model.HeaveDamperCurves(v, setup, model.BandVelocities[0], 3)
	if err != nil || len(curves) == 0 {
		return err
	}
	forces, err := model.HeaveDamperTestForces(v, setup, model.BandVelocities)
	if err != nil {
		return err
	}
	s.Setup = append(s.Setup, heaveRows(ps, curves)...)
	s.HeaveTables = heaveForceTables(forces)
	return nil
}

// stamp is a time as the sheet prints it, empty when unknown.
func stamp(t time.Time, known bool) string {
	if !known {
		return ""
	}
	return t.UTC().Format(time.RFC3339)
}

// num formats a value with fixed decimals, never "-0.0".
func num(v float64, prec int) string {
	s := strconv.FormatFloat(v, 'f', prec, 64)
	if s[0] == '-' && strings.Trim(s, "-0.") == "" {
		return s[1:]
	}
	return s
}

// trade formats an SI value in a unit.
func trade(u tradeunit.Unit, si float64, prec int) string { return num(u.Of(si), prec) }

// objectiveFigure is an objective's value in its trade unit; a
// worst-case aggregation says so.
func objectiveFigure(o *pb.Objective, v float64, what string) Figure {
	q := tradeunit.Objective(api.ModelObjectiveKind(o.GetKind()))
	label := q.Label
	if o.GetAggregation() == pb.Aggregation_AGGREGATION_WORST {
		label += ", worst case"
	}
	return Figure{Label: label + what, Value: trade(q.Unit, v, q.Prec), Unit: q.Unit.Symbol}
}

// robustFigures are a robust solution's objectives on the nominal car and
// their sd and worst over the uncertain cars; none without figures.
func robustFigures(objectives []*pb.Objective, r *pb.RobustObjectives) []Figure {
	var out []Figure
	for _, f := range []struct {
		what string
		vs   []float64
	}{{", nominal car", r.GetNominal()}, {", sd over the uncertain cars", r.GetSd()}, {", worst over the uncertain cars", r.GetWorst()}} {
		for j, o := range objectives {
			if j < len(f.vs) {
				out = append(out, objectiveFigure(o, f.vs[j], f.what))
			}
		}
	}
	return out
}

// velocityList is the test velocities in mm/s, "25, 50, ..., 300".
func velocityList() string {
	out := ""
	for k, t := range velocityTexts() {
		if k > 0 {
			out += ", "
		}
		out += t
	}
	return out
}

func velocityTexts() []string {
	out := make([]string, len(model.BandVelocities))
	for k, v := range model.BandVelocities {
		out[k] = trade(tradeunit.MillimetrePerSecond, v, 0)
	}
	return out
}
