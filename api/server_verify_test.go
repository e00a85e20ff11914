package api

import (
	"context"
	"errors"
	"testing"
	"time"

	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// VerifySetup carries model.Verify's report unchanged: the same spec,
// setup, seed and record length give the same figures in-process as
// through the call, bit for bit (one code path), with the caution; a
// stored job's spec gives the same as the spec itself.
func TestVerifySetupMatchesTheModel(t *testing.T) {
	t.Parallel()
	b := setup2(t)
	spec, su := testSpec(2), testSetup()
	const duration, seed = 10.0, 4
	in, err := SpecToModel(spec)
	if err != nil {
		t.Fatal(err)
	}
	s, err := SetupToModel(su, "setup")
	if err != nil {
		t.Fatal(err)
	}
	want, err := model.Verify(in.Vehicle, in.RoadCases, s, model.VerifyOptions{
		Time: model.TimeOptions{Duration: duration, WarnThreshold: in.Evaluator.WarnThreshold()}, Model: in.Options, Seed: seed})
	if err != nil {
		t.Fatal(err)
	}
	got, err := b.client.VerifySetup(testContext(t), &pb.VerifySetupRequest{
		Source: &pb.VerifySetupRequest_Spec{Spec: spec}, Setup: su, Seed: proto.Uint64(seed), DurationS: duration})
	if err != nil {
		t.Fatal(err)
	}
	if got.GetSeed() != seed || got.GetDurationS() != duration || got.GetCaution() != model.Caution || len(got.GetCases()) != len(want.Cases) {
		t.Fatalf("response seed %d, duration %g, %d cases, caution %q", got.GetSeed(), got.GetDurationS(), len(got.GetCases()), got.GetCaution())
	}
	for i, wc := range want.Cases {
		gc := got.GetCases()[i]
		if gc.GetRoadCase() != wc.Case || gc.GetStepS() != wc.Time.Step || len(gc.GetMetrics()) != len(wc.Rows) {
			t.Fatalf("case %d: %q, step %g, %d metrics; want %q, %g, %d", i, gc.GetRoadCase(), gc.GetStepS(), len(gc.GetMetrics()), wc.Case, wc.Time.Step, len(wc.Rows))
		}
		for k, r := range wc.Rows {
			m := gc.GetMetrics()[k]
			if m.GetMetric() != r.Metric || m.GetFrequencyDomain() != r.Frequency || m.GetTimeDomain() != r.Time ||
				m.GetDifference() != r.Diff || m.GetStatisticalError() != r.StatError {
				t.Errorf("case %d, %s: got %v; want %+v", i, r.Metric, m, r)
			}
		}
	}

	// The same on the stored spec of a job; a job needs no finished front.
	job := b.submit(t, spec)
	fromJob, err := b.client.VerifySetup(testContext(t), &pb.VerifySetupRequest{
		Source: &pb.VerifySetupRequest_Job{Job: job.GetName()}, Setup: su, Seed: proto.Uint64(seed), DurationS: duration})
	if err != nil {
		t.Fatal(err)
	}
	if !proto.Equal(fromJob, got) {
		t.Error("VerifySetup on the job's stored spec differs from the same on the spec")
	}
}

// Every bad field is named; an unknown job is NotFound.
func TestVerifySetupBadRequests(t *testing.T) {
	t.Parallel()
	b := setup2(t)
	spec := testSpec(2)
	bad := proto.CloneOf(spec)
	bad.Vehicle.SprungMassKg = -1
	noRear := testSetup()
	noRear.Rear = nil
	tests := []struct {
		name string
		req  *pb.VerifySetupRequest
		want []string
	}{
		{"no setup", &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: spec}}, []string{"setup"}},
		{"setup without rear", &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: spec}, Setup: noRear}, []string{"setup.rear"}},
		{"negative duration", &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: spec}, Setup: testSetup(), DurationS: -1}, []string{"duration_s"}},
		{"duration over the limit", &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: spec}, Setup: testSetup(), DurationS: MaxVerifyDuration + 1}, []string{"duration_s"}},
		{"no source", &pb.VerifySetupRequest{Setup: testSetup()}, []string{"spec"}},
		{"bad spec and setup", &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: bad}, Setup: noRear}, []string{"setup.rear", "spec.vehicle.sprung_mass_kg"}},
		{"bad job name", &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Job{Job: "runs/x"}, Setup: testSetup()}, []string{"job"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			_, err := b.client.VerifySetup(testContext(t), tt.req)
			got := violations(t, tt.name, err)
			if len(got) != len(tt.want) {
				t.Fatalf("violations %v, want %v", got, tt.want)
			}
			for i := range got {
				if got[i] != tt.want[i] {
					t.Errorf("violations %v, want %v", got, tt.want)
				}
			}
		})
	}
	_, err := b.client.VerifySetup(testContext(t), &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Job{Job: "jobs/no-such-job"}, Setup: testSetup()})
	wantCode(t, "unknown job", err, codes.NotFound, ReasonJobNotFound)
}

// A call abandoned by its deadline returns at once, but its check keeps
// its slot until it ends: with one slot, a second call meanwhile is
// ResourceExhausted, and once the first check is done a call succeeds.
func TestVerifySetupAbandonedCallHoldsItsSlot(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxConcurrentEvaluations: 1})
	req := &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: testSpec(2)}, Setup: testSetup(), DurationS: MaxVerifyDuration}
	ctx, cancel := context.WithTimeout(testContext(t), 50*time.Millisecond)
	defer cancel()
	_, err := b.client.VerifySetup(ctx, req)
	if st, _ := status.FromError(err); st.Code() != codes.DeadlineExceeded {
		t.Fatalf("a 50 ms call of a %g s check: %v; want DeadlineExceeded", MaxVerifyDuration, err)
	}
	short := proto.CloneOf(req)
	short.DurationS = 5
	_, err = b.client.VerifySetup(testContext(t), short)
	wantCode(t, "a call while the abandoned check runs", err, codes.ResourceExhausted, ReasonServerBusy)
	// Bounded: the abandoned check takes a few seconds of one core.
	deadline := time.Now().Add(2 * time.Minute)
	for {
		_, err := b.client.VerifySetup(testContext(t), short)
		if err == nil {
			break
		}
		if st, _ := status.FromError(err); st.Code() != codes.ResourceExhausted || time.Now().After(deadline) {
			t.Fatalf("after the abandoned check: %v", errors.Join(err))
		}
		time.Sleep(50 * time.Millisecond)
	}
}
