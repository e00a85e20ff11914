package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/model/tradeunit"
)

var handCommand = &command{name: "hand", synopsis: "[flags] (--vehicle FILE | --spec FILE)", minArgs: 0, maxArgs: 0,
	summary: "the hand method for a car: critical damping, ride frequencies, target slopes, knee forces, adjuster band (no server)",
	about:   handAbout, flags: bindHand}

const handAbout = `
Works out the hand method for a car, in this process (no server, no job,
no road): per corner the critical damping at the wheel, 2 sqrt(wheel rate x
sprung corner mass) with the tyre ignored, and at the damper (over the
motion ratio squared); the ride frequencies without and with the tyre in
series (ride rate, Gillespie 1992); the damper at the component for the
target ratios: low-speed slopes, forces at the knee, high-speed slopes and
the adjuster band. Then heave, pitch and roll worked out alone on rigid
tyres beside the same modes of the full car (tyres, wheels, coupling), with
the reason they differ.

The car comes from --vehicle (a Vehicle message) or --spec (a job spec:
its car, its adjuster range and its base knees and high-speed factors).
Targets not given are common practice (no single source): bump 0.7,
rebound 0.8, knee 50 mm/s, high-speed slope 0.3 of the low-speed one,
adjuster band 0.5 to 1.2. The same as the EstimateByHand RPC; --format json
prints its response (SI), csv one row per corner (SI).`

// handFlags are the hand command's inputs.
type handFlags struct {
	vehicle, spec                  string
	bump, rebound, knee, highSpeed float64
	speed                          float64
	adjust                         rangeFlag
	format                         *formatFlag
	setFlags                       map[string]bool
}

func bindHand(fs *flagSet, _ *env) (runFunc, error) {
	h := &handFlags{format: newFormat("table", "table", "csv", "json")}
	fs.StringVar(&h.vehicle, "vehicle", "", "the car: a Vehicle message in a YAML/JSON `file`")
	fs.StringVar(&h.spec, "spec", "", "the car, adjuster range and base knees of a job spec `file`")
	fs.Float64Var(&h.bump, "bump", model.HandBumpRatio, "target bump `ratio` at the wheel (common practice)")
	fs.Float64Var(&h.rebound, "rebound", model.HandReboundRatio, "target rebound `ratio` at the wheel (common practice)")
	fs.Float64Var(&h.knee, "knee", tradeunit.MillimetrePerSecond.Of(model.HandKnee), "knee velocity at the damper, `mm/s` (common practice)")
	fs.Float64Var(&h.highSpeed, "high-speed", model.HandHighSpeedFactor, "high-speed slope over the low-speed one, a `factor` (common practice)")
	fs.Var(&h.adjust, "adjust", fmt.Sprintf("adjuster band as ratios at the wheel, `SOFTEST,STIFFEST` (common practice %g,%g; 0,0 leaves it out)", model.HandSoftestRatio, model.HandStiffestRatio))
	fs.Float64Var(&h.speed, "speed", 0, "speed of the modal figures, `m/s` (sets the aero stiffness; 0 standing)")
	fs.Var(h.format, "format", "output `format`: table, csv or json")
	return func(_ context.Context, e *env, in *parsed) error { return h.run(e, in.fs) }, nil
}

// run works the hand method out in this process and prints it.
func (h *handFlags) run(e *env, fs *flagSet) error {
	if (h.vehicle == "") == (h.spec == "") {
		return usagef("hand", "give either --vehicle or --spec")
	}
	h.setFlags = map[string]bool{}
	for _, n := range []string{"knee", "high-speed", "adjust"} {
		h.setFlags[n] = isFlagSet(fs, n)
	}
	req, name, err := h.request(e)
	if err != nil {
		return err
	}
	resp, err := api.EstimateByHand(req)
	if err != nil {
		return err
	}
	switch h.format.value {
	case "json":
		return printProtoJSON(e.stdout, resp)
	case "csv":
		return writeHandCSV(e.stdout, resp)
	}
	return writeHandTable(e.stdout, name, resp)
}

// request builds the EstimateByHand request of the flags: the car and,
// from a spec, its adjuster range and base knees and factors unless the
// flags give them.
func (h *handFlags) request(e *env) (*pb.EstimateByHandRequest, string, error) {
	req := &pb.EstimateByHandRequest{SpeedMPerS: h.speed}
	var base *pb.Setup
	if h.spec != "" {
		spec, err := readSpec(e, h.spec)
		if err != nil {
			return nil, "", err
		}
		req.Vehicle, req.Adjustment, base = spec.GetVehicle(), spec.GetAdjustment(), spec.GetDesignSpace().GetBase()
	} else {
		req.Vehicle = &pb.Vehicle{}
		if err := readMessage(e, h.vehicle, req.Vehicle); err != nil {
			return nil, "", err
		}
	}
	if h.setFlags["adjust"] || req.Adjustment == nil {
		a := rangeFlag{min: model.HandSoftestRatio, max: model.HandStiffestRatio}
		if h.setFlags["adjust"] {
			a = h.adjust
		}
		req.Adjustment = &pb.Adjustment{BumpSoftestRatio: a.min, BumpStiffestRatio: a.max, ReboundSoftestRatio: a.min, ReboundStiffestRatio: a.max}
	}
	req.Targets = &pb.Setup{Front: h.axle(base.GetFront()), Rear: h.axle(base.GetRear())}
	return req, req.GetVehicle().GetName(), nil
}

// axle is one axle's targets: the flags' ratios, and the knees and
// factors of the spec's base axle unless the flags give them.
func (h *handFlags) axle(base *pb.AxleDamping) *pb.AxleDamping {
	a := &pb.AxleDamping{BumpRatio: h.bump, ReboundRatio: h.rebound,
		KneeBumpMPerS: fromMmPerS(h.knee), KneeReboundMPerS: fromMmPerS(h.knee),
		HighSpeedBumpFactor: h.highSpeed, HighSpeedReboundFactor: h.highSpeed}
	if base != nil && !h.setFlags["knee"] {
		a.KneeBumpMPerS, a.KneeReboundMPerS = base.GetKneeBumpMPerS(), base.GetKneeReboundMPerS()
	}
	if base != nil && !h.setFlags["high-speed"] {
		a.HighSpeedBumpFactor, a.HighSpeedReboundFactor = base.GetHighSpeedBumpFactor(), base.GetHighSpeedReboundFactor()
	}
	return a
}

// handRows are the per-corner rows of the table and the CSV columns.
var handRows = []struct {
	q   quantity
	get func(*pb.HandCorner) float64
}{
	{qWheelRate, (*pb.HandCorner).GetWheelRateNPerM},
	{qTyreRate, (*pb.HandCorner).GetTyreRateNPerM},
	{qRideRate, (*pb.HandCorner).GetRideRateNPerM},
	{qSprungMass, (*pb.HandCorner).GetSprungMassKg},
	{qMotionRatio, (*pb.HandCorner).GetDamperMotionRatio},
	{qRideFreq, (*pb.HandCorner).GetRideFrequencyHz},
	{qRideFreqTyre, (*pb.HandCorner).GetRideFrequencyWithTyreHz},
	{qCritWheel, (*pb.HandCorner).GetCriticalDampingWheelNSPerM},
	{qCritDamper, (*pb.HandCorner).GetCriticalDampingDamperNSPerM},
}

// handBranchRows are the rows of each direction.
var handBranchRows = []struct {
	q   quantity
	get func(*pb.HandBranch) float64
}{
	{newQuantity("ratio", tradeunit.None, 2, "ratio"), (*pb.HandBranch).GetRatio},
	{qSlope, (*pb.HandBranch).GetSlopeNSPerM},
	{qKnee, (*pb.HandBranch).GetKneeMPerS},
	{newQuantity("force at knee", tradeunit.Newton, 0, "knee_force_n"), (*pb.HandBranch).GetKneeForceN},
	{newQuantity("high-speed slope", tradeunit.NewtonSecondPerMM, 2, "high_speed_slope_n_s_per_m"), (*pb.HandBranch).GetHighSpeedSlopeNSPerM},
	{newQuantity("softest slope", tradeunit.NewtonSecondPerMM, 2, "softest_slope_n_s_per_m"), (*pb.HandBranch).GetSoftestSlopeNSPerM},
	{newQuantity("stiffest slope", tradeunit.NewtonSecondPerMM, 2, "stiffest_slope_n_s_per_m"), (*pb.HandBranch).GetStiffestSlopeNSPerM},
	{newQuantity("softest at knee", tradeunit.Newton, 0, "softest_knee_force_n"), (*pb.HandBranch).GetSoftestKneeForceN},
	{newQuantity("stiffest at knee", tradeunit.Newton, 0, "stiffest_knee_force_n"), (*pb.HandBranch).GetStiffestKneeForceN},
}

func writeHandTable(w io.Writer, name string, r *pb.EstimateByHandResponse) error {
	f := r.GetTargets().GetFront()
	fmt.Fprintf(w, "Hand method for %s: targets front %s, rear %s; adjuster band bump %g-%g, rebound %g-%g (ratios at the wheel).\n",
		name, axleTargetText(f), axleTargetText(r.GetTargets().GetRear()),
		r.GetAdjustment().GetBumpSoftestRatio(), r.GetAdjustment().GetBumpStiffestRatio(),
		r.GetAdjustment().GetReboundSoftestRatio(), r.GetAdjustment().GetReboundStiffestRatio())
	fmt.Fprintln(w, "Critical damping ignores the tyre; slopes and forces are at the damper (the component). Targets")
	fmt.Fprintln(w, "not given by flag or spec are common practice (no single source), not a recommendation for this car.")
	fmt.Fprintln(w)
	t := newTable(w, true)
	head := []string{"per corner", ""}
	for _, c := range r.GetCorners() {
		head = append(head, cornerShort[c.GetCorner()])
	}
	t.row(head...)
	for _, row := range handRows {
		cells := []string{row.q.label, row.q.unit}
		for _, c := range r.GetCorners() {
			cells = append(cells, tradeNum(row.q, row.get(c)))
		}
		t.row(cells...)
	}
	for _, dir := range []string{"bump", "rebound"} {
		for _, row := range handBranchRows {
			cells := []string{dir + " " + row.q.label, row.q.unit}
			for _, c := range r.GetCorners() {
				b := c.GetBump()
				if dir == "rebound" {
					b = c.GetRebound()
				}
				cells = append(cells, tradeNum(row.q, row.get(b)))
			}
			t.row(cells...)
		}
	}
	if err := t.flush(); err != nil {
		return err
	}
	if err := writeHandAxles(w, r.GetAxles()); err != nil {
		return err
	}
	if err := writeHandModes(w, r); err != nil {
		return err
	}
	printCaution(w)
	return nil
}

// axleTargetText is "bump 0.70 rebound 0.80, knee 50 mm/s, high-speed 0.30".
func axleTargetText(a *pb.AxleDamping) string {
	return fmt.Sprintf("bump %.2f rebound %.2f, knees %s/%s mm/s, high-speed %.2f/%.2f", a.GetBumpRatio(), a.GetReboundRatio(),
		tradeNum(qKnee, a.GetKneeBumpMPerS()), tradeNum(qKnee, a.GetKneeReboundMPerS()), a.GetHighSpeedBumpFactor(), a.GetHighSpeedReboundFactor())
}

// writeHandModes prints heave, pitch and roll by hand beside the car's.
func writeHandModes(w io.Writer, r *pb.EstimateByHandResponse) error {
	fmt.Fprintf(w, "\nBody modes at %g m/s. Hand: the mode alone on the wheel rates (and bars in roll), tyres rigid.\n", r.GetSpeedMPerS())
	fmt.Fprintln(w, "Car: the full model (tyres, wheels, coupling), dampers at their mean target slopes.")
	t := newTable(w, false)
	t.row("mode", "hand Hz", "hand ratio", "with tyres", "car undamped Hz", "car damped Hz", "car modal ratio", "why they differ")
	for _, m := range r.GetModes() {
		md := m.GetModal()
		t.row(m.GetName(), num(m.GetHandFrequencyHz(), 2), num(m.GetHandDampingRatio(), 2), num(m.GetTyreDampingRatio(), 2),
			num(md.GetUndampedFrequencyHz(), 2), dampedText(md), num(md.GetModalDampingRatio(), 2), m.GetReason())
	}
	return t.flush()
}

func writeHandCSV(w io.Writer, r *pb.EstimateByHandResponse) error {
	cw := csv.NewWriter(w)
	head := []string{"corner"}
	for _, row := range handRows {
		head = append(head, row.q.column)
	}
	for _, dir := range []string{"bump", "rebound"} {
		for _, row := range handBranchRows {
			head = append(head, dir+"_"+row.q.column)
		}
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	for _, c := range r.GetCorners() {
		rec := []string{c.GetCorner().String()}
		for _, row := range handRows {
			rec = append(rec, siNum(row.get(c)))
		}
		for _, b := range []*pb.HandBranch{c.GetBump(), c.GetRebound()} {
			for _, row := range handBranchRows {
				rec = append(rec, siNum(row.get(b)))
			}
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
