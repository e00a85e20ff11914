package web

import (
	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// atSpeedView is the car at each road case's speed for one solution: the
// operating point under downforce, what the aero sees (downforce and
// balance variation, api.AeroColumns) and the reference points' heights
// and ground-contact probabilities (api.PointColumns).
type atSpeedView struct {
	Index        int32
	Headers      []header
	Rows         [][]string
	PointHeaders []header
	PointRows    [][]string
}

// Quantities of the operating point in the car-at-speed section.
var (
	qRideAtSpeed = shown(tradeunit.RideHeightSpeed)
	qDownforce   = shown(tradeunit.Downforce)
)

// newAtSpeedView is solution s's car-at-speed section, nil when the
// solution carries no case metrics.
func newAtSpeedView(s *pb.Solution) *atSpeedView {
	cases := s.GetCaseMetrics()
	if len(cases) == 0 {
		return nil
	}
	v := &atSpeedView{Index: s.GetIndex()}
	v.Headers = []header{{Label: "Road case"}, hdr(qRideAtSpeed, " F/R"), hdr(qDownforce, " F/R")}
	for _, c := range api.AeroColumns {
		v.Headers = append(v.Headers, hdr(shown(c.Quantity), ""))
	}
	for _, m := range cases {
		op := m.GetAtSpeed()
		row := []string{m.GetRoadCase(),
			qRideAtSpeed.text(op.GetFrontRideHeightM()) + " / " + qRideAtSpeed.text(op.GetRearRideHeightM()),
			qDownforce.text(op.GetFrontDownforceN()) + " / " + qDownforce.text(op.GetRearDownforceN())}
		for _, c := range api.AeroColumns {
			if m.GetAero() == nil {
				row = append(row, "–")
				continue
			}
			row = append(row, shown(c.Quantity).text(c.Value(m.GetAero())))
		}
		v.Rows = append(v.Rows, row)
		for _, p := range m.GetReferencePoints() {
			prow := []string{p.GetName(), m.GetRoadCase()}
			for _, c := range api.PointColumns {
				if c.Quantity == tradeunit.GroundContact {
					prow = append(prow, tradeunit.ProbabilityText(c.Value(p)))
					continue
				}
				prow = append(prow, shown(c.Quantity).text(c.Value(p)))
			}
			v.PointRows = append(v.PointRows, prow)
		}
	}
	if len(v.PointRows) > 0 {
		v.PointHeaders = []header{{Label: "Reference point"}, {Label: "Road case"}}
		for _, c := range api.PointColumns {
			v.PointHeaders = append(v.PointHeaders, hdr(shown(c.Quantity), ""))
		}
	}
	return v
}

// hdr is the column header of q, suffix after its label ("F/R").
func hdr(q quantity, suffix string) header {
	return header{Label: q.label + suffix, Unit: q.unit, Numeric: true}
}
