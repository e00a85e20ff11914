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
