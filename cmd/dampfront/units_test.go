package main

import (
	"math"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// The trade-unit conversions against their definitions: the SI prefix
// milli = 1e-3 (BIPM, The International System of Units, 9th ed. 2019,
// Table 7), the degree = pi/180 rad (ibid., Table 8), and the standard
// acceleration of gravity g_n = 9.80665 m/s^2 (3rd CGPM, 1901; ISO
// 80000-3:2019, 3-9.1). Tolerance: one part in 1e15, the rounding of one
// multiplication or division of float64 values.
func TestTradeUnits(t *testing.T) {
	t.Parallel()
	gripPlatform := []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM}}
	const tol = 1e-15
	tests := []struct {
		name     string
		got      float64
		want     float64
		whereSrc string
	}{
		{"1 m is 1000 mm", qRideSD.trade(1), 1000, "milli"},
		{"0.0015 m is 1.5 mm", qTravelSD.trade(0.0015), 1.5, "milli"},
		{"0.05 m/s is 50 mm/s", qDamperVelSD.trade(0.05), 50, "milli"},
		{"250 mm/s is 0.25 m/s", fromMmPerS(250), 0.25, "milli"},
		{"12140 N s/m is 12.14 N s/mm", qSlope.trade(12140), 12.14, "milli in the denominator"},
		{"0.089 is 8.9 %", pct(0.089), 8.9, "per cent = 1e-2"},
		{"pi rad is 180 deg", qPitchSD.trade(math.Pi), 180, "degree"},
		{"9.80665 m/s^2 is 1 g", qHeaveSD.trade(9.80665), 1, "g_n"},
		{"platform objective 1.539e-3 m in mm", objectiveQuantity(pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM).trade(1.539e-3), 1.539, "milli"},
		{"grip objective 0.089 in % static", objectiveQuantity(pb.ObjectiveKind_OBJECTIVE_KIND_GRIP).trade(0.089), 8.9, "per cent"},
		{"pitch objective pi/180 rad in deg", objectiveQuantity(pb.ObjectiveKind_OBJECTIVE_KIND_PITCH).trade(math.Pi / 180), 1, "degree"},
		{"heave objective g_n in g", objectiveQuantity(pb.ObjectiveKind_OBJECTIVE_KIND_HEAVE_ACCEL).trade(9.80665), 1, "g_n"},
		{"jacking limit 0.003 m in mm", constraintQuantity(pb.ConstraintKind_CONSTRAINT_KIND_JACKING).trade(0.003), 3, "milli"},
		{"knee gene 0.05 m/s in mm/s", geneQuantity("front_knee_m_per_s").trade(0.05), 50, "milli"},
		{"ratio gene unchanged", geneQuantity("front_bump_ratio").trade(0.73), 0.73, "dimensionless"},
		{"hypervolume 2e-5 (fraction m) is 2 % mm", hypervolumeQuantity(gripPlatform).trade(2e-5), 2, "per cent times milli"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			if math.Abs(tt.got-tt.want) > tol*math.Abs(tt.want) {
				t.Errorf("got %.17g, want %.17g (%s)", tt.got, tt.want, tt.whereSrc)
			}
		})
	}
}

// Every objective and constraint kind of the API has a table label and a
// CSV/JSON column named with its SI unit (or none for a dimensionless
// value) in the trade-unit table (a kind the table does not know is shown
// in "SI"), and no two share a column.
func TestQuantityNamesComplete(t *testing.T) {
	t.Parallel()
	seen := map[string]string{}
	for v, name := range pb.ObjectiveKind_name {
		if v == 0 {
			continue
		}
		q := objectiveQuantity(pb.ObjectiveKind(v))
		if q.unit == "" || q.unit == "SI" || q.column == "" {
			t.Errorf("%s has no trade unit or column: %+v", name, q)
		}
		if other, dup := seen[q.column]; dup {
			t.Errorf("%s and %s share column %s", name, other, q.column)
		}
		seen[q.column] = name
	}
	for v, name := range pb.ConstraintKind_name {
		if v == 0 {
			continue
		}
		if q := constraintQuantity(pb.ConstraintKind(v)); q.unit == "" || q.unit == "SI" || q.column == "" {
			t.Errorf("%s has no trade unit or column: %+v", name, q)
		}
	}
}

// The hypervolume is printed in the unit the hypervolume chart draws it
// in (api/plot: "% × mm" for grip and platform), by get and watch alike.
func TestHypervolumeInTradeUnits(t *testing.T) {
	t.Parallel()
	objs := []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM}}
	p := &pb.Progress{Hypervolume: 1.234e-5, Generation: 3, Generations: 30}
	const want = "1.234 % × mm"
	if got := hypervolumeText(p.Hypervolume, objs); got != want {
		t.Errorf("hypervolumeText = %q, want %q", got, want)
	}
	if got := progressText(p, objs); !strings.Contains(got, "hv "+want) {
		t.Errorf("watch's progress %q lacks %q", got, want)
	}
	var b strings.Builder
	j := &pb.Job{Name: "jobs/x", Progress: p, Spec: &pb.JobSpec{Objectives: objs}}
	if err := writeJob(&b, j); err != nil || !strings.Contains(b.String(), "hypervolume  "+want) {
		t.Errorf("get lacks the hypervolume %q (%v):\n%s", want, err, b.String())
	}
}

// The eval table's heave column is an acceleration in g (the SD of the
// CG's vertical acceleration): its header says so, not "heave sd", which
// reads as a displacement.
func TestEvalHeaveColumnIsAnAcceleration(t *testing.T) {
	t.Parallel()
	var b strings.Builder
	s := &pb.Solution{Feasible: true, CaseMetrics: []*pb.CaseMetrics{{RoadCase: "Ashgrove Ring", HeaveAccelSdMPerS2: 9.80665 * 0.0333}}}
	if err := writeEvaluation(&b, "x", s, nil, nil); err != nil {
		t.Fatal(err)
	}
	header, row, _ := strings.Cut(strings.SplitN(b.String(), "\n\n", 2)[1], "\n")
	if !strings.Contains(header, "heave accel sd g") || strings.Contains(header, "heave sd") || !strings.Contains(row, "0.0333") {
		t.Errorf("eval's heave column:\n%s\n%s", header, row)
	}
}
