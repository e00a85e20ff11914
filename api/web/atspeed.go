package web

import (
	"strconv"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// atSpeedView is the car at each road case's speed for one solution: the
// operating point under downforce, what the aero sees (downforce and
// balance variation) and the reference points' heights and ground-contact
// probabilities.
type atSpeedView struct {
	Index        int32
	Headers      []header
	Rows         [][]string
	PointHeaders []header
	PointRows    [][]string
}

// Quantities of the car-at-speed section, from the one trade-unit table.
var (
	qRideAtSpeed    = shown(tradeunit.RideHeightSpeed)
	qDownforce      = shown(tradeunit.Downforce)
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

// newAtSpeedView is solution s's car-at-speed section, nil when the
// solution carries no case metrics.
func newAtSpeedView(s *pb.Solution) *atSpeedView {
	cases := s.GetCaseMetrics()
	if len(cases) == 0 {
		return nil
	}
	v := &atSpeedView{Index: s.GetIndex()}
	v.Headers = []header{{Label: "Road case"}, hdr(qRideAtSpeed, " F/R"), hdr(qDownforce, " F/R"),
		hdr(qBalance, ""), hdr(qDownforceSD, ""), hdr(qDownforceShift, ""), hdr(qBalanceSD, ""), hdr(qBalanceShift, "")}
	for _, m := range cases {
		op := m.GetAtSpeed()
		row := []string{m.GetRoadCase(),
			qRideAtSpeed.text(op.GetFrontRideHeightM()) + " / " + qRideAtSpeed.text(op.GetRearRideHeightM()),
			qDownforce.text(op.GetFrontDownforceN()) + " / " + qDownforce.text(op.GetRearDownforceN())}
		if a := m.GetAero(); a != nil {
			row = append(row, qBalance.text(a.GetBalanceAtSpeed()), qDownforceSD.text(a.GetDownforceSdN()),
				qDownforceShift.text(a.GetDownforceShiftN()), qBalanceSD.text(a.GetBalanceSd()), qBalanceShift.text(a.GetBalanceShift()))
		} else {
			row = append(row, "–", "–", "–", "–", "–")
		}
		v.Rows = append(v.Rows, row)
		for _, p := range m.GetReferencePoints() {
			v.PointRows = append(v.PointRows, []string{p.GetName(), m.GetRoadCase(), qPointHeight.text(p.GetHeightAtSpeedM()),
				qPointShift.text(p.GetHeightShiftM()), qPointSD.text(p.GetHeightSdM()),
				strconv.FormatFloat(p.GetContactProbability()*qContact.scale, 'g', 3, 64)})
		}
	}
	if len(v.PointRows) > 0 {
		v.PointHeaders = []header{{Label: "Reference point"}, {Label: "Road case"}, hdr(qPointHeight, ""), hdr(qPointShift, ""),
			hdr(qPointSD, ""), hdr(qContact, "")}
	}
	return v
}

// hdr is the column header of q, suffix after its label ("F/R").
func hdr(q quantity, suffix string) header {
	return header{Label: q.label + suffix, Unit: q.unit, Numeric: true}
}
