package main

import (
	"bytes"
	"os"
	"regexp"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// The second demo: the embedded job is testdata/prototype-job.yaml byte
// for byte, its car is testdata/tessaly-p3.yaml, and the spec compiles:
// the car has an equilibrium at every case's speed with its packers
// clear (gap left > 0) and its two floor points off the ground, and a setup in the middle of the bounds gives
// heave element metrics on both axles (travel sd > 0, packer
// probability in [0, 1)).
func TestPrototypeDemoData(t *testing.T) {
	t.Parallel()
	want, err := os.ReadFile(testdataPath("prototype-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(prototypeJob, want) {
		t.Fatal("cmd/dampfront/demodata/prototype-job.yaml differs from testdata/prototype-job.yaml: copy the latter over the former")
	}
	e := &env{getenv: func(string) string { return "" }}
	spec := &pb.JobSpec{}
	if err := readMessage(e, testdataPath("prototype-job.yaml"), spec); err != nil {
		t.Fatal(err)
	}
	car := &pb.Vehicle{}
	if err := readMessage(e, testdataPath("tessaly-p3.yaml"), car); err != nil {
		t.Fatal(err)
	}
	if !proto.Equal(spec.GetVehicle(), car) {
		t.Errorf("the prototype job's vehicle differs from tessaly-p3.yaml:\n%v\n%v", spec.GetVehicle(), car)
	}
	in, err := api.SpecToModel(spec)
	if err != nil {
		t.Fatal(err)
	}
	genes := in.Design.Genes()
	x := make([]float64, len(genes))
	for i, g := range genes {
		x[i] = (g.Min + g.Max) / 2
	}
	s := in.Design.Decode(x)
	if s.Heave[model.Front].BumpRatio == 0 || s.Heave[model.Rear].BumpRatio == 0 {
		t.Fatalf("the design space searches no heave damper: genes %v", genes)
	}
	var r model.Result
	if err := in.Evaluator.Evaluate(s, &r); err != nil {
		t.Fatal(err)
	}
	for _, m := range r.Cases {
		for ax := 0; ax < 2; ax++ {
			if m.AtSpeed.PackerGap[ax] <= 0 || m.HeaveTravelSD[ax] <= 0 || !(m.PackerProbability[ax] >= 0 && m.PackerProbability[ax] < 1) {
				t.Errorf("%s %s: packer gap left %g m, heave travel sd %g m, packer probability %g", m.Case, model.AxleNames[ax],
					m.AtSpeed.PackerGap[ax], m.HeaveTravelSD[ax], m.PackerProbability[ax])
			}
		}
		pts := m.ReferencePoints()
		if len(pts) != 2 {
			t.Fatalf("%s: %d reference points, want the splitter and the plank", m.Case, len(pts))
		}
		for _, p := range pts {
			if !(p.HeightAtSpeed > 0 && p.ContactProbability < 1e-3) {
				t.Errorf("%s %s: height at speed %g m, contact %g: the floor touches the ground", m.Case, p.Name, p.HeightAtSpeed, p.ContactProbability)
			}
			t.Logf("%s %s: %.1f mm at speed, sd %.2f mm, contact %.2g", m.Case, p.Name, p.HeightAtSpeed*1e3, p.SD*1e3, p.ContactProbability)
		}
		t.Logf("%s: ride heights at speed %.1f/%.1f mm, packer gap left %.1f/%.1f mm, heave travel sd %.2f/%.2f mm, packer %.2g/%.2g",
			m.Case, m.AtSpeed.RideHeight[0]*1e3, m.AtSpeed.RideHeight[1]*1e3, m.AtSpeed.PackerGap[0]*1e3, m.AtSpeed.PackerGap[1]*1e3,
			m.HeaveTravelSD[0]*1e3, m.HeaveTravelSD[1]*1e3, m.PackerProbability[0], m.PackerProbability[1])
	}
}

// demo --prototype runs the second demo job end to end: the search over
// corner and heave damper ratios finishes and the front shows the heave
// ratio genes, and the damper curves of the balanced point end with both
// heave dampers' tables (at the element).
func TestDemoPrototype(t *testing.T) {
	t.Parallel()
	r := mustRun(t, exitOK, []string{"TMPDIR=" + t.TempDir()}, "demo", "--quiet", "--prototype")
	for _, want := range []string{"succeeded: 12 of 12 generations", "front heave ratio  rear heave ratio", "Damper curves of the balanced point", "\nFront heave damper, at the component", "\nRear heave damper, at the component", cautionText} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("demo --prototype output lacks %q:\n%s", want, r.stdout)
		}
	}
}

// The heave-element table of eval: front/rear at the element in trade
// units (mm, mm/s, %), and nothing for a car without heave elements.
func TestWriteHeave(t *testing.T) {
	t.Parallel()
	m := &pb.CaseMetrics{RoadCase: "Caldermere esses",
		Front: &pb.AxleMetrics{HeaveTravelSdM: 0.00125, HeaveVelocitySdMPerS: 0.0312, PackerGapAtSpeedM: 0.0089, PackerProbability: 0.0025},
		Rear:  &pb.AxleMetrics{HeaveTravelSdM: 0.0005, HeaveVelocitySdMPerS: 0.02, PackerGapAtSpeedM: 0.0111}}
	var b strings.Builder
	if err := writeHeave(&b, []*pb.CaseMetrics{m}); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"heave travel sd mm F/R", "packer % F/R", "1.250/0.500", "31.2/20.0", "8.90/11.10", "0.250/0.000"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("heave table lacks %q:\n%s", want, b.String())
		}
	}
	b.Reset()
	if err := writeHeave(&b, []*pb.CaseMetrics{{RoadCase: "x", Front: &pb.AxleMetrics{}, Rear: &pb.AxleMetrics{}}}); err != nil || b.Len() != 0 {
		t.Errorf("a car without heave elements got %q (%v)", b.String(), err)
	}
}

// hand on the prototype shows each axle's heave figures: the front heave
// rate is 2 × 80 + 600 × 1.0² = 760 N/mm (Gillespie 1992, ride rate: the
// heave spring in parallel with the corner springs; worked by hand from
// testdata/tessaly-p3.yaml), the rear 2 × 90 + 700 × 0.9² = 747 N/mm.
func TestHandPrototypeHeave(t *testing.T) {
	t.Parallel()
	r := mustRun(t, exitOK, nil, "hand", "--spec", testdataPath("prototype-job.yaml"))
	for _, want := range []string{"Heave per axle", "heave rate    N/mm  760.0  747.0"} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("hand output lacks %q:\n%s", want, r.stdout)
		}
	}
	if r := mustRun(t, exitOK, nil, "hand", "--spec", testdataPath("demo-job.yaml")); strings.Contains(r.stdout, "Heave per axle") {
		t.Errorf("a car without heave elements shows heave figures:\n%s", r.stdout)
	}
}

// The heave dampers' tables follow the corner ones, named by axle, each
// speed's bump and rebound force (rebound signed, as in the corner
// tables) on one row in trade units; nothing is printed without heave
// curves. Figures worked by hand:
// 0.1 m/s = 100 mm/s, 1234 N bump, -2345 N rebound.
func TestWriteHeaveCurvesTable(t *testing.T) {
	t.Parallel()
	dc := &pb.DamperCurve{VelocityMPerS: []float64{-0.1, 0, 0.1}, ForceN: []float64{-2345, 0, 1234}, BumpSlopeNSPerM: 12340, ReboundSlopeNSPerM: 23450}
	resp := &pb.GetDamperCurvesResponse{HeaveCurves: []*pb.HeaveDamperCurve{{Axle: pb.AxlePosition_AXLE_POSITION_REAR, Curve: dc}}}
	var b strings.Builder
	if err := writeCurvesTables(&b, resp); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "Rear heave damper, at the component: low-speed slopes bump 12.34, rebound 23.45 N s/mm") ||
		!regexp.MustCompile(`\n\s*100\s+1234\s+-2345\n`).MatchString(b.String()) {
		t.Errorf("heave table:\n%s", b.String())
	}
	b.Reset()
	if err := writeCurvesTables(&b, &pb.GetDamperCurvesResponse{}); err != nil || b.Len() != 0 {
		t.Errorf("no curves printed %q (%v)", b.String(), err)
	}
}
