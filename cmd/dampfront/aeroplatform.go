package main

import (
	"fmt"
	"io"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// writeAeroPlatform prints what the aero sees on each road case: the
// downforce and balance variation (api.AeroColumns) and the reference
// points' heights and ground-contact probabilities (api.PointColumns). It
// prints nothing for a car without aero or reference points.
func writeAeroPlatform(w io.Writer, cases []*pb.CaseMetrics) error {
	aero, points := false, false
	for _, m := range cases {
		aero = aero || m.GetAero() != nil
		points = points || len(m.GetReferencePoints()) > 0
	}
	if aero {
		fmt.Fprintln(w)
		t := newTable(w, false)
		head := []string{"aero platform"}
		for _, c := range api.AeroColumns {
			head = append(head, shown(c.Quantity).header())
		}
		t.row(head...)
		for _, m := range cases {
			cells := []string{m.GetRoadCase()}
			for _, c := range api.AeroColumns {
				if m.GetAero() == nil {
					cells = append(cells, "-")
					continue
				}
				cells = append(cells, tradeNum(shown(c.Quantity), c.Value(m.GetAero())))
			}
			t.row(cells...)
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
	head := []string{"reference point", "road case"}
	for _, c := range api.PointColumns {
		head = append(head, shown(c.Quantity).header())
	}
	t.row(head...)
	for _, m := range cases {
		for _, p := range m.GetReferencePoints() {
			cells := []string{p.GetName(), m.GetRoadCase()}
			for _, c := range api.PointColumns {
				if c.Quantity == tradeunit.GroundContact {
					cells = append(cells, tradeunit.ProbabilityText(c.Value(p)))
					continue
				}
				cells = append(cells, tradeNum(shown(c.Quantity), c.Value(p)))
			}
			t.row(cells...)
		}
	}
	return t.flush()
}
