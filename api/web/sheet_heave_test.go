package web

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/sheet"
	"dampfront/model"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"
	"sigs.k8s.io/yaml"
)

// specFile reads a job spec of testdata.
func specFile(t *testing.T, name string) *pb.JobSpec {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	j, err := yaml.YAMLToJSON(b)
	if err != nil {
		t.Fatal(err)
	}
	spec := &pb.JobSpec{}
	if err := protojson.Unmarshal(j, spec); err != nil {
		t.Fatal(err)
	}
	return spec
}

// heaveSheet builds the sheet of one setting of a demo job's car: corner
// ratios 0.6/0.9 on both axles, heave ratios 0.4 front and 0.7 rear with
// the prototype's heave hardware (knees, factors) when heave is true.
func heaveSheet(t *testing.T, file string, heave bool) (*sheet.Sheet, model.Vehicle, model.Setup) {
	t.Helper()
	spec := specFile(t, file)
	corner := &pb.AxleDamping{BumpRatio: 0.6, ReboundRatio: 0.9}
	setup := &pb.Setup{Front: corner, Rear: corner}
	if heave {
		// The knees and factors of testdata/prototype-job.yaml's heave hardware.
		front := &pb.AxleDamping{BumpRatio: 0.4, ReboundRatio: 0.4, KneeBumpMPerS: 0.03, KneeReboundMPerS: 0.03, HighSpeedBumpFactor: 0.5, HighSpeedReboundFactor: 0.5}
		rear := proto.Clone(front).(*pb.AxleDamping)
		rear.BumpRatio, rear.ReboundRatio = 0.7, 0.7
		setup.FrontHeave, setup.RearHeave = front, rear
	}
	s, err := sheet.Build(&pb.Job{Name: "jobs/heave", Spec: spec}, &pb.Solution{Setup: setup, Feasible: true}, false)
	if err != nil {
		t.Fatal(err)
	}
	in, err := api.SpecToModel(spec)
	if err != nil {
		t.Fatal(err)
	}
	ms, err := api.SetupToModel(setup, "setup")
	if err != nil {
		t.Fatal(err)
	}
	return s, in.Vehicle, ms
}

// The prototype demo's sheet has a "Heave dampers" section, one table per
// axle, whose forces are model.HeaveDamperTestForces (checked against the
// two-slope closed form with c = ζ 2 sqrt(k_heave m_axle)/MR3² in
// model/heavecurves_test.go), and the heave ratios in its setting table;
// the road car's sheet has neither. Tolerance 0.5 N: the sheet prints
// whole newtons.
func TestSheetHeaveDampers(t *testing.T) {
	t.Parallel()
	const tol = 0.5 + 1e-9
	s, v, ms := heaveSheet(t, "prototype-job.yaml", true)
	want, err := model.HeaveDamperTestForces(&v, &ms, model.BandVelocities)
	if err != nil {
		t.Fatal(err)
	}
	if len(s.HeaveTables) != 2 || len(want) != 2 {
		t.Fatalf("prototype: %d heave tables (model %d), want 2", len(s.HeaveTables), len(want))
	}
	for ax, ft := range s.HeaveTables {
		if wantName := model.AxleNames[ax] + " heave"; ft.Corners != wantName || ft.Band {
			t.Errorf("heave table %d: %q band %v, want %q without band", ax, ft.Corners, ft.Band, wantName)
		}
		if len(ft.Rows) != len(model.BandVelocities) {
			t.Fatalf("%s: %d rows, want %d", ft.Corners, len(ft.Rows), len(model.BandVelocities))
		}
		for k, row := range ft.Rows {
			for _, x := range []struct {
				name string
				got  string
				want float64
			}{
				{"bump", row.Bump, want[ax].Bump.Force[k]}, {"bump min", row.BumpMin, want[ax].Bump.Min[k]}, {"bump max", row.BumpMax, want[ax].Bump.Max[k]},
				{"rebound", row.Rebound, want[ax].Rebound.Force[k]}, {"rebound min", row.RebMin, want[ax].Rebound.Min[k]}, {"rebound max", row.RebMax, want[ax].Rebound.Max[k]},
			} {
				if g := parseN(t, x.got); math.Abs(g-x.want) > tol {
					t.Errorf("%s at %s mm/s %s: sheet %g N, model %.3f N", ft.Corners, row.Velocity, x.name, g, x.want)
				}
			}
		}
	}
	var rows []string
	for _, r := range s.Setup {
		rows = append(rows, r.Axle+" "+r.BumpRatio)
	}
	if got := strings.Join(rows, "; "); got != "front 0.600; rear 0.600; front heave 0.400; rear heave 0.700" {
		t.Errorf("setting rows %q, want the corner axles then the heave dampers", got)
	}
	var page bytes.Buffer
	if err := sheet.WriteHTML(&page, s); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(page.String(), "<h2>Heave dampers</h2>") || !strings.Contains(page.String(), "rear heave") {
		t.Error("prototype sheet page has no heave damper section")
	}

	road, _, _ := heaveSheet(t, "demo-job.yaml", false)
	page.Reset()
	if err := sheet.WriteHTML(&page, road); err != nil {
		t.Fatal(err)
	}
	if len(road.HeaveTables) != 0 || len(road.Setup) != 2 || strings.Contains(page.String(), "Heave dampers") || strings.Contains(page.String(), "heave critical") {
		t.Errorf("road car's sheet shows heave dampers: %d tables, %d setting rows", len(road.HeaveTables), len(road.Setup))
	}
}
