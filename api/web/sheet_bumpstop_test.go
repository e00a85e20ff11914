package web

import (
	"bytes"
	"slices"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/sheet"
)

// The sheet lists each corner's bump-stop curve, an axle's corners in one
// table when alike, with the rate of each segment and the point at the
// damper (compression × MR, force ÷ MR). Expected values by hand for the
// demo car's front (gap 30 mm, MR 0.80) and rear (MR 0.78); the sheet
// prints mm to 0.1, N whole.
func TestSheetBumpStops(t *testing.T) {
	t.Parallel()
	spec := specFile(t, "demo-job.yaml")
	front := &pb.BumpStop{DeflectionM: []float64{0.004, 0.010}, ForceN: []float64{400, 2400}}
	for _, i := range []int{0, 1} {
		spec.Vehicle.Corners[i].BumpStop = front
	}
	spec.Vehicle.Corners[2].BumpStop = &pb.BumpStop{DeflectionM: []float64{0.006}, ForceN: []float64{1560}}
	corner := &pb.AxleDamping{BumpRatio: 0.6, ReboundRatio: 0.9}
	s, err := sheet.Build(&pb.Job{Name: "jobs/stops", Spec: spec}, &pb.Solution{Setup: &pb.Setup{Front: corner, Rear: corner}, Feasible: true}, false)
	if err != nil {
		t.Fatal(err)
	}
	want := []sheet.BumpStopTable{
		{Corners: "FL, FR", Gap: "30.0", Rows: []sheet.BumpStopRow{
			{Deflection: "4.0", Force: "400", Rate: "100.0", DamperDeflection: "3.2", DamperFN: "500"},
			{Deflection: "10.0", Force: "2400", Rate: "333.3", DamperDeflection: "8.0", DamperFN: "3000"},
		}},
		{Corners: "RL", Gap: "35.0", Rows: []sheet.BumpStopRow{
			{Deflection: "6.0", Force: "1560", Rate: "260.0", DamperDeflection: "4.7", DamperFN: "2000"},
		}},
	}
	if len(s.BumpStops) != len(want) {
		t.Fatalf("bump-stop tables %+v, want %+v", s.BumpStops, want)
	}
	for k := range want {
		if s.BumpStops[k].Corners != want[k].Corners || s.BumpStops[k].Gap != want[k].Gap || !slices.Equal(s.BumpStops[k].Rows, want[k].Rows) {
			t.Errorf("table %d: %+v, want %+v", k, s.BumpStops[k], want[k])
		}
	}
	var page bytes.Buffer
	if err := sheet.WriteHTML(&page, s); err != nil || !strings.Contains(page.String(), `<section id="bump-stops">`) {
		t.Errorf("the page has no bump-stop section (err %v)", err)
	}
	plain, err := sheet.Build(&pb.Job{Name: "jobs/plain", Spec: specFile(t, "demo-job.yaml")}, &pb.Solution{Setup: &pb.Setup{Front: corner, Rear: corner}, Feasible: true}, false)
	if err != nil || len(plain.BumpStops) != 0 {
		t.Errorf("a car without curves: %d bump-stop tables (err %v)", len(plain.BumpStops), err)
	}
}
