package main

import (
	"io"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// Quantities of the car-at-speed table.
var (
	qRideHeight = shown(tradeunit.RideHeightSpeed)
	qRideChange = newQuantity("ride change", tradeunit.Millimetre, 2, "ride_height_change_m")
	qGapLeft    = newQuantity("bump-stop gap left", tradeunit.Millimetre, 2, "bump_stop_gap_at_speed_m")
	qCompress   = newQuantity("compression", tradeunit.Millimetre, 2, "compression_at_speed_m")
	qPitch      = newQuantity("pitch at speed", tradeunit.Degree, 3, "pitch_rad")
	qDownforce  = shown(tradeunit.Downforce)
)

// writeAtSpeed prints the car at each road case's speed: the operating
// point under downforce that the probabilities start from.
func writeAtSpeed(w io.Writer, cases []*pb.CaseMetrics) error {
	t := newTable(w, false)
	t.row("car at speed", qRideHeight.header()+" F/R", qRideChange.header()+" F/R", qPitch.header(),
		qCompress.header()+" FL/FR/RL/RR", qGapLeft.header()+" FL/FR/RL/RR", qDownforce.header()+" F/R")
	for _, m := range cases {
		op, cm := m.GetAtSpeed(), m.GetCorners()
		per := func(q quantity, get func(*pb.CornerMetrics) float64) string {
			parts := make([]string, len(cm))
			for i, c := range cm {
				parts[i] = tradeNum(q, get(c))
			}
			return strings.Join(parts, "/")
		}
		t.row(m.GetRoadCase(),
			tradeNum(qRideHeight, op.GetFrontRideHeightM())+"/"+tradeNum(qRideHeight, op.GetRearRideHeightM()),
			tradeNum(qRideChange, op.GetFrontRideHeightChangeM())+"/"+tradeNum(qRideChange, op.GetRearRideHeightChangeM()),
			tradeNum(qPitch, op.GetPitchRad()),
			per(qCompress, (*pb.CornerMetrics).GetCompressionAtSpeedM),
			per(qGapLeft, (*pb.CornerMetrics).GetBumpStopGapAtSpeedM),
			tradeNum(qDownforce, op.GetFrontDownforceN())+"/"+tradeNum(qDownforce, op.GetRearDownforceN()))
	}
	return t.flush()
}
