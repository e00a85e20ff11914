package api

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"google.golang.org/grpc/codes"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// robustTestSpec is testSpec with uncertain fuel and tyre rate, on a
// seeded sample (so that the seed matters) of few cars, mean + 1 sd.
func robustTestSpec(generations int32) *pb.JobSpec {
	s := testSpec(generations)
	s.Uncertainty = &pb.Uncertainty{
		FuelMassKg: &pb.Range{Min: 10, Max: 90}, FuelPositionM: &pb.Range{Min: -0.4, Max: -0.2},
		TyreRateScale: &pb.Range{Min: 0.9, Max: 1.1},
		Method:        pb.RobustMethod_ROBUST_METHOD_SAMPLE, Samples: 4,
		Measure: pb.RobustMeasure_ROBUST_MEASURE_MEAN_SD, K: 1,
	}
	return s
}

// TestRobustStudyResumeIsBitIdentical: a robust job run in one go and in
// steps of two generations through checkpoints and fresh studies gives
// the same front byte for byte (the sample is drawn from the stored seed,
// the cars rebuilt on every open).
func TestRobustStudyResumeIsBitIdentical(t *testing.T) {
	t.Parallel()
	spec, err := MarshalSpec(withDefaults(robustTestSpec(4)))
	if err != nil {
		t.Fatal(err)
	}
	sameResumedFront(t, spec)
}

// TestRobustFrontDetail: each solution of a robust front carries its
// figures; its objectives are mean + k·sd of them (the definition of
// ROBUST_MEASURE_MEAN_SD; tolerance sumTol, the same sums), the nominal
// grip equals the one recomputed from the nominal car's case metrics
// (the definition of the grip objective, as TestFrontDetailIsConsistent),
// and the worst is at least the mean.
func TestRobustFrontDetail(t *testing.T) {
	t.Parallel()
	spec, _ := MarshalSpec(withDefaults(robustTestSpec(3)))
	front := frontOf(t, spec, 100, false)
	if len(front) == 0 {
		t.Fatal("empty front")
	}
	weights := []float64{1, 0.5} // testRoadCases
	for _, s := range front {
		var sol pb.Solution
		if err := proto.Unmarshal(s.Detail, &sol); err != nil {
			t.Fatal(err)
		}
		r := sol.GetRobust()
		if r == nil || len(r.Nominal) != 2 || len(r.Mean) != 2 || len(r.Sd) != 2 || len(r.Worst) != 2 {
			t.Fatalf("solution %d: robust figures %v", s.Index, r)
		}
		for j := range s.Objectives {
			want := r.Mean[j] + 1*r.Sd[j]
			if math.Abs(s.Objectives[j]-want) > sumTol*want {
				t.Errorf("solution %d objective %d = %.17g, mean + 1 sd %.17g", s.Index, j, s.Objectives[j], want)
			}
			if !(r.Worst[j] >= r.Mean[j]) || !(r.Sd[j] > 0) {
				t.Errorf("solution %d objective %d: mean %g sd %g worst %g", s.Index, j, r.Mean[j], r.Sd[j], r.Worst[j])
			}
		}
		var grip, wsum float64
		for c, cm := range sol.CaseMetrics {
			g := 0.0
			for _, k := range cm.Corners {
				g += k.RelativeTyreLoadSd * k.RelativeTyreLoadSd
			}
			grip += weights[c] * g / 4
			wsum += weights[c]
		}
		if want := math.Sqrt(grip / wsum); math.Abs(r.Nominal[0]-want) > sumTol*want {
			t.Errorf("solution %d: nominal grip %.17g, recomputed from the nominal metrics %.17g", s.Index, r.Nominal[0], want)
		}
	}
}

// TestRobustSpecDefaultsAndPaths: the stored spec carries the
// uncertainty's defaults; bad ranges are refused naming the field.
func TestRobustSpecDefaultsAndPaths(t *testing.T) {
	t.Parallel()
	s := testSpec(2)
	s.Uncertainty = &pb.Uncertainty{DownforceScale: &pb.Range{Min: 0.9, Max: 1.1}}
	d := withDefaults(s).GetUncertainty()
	if d.GetMethod() != pb.RobustMethod_ROBUST_METHOD_QUADRATURE || d.GetMeasure() != pb.RobustMeasure_ROBUST_MEASURE_MEAN || d.GetNodes() != 3 || d.GetSamples() != 0 {
		t.Errorf("defaults not stored: %v", d)
	}
	bad := testSpec(2)
	bad.Uncertainty = &pb.Uncertainty{FuelMassKg: &pb.Range{Min: 80, Max: 20}, FrontTyreRateScale: &pb.Range{Min: math.NaN(), Max: 1},
		Nodes: 3, Method: pb.RobustMethod(9)}
	_, err := SpecToModel(bad)
	for _, want := range []string{"spec.uncertainty.fuel_mass_kg.max", "spec.uncertainty.front_tyre_rate_scale.min", "spec.uncertainty.method"} {
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("error %v does not name %s", err, want)
		}
	}
	empty := testSpec(2)
	empty.Uncertainty = &pb.Uncertainty{}
	_, err = SpecToModel(empty)
	if err == nil || !strings.Contains(err.Error(), "spec.uncertainty: gives no range") {
		t.Errorf("an uncertainty without ranges: %v, want it refused at spec.uncertainty", err)
	}
}

// TestRobustWorkCountsTheCars: a robust job's work and a robust
// evaluation's count every uncertain car against the server's limits.
func TestRobustWorkCountsTheCars(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxJobWork: 8 * 1 * 10 * 2 * 4, MaxSyncWork: 2 * 4}) // testSpec's population, generations and cases; 4 cars
	if _, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: robustTestSpec(10)}); err != nil {
		t.Fatalf("a robust job at the limit: %v", err)
	}
	_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: robustTestSpec(11)})
	wantCode(t, "a robust job over the limit", err, codes.ResourceExhausted, ReasonJobTooLarge)
	if err == nil || !strings.Contains(err.Error(), "uncertain cars") {
		t.Errorf("the refusal %v does not name the uncertain cars", err)
	}
	one := &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Spec{Spec: robustTestSpec(2)}, Setups: []*pb.Setup{testSetup()}}
	res, err := b.client.EvaluateSetups(testContext(t), one)
	if err != nil {
		t.Fatalf("one setup at the limit: %v", err)
	}
	if r := res.GetEvaluations()[0].GetRobust(); r == nil || len(r.GetWorst()) != 2 {
		t.Errorf("the evaluated setup has no robust figures: %v", r)
	}
	one.Setups = append(one.Setups, testSetup())
	_, err = b.client.EvaluateSetups(testContext(t), one)
	wantCode(t, "two setups over the limit", err, codes.ResourceExhausted, ReasonTooManySetups)
}

// TestRobustManoeuvreSpec: a robust spec with manoeuvre and kerb cases
// (testdata/demo-manoeuvre-job.yaml with fuel high in the car and the
// tyres uncertain) evaluates every car on them too: the driver-response
// objective has a spread over the cars, and its worst is at least its
// mean (the definitions of RobustFigures).
func TestRobustManoeuvreSpec(t *testing.T) {
	t.Parallel()
	text, err := os.ReadFile(filepath.Join("..", "testdata", "demo-manoeuvre-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	spec := &pb.JobSpec{}
	if err := DecodeText(text, spec); err != nil {
		t.Fatal(err)
	}
	spec.Uncertainty = &pb.Uncertainty{FuelMassKg: &pb.Range{Min: 20, Max: 100}, FuelHeightM: &pb.Range{Min: 0.3, Max: 0.5},
		TyreRateScale: &pb.Range{Min: 0.9, Max: 1.1}, Nodes: 2}
	b := setup(t, Options{})
	res, err := b.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}, Setups: []*pb.Setup{testSetup()}})
	if err != nil {
		t.Fatal(err)
	}
	sol := res.GetEvaluations()[0]
	r := sol.GetRobust()
	if r == nil || len(r.GetSd()) != 3 || len(sol.GetTransientMetrics()) == 0 {
		t.Fatalf("robust figures %v, %d transient cases", r, len(sol.GetTransientMetrics()))
	}
	for j := range r.GetSd() {
		if !(r.GetSd()[j] > 0) || !(r.GetWorst()[j] >= r.GetMean()[j]) {
			t.Errorf("objective %d: mean %g sd %g worst %g", j, r.GetMean()[j], r.GetSd()[j], r.GetWorst()[j])
		}
		if got := sol.GetObjectives()[j]; got != r.GetMean()[j] {
			t.Errorf("objective %d is %.17g, the mean over the cars (the default measure) %.17g", j, got, r.GetMean()[j])
		}
	}
}

// TestStoredRobustSpecResumeBitIdentical holds a robust job's bytes as
// testdata/stored holds the nominal ones: the stored spec (robustTestSpec
// with its defaults, this version's encoding) must open and resume to the
// front whose digest this version stored, details included.
// DAMPFRONT_WRITE_STORED_ROBUST=1 writes the two files instead (only ever
// from the version whose bytes they are meant to keep).
func TestStoredRobustSpecResumeBitIdentical(t *testing.T) {
	t.Parallel()
	dir := filepath.Join("testdata", "stored")
	spec, want := readStored(t, dir, "robust-sample", "DAMPFRONT_WRITE_STORED_ROBUST", func() *pb.JobSpec { return withDefaults(robustTestSpec(4)) })
	for name, front := range map[string][]jobs.Solution{"in one go": frontOf(t, spec, 100, false), "resumed every 2 generations": frontOf(t, spec, 2, true)} {
		if got := frontDigest(front); got != strings.TrimSpace(string(want)) {
			t.Errorf("front of the stored robust spec run %s: digest %s, stored %s", name, got, want)
		}
	}
}
