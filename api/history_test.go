package api

import (
	"math"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// GetTransientHistory returns the demo's braking case for a setup: its
// pitch settles on the quasi-static pitch EvaluateSetups reports (a
// static solve, K x = f: statics), to 1e-3 relative (the record ends 2 s
// after the ramp, and the pitch mode, decaying at ζω ≈ 5 1/s, leaves
// < 1e-4 of the change); an unknown case is refused naming the field.
func TestGetTransientHistory(t *testing.T) {
	t.Parallel()
	spec := readDemoJob(t, "demo-manoeuvre-job.yaml")
	tb := setup2(t)
	name := spec.GetManoeuvres()[0].GetName()
	resp, err := tb.client.GetTransientHistory(testContext(t), &pb.GetTransientHistoryRequest{
		Source: &pb.GetTransientHistoryRequest_Spec{Spec: spec}, Setup: testSetup(), CaseName: name, MaxPoints: 500})
	if err != nil {
		t.Fatal(err)
	}
	n := len(resp.GetTimeS())
	if n == 0 || n > 500 || len(resp.GetPitchRad()) != n || len(resp.GetTyreLoadRrN()) != n || resp.GetKind() != "manoeuvre" {
		t.Fatalf("history of %d samples, kind %q", n, resp.GetKind())
	}
	ev, err := tb.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}, Setups: []*pb.Setup{testSetup()}})
	if err != nil {
		t.Fatal(err)
	}
	steady := ev.GetEvaluations()[0].GetTransientMetrics()[0].GetPitch().GetSteadyRad()
	if p := resp.GetPitchRad()[n-1]; !(steady < 0) || math.Abs(p-steady) > 1e-3*math.Abs(steady) {
		t.Errorf("pitch under braking settles at %v rad, the quasi-static solve gives %v (nose down, < 0)", p, steady)
	}
	_, err = tb.client.GetTransientHistory(testContext(t), &pb.GetTransientHistoryRequest{
		Source: &pb.GetTransientHistoryRequest_Spec{Spec: spec}, Setup: testSetup(), CaseName: "no such case"})
	if v := violations(t, "unknown case", err); len(v) != 1 || !strings.HasPrefix(v[0], "case_name") {
		t.Errorf("unknown case: %v (%v)", v, err)
	}
}
