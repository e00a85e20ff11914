package main

import (
	"bytes"
	"os"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// The demo jobs embedded in the binary are testdata/demo-manoeuvre-job.yaml
// and testdata/demo-job.yaml, byte for byte; the demo job's car and road
// cases are those of testdata/quillon-gt.yaml and testdata/roads.yaml, and
// the manoeuvre job is the road job with manoeuvres, kerbs, a third
// objective, a constraint and the polish added.
func TestDemoDataConsistent(t *testing.T) {
	t.Parallel()
	for name, embedded := range map[string][]byte{"demo-job.yaml": demoJob, "demo-manoeuvre-job.yaml": manoeuvreJob} {
		want, err := os.ReadFile(testdataPath(name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(embedded, want) {
			t.Fatalf("cmd/dampfront/demodata/%s differs from testdata/%s: copy the latter over the former", name, name)
		}
	}
	e0 := &env{getenv: func(string) string { return "" }}
	road, man := &pb.JobSpec{}, &pb.JobSpec{}
	if err := readMessage(e0, testdataPath("demo-job.yaml"), road); err != nil {
		t.Fatal(err)
	}
	if err := readMessage(e0, testdataPath("demo-manoeuvre-job.yaml"), man); err != nil {
		t.Fatal(err)
	}
	if len(man.GetManoeuvres()) != 2 || len(man.GetKerbs()) != 1 || man.GetSearch().GetPolishBudget() == 0 {
		t.Errorf("the demo job has %d manoeuvres, %d kerbs, polish budget %d", len(man.GetManoeuvres()), len(man.GetKerbs()), man.GetSearch().GetPolishBudget())
	}
	man.Manoeuvres, man.Kerbs, man.DisplayName = nil, nil, road.GetDisplayName()
	man.Objectives, man.Constraints = man.Objectives[:len(road.Objectives)], man.Constraints[:len(road.Constraints)]
	man.Search.PolishBudget = 0
	if !proto.Equal(man, road) {
		t.Errorf("the manoeuvre demo job is not the road demo job with manoeuvres, kerbs, an objective, a constraint and a polish:\n%v\n%v", man, road)
	}
	e := &env{getenv: func(string) string { return "" }}
	spec := &pb.JobSpec{}
	if err := readMessage(e, testdataPath("demo-job.yaml"), spec); err != nil {
		t.Fatal(err)
	}
	car := &pb.Vehicle{}
	if err := readMessage(e, testdataPath("quillon-gt.yaml"), car); err != nil {
		t.Fatal(err)
	}
	if !proto.Equal(spec.GetVehicle(), car) {
		t.Errorf("the demo job's vehicle differs from quillon-gt.yaml:\n%v\n%v", spec.GetVehicle(), car)
	}
	roads, err := readRoadCases(e, testdataPath("roads.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if len(roads) != len(spec.GetRoadCases()) {
		t.Fatalf("roads.yaml has %d cases, the demo job %d", len(roads), len(spec.GetRoadCases()))
	}
	for i := range roads {
		if !proto.Equal(roads[i], spec.GetRoadCases()[i]) {
			t.Errorf("road case %d differs:\n%v\n%v", i, roads[i], spec.GetRoadCases()[i])
		}
	}
	// The Quillon GT is the car of model/fixtures_test.go's demoCar; its
	// defining figures, as written there.
	if car.GetSprungMassKg() != 1150 || car.GetCgToFrontAxleM() != 1.378 || car.GetCorners()[0].GetSpringRateNPerM() != 160e3 ||
		car.GetCorners()[3].GetTyreRateNPerM() != 340e3 || car.GetAero().GetRearDownforceN() != 3400 {
		t.Errorf("quillon-gt.yaml differs from the model's demo car: %v", car)
	}
}

// The road cases are track-like: every racing-surface case is smoother
// than the mean of ISO 8608 class A (Gd(n0) = 16e-6 m^3, ISO 8608:1995
// Table 1), the rough slow section at most class B's mean (64e-6 m^3).
func TestRoadCasesTrackLike(t *testing.T) {
	t.Parallel()
	const classA, classB = 16e-6, 64e-6 // m^3 at n0 = 0.1 cycles/m, ISO 8608:1995 Table 1
	roads, err := readRoadCases(&env{}, testdataPath("roads.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	for i, rc := range roads {
		limit := classA
		if i == len(roads)-1 {
			limit = classB // the rough slow section
		}
		if g := rc.GetPowerLaw().GetGd0M3(); !(g > 0 && g < limit) {
			t.Errorf("%s: Gd(n0) = %g m^3, want in (0, %g)", rc.GetName(), g, limit)
		}
	}
}
