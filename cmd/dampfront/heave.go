package main

import (
	"io"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// Quantities of the heave-element table.
var (
	qHeaveTravelSD = newQuantity("heave travel sd", tradeunit.Millimetre, 3, "heave_travel_sd_m")
	qHeaveVelSD    = newQuantity("heave vel sd", tradeunit.MillimetrePerSecond, 1, "heave_velocity_sd_m_per_s")
	qPackerGap     = newQuantity("packer gap left", tradeunit.Millimetre, 2, "packer_gap_at_speed_m")
	qPacker        = newQuantity("packer", tradeunit.Percent, 3, "packer_probability")
)

// The hand method's heave rows, per axle.
var handAxleRows = []struct {
	q   quantity
	get func(*pb.HandAxle) float64
}{
	{newQuantity("heave rate", tradeunit.NewtonPerMM, 1, "heave_rate_n_per_m"), (*pb.HandAxle).GetHeaveRateNPerM},
	{newQuantity("of it heave spring", tradeunit.NewtonPerMM, 1, "heave_spring_rate_n_per_m"), (*pb.HandAxle).GetHeaveSpringRateNPerM},
	{newQuantity("axle sprung mass", tradeunit.Kilogram, 1, "sprung_mass_kg"), (*pb.HandAxle).GetSprungMassKg},
	{newQuantity("heave frequency, no tyre", tradeunit.Hertz, 2, "heave_frequency_hz"), (*pb.HandAxle).GetHeaveFrequencyHz},
	{newQuantity("heave motion ratio", tradeunit.None, 3, "heave_motion_ratio"), (*pb.HandAxle).GetHeaveMotionRatio},
	{newQuantity("heave critical, wheels", tradeunit.NewtonSecondPerMM, 2, "critical_damping_heave_n_s_per_m"), (*pb.HandAxle).GetCriticalDampingHeaveNSPerM},
	{newQuantity("heave critical, element", tradeunit.NewtonSecondPerMM, 2, "critical_damping_element_n_s_per_m"), (*pb.HandAxle).GetCriticalDampingElementNSPerM},
}

// writeHandAxles prints the hand method's heave figures per axle when the
// car has a heave element (nothing otherwise).
func writeHandAxles(w io.Writer, axles []*pb.HandAxle) error {
	has := false
	for _, a := range axles {
		has = has || a.GetHeaveMotionRatio() > 0
	}
	if !has {
		return nil
	}
	if _, err := io.WriteString(w, "\nHeave per axle: the heave spring in parallel with the corner springs (Gillespie, ride rate).\n"); err != nil {
		return err
	}
	t := newTable(w, true)
	head := []string{"per axle", ""}
	for _, a := range axles {
		head = append(head, a.GetAxle())
	}
	t.row(head...)
	for _, row := range handAxleRows {
		cells := []string{row.q.label, row.q.unit}
		for _, a := range axles {
			cells = append(cells, tradeNum(row.q, row.get(a)))
		}
		t.row(cells...)
	}
	return t.flush()
}

// hasHeave reports whether any road case shows a heave element.
func hasHeave(cases []*pb.CaseMetrics) bool {
	for _, m := range cases {
		if m.GetFront().GetHeaveTravelSdM() > 0 || m.GetRear().GetHeaveTravelSdM() > 0 {
			return true
		}
	}
	return false
}

// writeHeave prints the heave (third) elements per road case, front/rear
// at the element: travel and velocity sd, the packer gap left at speed
// and the packer contact probability. Nothing for a car without them.
func writeHeave(w io.Writer, cases []*pb.CaseMetrics) error {
	if !hasHeave(cases) {
		return nil
	}
	t := newTable(w, false)
	t.row("heave elements", qHeaveTravelSD.header()+" F/R", qHeaveVelSD.header()+" F/R", qPackerGap.header()+" F/R", qPacker.header()+" F/R")
	for _, m := range cases {
		f, r := m.GetFront(), m.GetRear()
		pair := func(q quantity, get func(*pb.AxleMetrics) float64) string {
			return tradeNum(q, get(f)) + "/" + tradeNum(q, get(r))
		}
		t.row(m.GetRoadCase(), pair(qHeaveTravelSD, (*pb.AxleMetrics).GetHeaveTravelSdM), pair(qHeaveVelSD, (*pb.AxleMetrics).GetHeaveVelocitySdMPerS),
			pair(qPackerGap, (*pb.AxleMetrics).GetPackerGapAtSpeedM), pair(qPacker, (*pb.AxleMetrics).GetPackerProbability))
	}
	if err := t.flush(); err != nil {
		return err
	}
	_, err := io.WriteString(w, "\n")
	return err
}
