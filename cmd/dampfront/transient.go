package main

import (
	"io"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// Quantities of the manoeuvre and kerb table.
var (
	qOvershoot = newQuantity("overshoot", tradeunit.Percent, 1, "overshoot")
	qRise      = newQuantity("t90", tradeunit.Millisecond, 0, "rise_90_s")
	qResponse  = newQuantity("driver response", tradeunit.Percent, 2, "driver_response")
	qLLTDDev   = newQuantity("LLTD dev", tradeunit.Percent, 2, "max_deviation")
	qLoadMin   = newQuantity("min tyre load", tradeunit.Newton, 0, "tyre_load_min_n")
	qUnloaded  = newQuantity("unloaded max", tradeunit.Millisecond, 1, "time_below_s")
	qLoadLoss  = newQuantity("load loss sum", tradeunit.Millisecond, 1, "load_loss_s")
	qRideMin   = newQuantity("min ride", tradeunit.Millimetre, 1, "ride_height_min_m")
	qStopTime  = newQuantity("stop max", tradeunit.Millisecond, 1, "bump_stop_time_s")
)

// writeTransients prints a solution's metrics on the manoeuvre and kerb
// cases, one row per case.
func writeTransients(w io.Writer, ms []*pb.TransientMetrics) error {
	if len(ms) == 0 {
		return nil
	}
	t := newTable(w, false)
	t.row("manoeuvre / kerb", "roll "+qOvershoot.header(), "roll "+qRise.header(), "pitch "+qOvershoot.header(), "pitch "+qRise.header(),
		qResponse.header(), qLLTDDev.header(), qLoadMin.header()+" FL/FR/RL/RR", qUnloaded.header(), qLoadLoss.header(),
		qRideMin.header()+" F/R", qStopTime.header())
	for _, m := range ms {
		list := func(q quantity, vs []float64) string {
			parts := make([]string, len(vs))
			for i, v := range vs {
				parts[i] = tradeNum(q, v)
			}
			return strings.Join(parts, "/")
		}
		most := func(vs []float64) float64 {
			v := 0.0
			for _, x := range vs {
				v = max(v, x)
			}
			return v
		}
		sum := 0.0
		for _, x := range m.GetLoadLossS() {
			sum += x
		}
		lltd := "-"
		if m.GetLltd().GetDefined() {
			lltd = tradeNum(qLLTDDev, m.GetLltd().GetMaxDeviation())
		}
		t.row(m.GetName()+" ("+m.GetKind()+")",
			tradeNum(qOvershoot, m.GetRoll().GetOvershoot()), tradeNum(qRise, m.GetRoll().GetRise_90S()),
			tradeNum(qOvershoot, m.GetPitch().GetOvershoot()), tradeNum(qRise, m.GetPitch().GetRise_90S()),
			tradeNum(qResponse, m.GetDriverResponse()), lltd, list(qLoadMin, m.GetTyreLoadMinN()),
			tradeNum(qUnloaded, most(m.GetTimeBelowS())), tradeNum(qLoadLoss, sum),
			list(qRideMin, m.GetRideHeightMinM()), tradeNum(qStopTime, most(m.GetBumpStopTimeS())))
	}
	return t.flush()
}
