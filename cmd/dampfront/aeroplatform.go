package main

import (
	"fmt"
	"io"
	"strconv"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// Quantities of the aero platform and reference-point tables.
var (
	qBalance        = shown(tradeunit.BalanceAtSpeed)
	qDownforceSD    = shown(tradeunit.DownforceSD)
	qDownforceShift = shown(tradeunit.DownforceShift)
	qBalanceSD      = shown(tradeunit.BalanceSD)
	qBalanceShift   = shown(tradeunit.BalanceShift)
	qPointHeight    = shown(tradeunit.PointHeight)
	qPointShift     = shown(tradeunit.PointShift)
	qPointSD        = shown(tradeunit.PointSD)
	qContact        = shown(tradeunit.GroundContact)
)

// writeAeroPlatform prints what the aero sees on each road case: the
// downforce and balance variation and the reference points' heights and
// ground-contact probabilities. It prints nothing for a car without aero
// or reference points.
func writeAeroPlatform(w io.Writer, cases []*pb.CaseMetrics) error {
	aero, points := false, false
	for _, m := range cases {
		aero = aero || m.GetAero() != nil
		points = points || len(m.GetReferencePoints()) > 0
	}
	if aero {
		fmt.Fprintln(w)
		t := newTable(w, false)
		t.row("aero platform", qBalance.header(), qDownforceSD.header(), qDownforceShift.header(), qBalanceSD.header(), qBalanceShift.header())
		for _, m := range cases {
			a := m.GetAero()
			if a == nil {
				t.row(m.GetRoadCase(), "-", "-", "-", "-", "-")
				continue
			}
			t.row(m.GetRoadCase(), tradeNum(qBalance, a.GetBalanceAtSpeed()), tradeNum(qDownforceSD, a.GetDownforceSdN()),
				tradeNum(qDownforceShift, a.GetDownforceShiftN()), tradeNum(qBalanceSD, a.GetBalanceSd()), tradeNum(qBalanceShift, a.GetBalanceShift()))
		}
		if err := t.flush(); err != nil {
			return err
		}
	}
	if !points {
		return nil
	}
	fmt.Fprintln(w)
	t := newTable(w, false)
	t.row("reference point", "road case", qPointHeight.header(), qPointShift.header(), qPointSD.header(), qContact.header())
	for _, m := range cases {
		for _, p := range m.GetReferencePoints() {
			t.row(p.GetName(), m.GetRoadCase(), tradeNum(qPointHeight, p.GetHeightAtSpeedM()), tradeNum(qPointShift, p.GetHeightShiftM()),
				tradeNum(qPointSD, p.GetHeightSdM()), probabilityText(p.GetContactProbability()))
		}
	}
	return t.flush()
}

// probabilityText writes a probability in per cent with three significant
// digits: a ground-contact probability spans many decades (1e-12 % and
// 3 % both matter), which fixed decimals would hide.
func probabilityText(p float64) string {
	return strconv.FormatFloat(qContact.trade(p), 'g', 3, 64)
}
