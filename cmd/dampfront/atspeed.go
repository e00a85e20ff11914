package main

import (
	"io"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// Quantities of the car-at-speed table.
var (
	qRideHeight = quantity{"ride height at speed", "mm", mmPerM, 1, "ride_height_m"}
	qRideChange = quantity{"ride change", "mm", mmPerM, 2, "ride_height_change_m"}
	qGapLeft    = quantity{"bump-stop gap left", "mm", mmPerM, 2, "bump_stop_gap_at_speed_m"}
	qCompress   = quantity{"compression", "mm", mmPerM, 2, "compression_at_speed_m"}
	qPitch      = quantity{"pitch at speed", "deg", degPerRad, 3, "pitch_rad"}
	qDownforce  = quantity{"downforce", "N", 1, 0, "downforce_n"}
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
