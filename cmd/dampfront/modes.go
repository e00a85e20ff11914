package main

import (
	"fmt"
	"io"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// modesNote heads the modes table of eval.
const modesNote = `Modes per road case, dampers at the case's equivalent slopes. Undamped: the
natural frequency of the car without dampers; damped: the frequency the mode
rings at; an overdamped mode does not ring (its decay rates are given instead).
Hand: the body mode alone on rigid tyres at the same slopes, as "dampfront hand"
works it out.`

// writeCaseModes prints the modes of each road case, the hand ratio
// beside the modal one with the reason they differ.
func writeCaseModes(w io.Writer, cases []*pb.CaseMetrics) error {
	fmt.Fprintln(w, modesNote)
	t := newTable(w, false)
	t.row("road case", "mode", "undamped Hz", "damped Hz", "modal ratio", "hand ratio", "why they differ")
	for _, m := range cases {
		for _, md := range m.GetModes() {
			hand, why := "", plain(md.GetHandReason())
			if md.GetHandDampingRatio() > 0 {
				hand = num(md.GetHandDampingRatio(), 2)
			}
			t.row(m.GetRoadCase(), md.GetName(), num(md.GetUndampedFrequencyHz(), 2), dampedText(md), num(md.GetModalDampingRatio(), 2), hand, why)
		}
	}
	return t.flush()
}

// dampedText is a mode's damped frequency, or "overdamped" with its
// decay rates (1/s), never a frequency made of two real roots.
func dampedText(m *pb.Mode) string {
	if !m.GetOverdamped() {
		return num(m.GetDampedFrequencyHz(), 2)
	}
	var rates []string
	for _, r := range m.GetDecayRatesPerS() {
		rates = append(rates, num(r, 1))
	}
	if len(rates) == 0 {
		return "overdamped"
	}
	return "overdamped (decay " + strings.Join(rates, ", ") + " 1/s)"
}
