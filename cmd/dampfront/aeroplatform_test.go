package main

import (
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestWriteAeroPlatform: the eval's aero tables show the figures in trade
// units (balance in per cent, downforce in N, heights in mm, ground
// contact in per cent with three significant digits, since it spans
// decades) and nothing for a car without aero or points.
func TestWriteAeroPlatform(t *testing.T) {
	t.Parallel()
	cases := []*pb.CaseMetrics{{
		RoadCase: "fast",
		Aero:     &pb.AeroMetrics{BalanceAtSpeed: 0.4646, DownforceSdN: 65.93, DownforceShiftN: 29.9, BalanceSd: 0.00239, BalanceShift: 0.00039},
		ReferencePoints: []*pb.ReferencePointMetrics{
			{Name: "splitter", HeightAtSpeedM: 0.00510, HeightShiftM: -0.000610, HeightSdM: 0.001078, ContactProbability: 1.54e-5},
		},
	}, {RoadCase: "slow"}}
	var b strings.Builder
	if err := writeAeroPlatform(&b, cases); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"aero platform", "balance at speed %", "downforce sd N", "46.46", "65.9", "29.9", "0.239", "0.039",
		"reference point", "height at speed mm", "ground contact %", "splitter", "5.10", "-0.610", "1.078", "0.00154"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	b.Reset()
	if err := writeAeroPlatform(&b, []*pb.CaseMetrics{{RoadCase: "no aero"}}); err != nil || b.Len() != 0 {
		t.Errorf("a car without aero or points printed %q (err %v)", b.String(), err)
	}
}
