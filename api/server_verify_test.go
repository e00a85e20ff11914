package api

import (
	"context"
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
// through the call, bit for bit (one code path), with the caution and
// the model's verdict of every metric, case and the report; a stored
// job's spec gives the same as the spec itself.
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
	if got.GetVerdict() != verdictWant[want.Verdict()] || got.GetVerdictSigmas() != model.VerdictSigmas {
		t.Errorf("response verdict %v over %g errors; the model's is %v over %d", got.GetVerdict(), got.GetVerdictSigmas(), want.Verdict(), model.VerdictSigmas)
	}
	for i, wc := range want.Cases {
		gc := got.GetCases()[i]
		if gc.GetRoadCase() != wc.Case || gc.GetStepS() != wc.Time.Step || len(gc.GetMetrics()) != len(wc.Rows) {
			t.Fatalf("case %d: %q, step %g, %d metrics; want %q, %g, %d", i, gc.GetRoadCase(), gc.GetStepS(), len(gc.GetMetrics()), wc.Case, wc.Time.Step, len(wc.Rows))
		}
		if gc.GetVerdict() != verdictWant[wc.Verdict()] {
			t.Errorf("case %d: verdict %v, the model's %v", i, gc.GetVerdict(), wc.Verdict())
		}
		for k, r := range wc.Rows {
			m := gc.GetMetrics()[k]
			if m.GetMetric() != r.Metric || m.GetFrequencyDomain() != r.Frequency || m.GetTimeDomain() != r.Time ||
				m.GetDifference() != r.Diff || m.GetStatisticalError() != r.StatError || m.GetVerdict() != verdictWant[r.Verdict()] {
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

// verdictWant is the message's verdict for each of the model's, written
// out here rather than taken from the conversion under test.
var verdictWant = map[model.Verdict]pb.Verdict{
	model.VerdictHolds:     pb.Verdict_VERDICT_HOLDS,
	model.VerdictDiffers:   pb.Verdict_VERDICT_DIFFERS,
	model.VerdictNotJudged: pb.Verdict_VERDICT_NOT_JUDGED,
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

// A call abandoned by its client returns at once, but its check keeps
// its slot until it ends: with one slot, a call meanwhile is
// ResourceExhausted, and once the check is done a call succeeds. The
// check is of 600 s of road on two cases, a second or more of one core,
// so it is still running when the call is cancelled.
func TestVerifySetupAbandonedCallHoldsItsSlot(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxConcurrentEvaluations: 1})
	long := &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: testSpec(2)}, Setup: testSetup(), DurationS: MaxVerifyDuration}
	// probe takes the slot for no time (an empty request fails its
	// checks at once) and tells whether it was free.
	probe := func() codes.Code {
		_, err := b.client.VerifySetup(testContext(t), &pb.VerifySetupRequest{})
		return status.Code(err)
	}
	bound := time.Now().Add(2 * time.Minute) // bounds every wait below
	ctx, cancel := context.WithCancel(testContext(t))
	defer cancel()
	ended := make(chan error, 1)
	go func() {
		for {
			_, err := b.client.VerifySetup(ctx, long)
			if status.Code(err) != codes.ResourceExhausted || time.Now().After(bound) {
				ended <- err
				return
			}
			time.Sleep(10 * time.Millisecond) // a probe had the slot
		}
	}()
	for probe() != codes.ResourceExhausted {
		if time.Now().After(bound) {
			t.Fatal("the long check never took the slot")
		}
		time.Sleep(10 * time.Millisecond)
	}
	cancel()
	select {
	case err := <-ended:
		if status.Code(err) != codes.Canceled {
			t.Fatalf("the cancelled call: %v; want Canceled", err)
		}
	case <-time.After(time.Until(bound)):
		t.Fatal("the cancelled call did not return")
	}
	if c := probe(); c != codes.ResourceExhausted {
		t.Fatalf("a call right after the cancel: %v; want ResourceExhausted while the abandoned check runs", c)
	}
	short := proto.CloneOf(long)
	short.DurationS = 5
	for {
		_, err := b.client.VerifySetup(testContext(t), short)
		if err == nil {
			break
		}
		if status.Code(err) != codes.ResourceExhausted || time.Now().After(bound) {
			t.Fatalf("after the abandoned check: %v", err)
		}
		time.Sleep(50 * time.Millisecond)
	}
}
