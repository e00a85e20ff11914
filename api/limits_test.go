package api

import (
	"context"
	"log/slog"
	"math"
	"strings"
	"sync/atomic"
	"testing"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// compileCounter counts the compiles of a server's specs.
func compileCounter(srv *Server) *atomic.Int64 {
	var n atomic.Int64
	srv.onCompile = func() { n.Add(1) }
	return &n
}

// manyCases is testSpec with n road cases, copies of its first.
func manyCases(n int) *pb.JobSpec {
	s := testSpec(2)
	rc := s.RoadCases[0]
	s.RoadCases = make([]*pb.RoadCase, n)
	for i := range s.RoadCases {
		s.RoadCases[i] = proto.CloneOf(rc)
	}
	return s
}

// wantErrorInfo checks the ErrorInfo metadata entry key of a status.
func wantErrorInfo(t *testing.T, what string, err error, c codes.Code, reason, key, value string) {
	t.Helper()
	st := wantCode(t, what, err, c, reason)
	for _, d := range st.Details() {
		if info, ok := d.(*errdetails.ErrorInfo); ok {
			if got := info.GetMetadata()[key]; got != value {
				t.Errorf("%s: ErrorInfo %s = %q, want %q", what, key, got, value)
			}
			return
		}
	}
	t.Errorf("%s: no ErrorInfo", what)
}

// A spec of 10,000 road cases (issue 15: it compiled for a minute before
// its limits were checked, and went on after its caller had gone) is
// refused at once by SubmitJob and EvaluateSetups, as ResourceExhausted
// naming spec.road_cases, before any compile.
func TestTooManyRoadCasesRefusedBeforeCompiling(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	compiles := compileCounter(b.server)
	spec := manyCases(10_000)
	_, err := b.server.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
	wantErrorInfo(t, "submit of 10,000 cases", err, codes.ResourceExhausted, ReasonTooManyRoadCases, "field", "spec.road_cases")
	_, err = b.server.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}, Setups: []*pb.Setup{testSetup()}})
	wantErrorInfo(t, "evaluation on 10,000 cases", err, codes.ResourceExhausted, ReasonTooManyRoadCases, "field", "spec.road_cases")
	_, err = b.server.VerifySetup(testContext(t), &pb.VerifySetupRequest{
		Source: &pb.VerifySetupRequest_Spec{Spec: spec}, Setup: testSetup()})
	wantErrorInfo(t, "verification on 10,000 cases", err, codes.ResourceExhausted, ReasonTooManyRoadCases, "field", "spec.road_cases")
	if n := compiles.Load(); n != 0 {
		t.Errorf("%d compiles before the refusals, want 0", n)
	}
	// At the limit, the spec is compiled and refused only by the job's
	// work limit, which the server checks before compiling too.
	_, err = b.server.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: manyCases(DefaultMaxRoadCases)})
	if err != nil {
		t.Fatalf("submit of %d cases: %v", DefaultMaxRoadCases, err)
	}
	if n := compiles.Load(); n != 1 {
		t.Errorf("%d compiles for one accepted submit, want 1", n)
	}
}

// The work limit holds for any size of the search settings: the product
// population × islands × generations × cases saturates instead of
// wrapping. (2³¹−1)³ × 2 is 2⁶³ + … modulo 2⁶⁴, negative as an int64,
// which passed the limit before and queued a job the workers could never
// allocate.
func TestJobWorkLimitDoesNotOverflow(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	compiles := compileCounter(b.server)
	spec := testSpec(math.MaxInt32)
	spec.Search.PopulationSize, spec.Search.Islands = math.MaxInt32, math.MaxInt32
	_, err := b.server.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
	wantErrorInfo(t, "absurd search", err, codes.ResourceExhausted, ReasonJobTooLarge, "work", "9223372036854775807")
	if n := compiles.Load(); n != 0 {
		t.Errorf("%d compiles before the refusal, want 0", n)
	}
}

// SubmitJob checks and compiles the spec in a submit slot: with every
// slot taken a submit waits, and one whose call ends while it waits
// compiles nothing; with a slot free it goes through. The evaluations'
// slots are not the submits'.
func TestSubmitTakesASlot(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxConcurrentSubmits: 1, MaxConcurrentEvaluations: 1})
	compiles := compileCounter(b.server)
	release, err := b.server.acquireSubmit(testContext(t))
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(testContext(t))
	cancel()
	_, err = b.server.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: testSpec(2)})
	if status.Code(err) != codes.Canceled {
		t.Fatalf("submit ended while waiting for a slot: %v, want Canceled", err)
	}
	if n := compiles.Load(); n != 0 {
		t.Errorf("%d compiles while every submit slot was taken, want 0", n)
	}
	release()
	evalRelease, err := b.server.acquire()
	if err != nil {
		t.Fatal(err)
	}
	defer evalRelease()
	if _, err := b.server.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: testSpec(2)}); err != nil {
		t.Fatalf("submit with a submit slot free and the evaluations' slot taken: %v", err)
	}
	if n := compiles.Load(); n != 1 {
		t.Errorf("%d compiles for one submit, want 1", n)
	}
	// The slot is back once the call has returned.
	release, err = b.server.acquireSubmit(testContext(t))
	if err != nil {
		t.Fatalf("slot after a submit: %v", err)
	}
	release()
}

// submitCounter is an Engine that counts the submits it is handed.
type submitCounter struct {
	Engine
	n atomic.Int64
}

func (e *submitCounter) Submit(ctx context.Context, p *jobs.SubmitParams) (*jobs.Job, error) {
	e.n.Add(1)
	return e.Engine.Submit(ctx, p)
}

// A call that ends while its spec compiles stops the compile: the
// context is cancelled just as the compile starts (from the compile
// hook), and SubmitJob returns Canceled without handing the engine a
// job. A compile that ignored the context would run to its end and
// submit.
func TestSubmitCompilesUnderTheCallsContext(t *testing.T) {
	t.Parallel()
	e := &submitCounter{Engine: startEngine(t)}
	srv, err := NewServer(e, Options{Logger: slog.New(slog.DiscardHandler)})
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(testContext(t))
	srv.onCompile = cancel
	_, err = srv.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: manyCases(DefaultMaxRoadCases)})
	if status.Code(err) != codes.Canceled {
		t.Fatalf("submit cancelled while compiling: %v, want Canceled", err)
	}
	if n := e.n.Load(); n != 0 {
		t.Errorf("the engine was handed %d jobs after the call was cancelled, want 0", n)
	}
}

// A job's spec is compiled once at submit and once per slice that runs:
// the engine does not ask the API to check it again, and a slice opens
// its run from one compile.
func TestCompilesPerJob(t *testing.T) {
	t.Parallel()
	opener := NewOpener(1)
	var opens atomic.Int64
	opener.OnCompile = func() { opens.Add(1) }
	e := startEngineWith(t, opener, shortSlices)
	srv, err := NewServer(e, Options{Logger: slog.New(slog.DiscardHandler)})
	if err != nil {
		t.Fatal(err)
	}
	compiles := compileCounter(srv)
	res, err := srv.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: testSpec(8)})
	if err != nil {
		t.Fatal(err)
	}
	if n := compiles.Load(); n != 1 {
		t.Errorf("%d compiles at submit, want 1", n)
	}
	if n := opens.Load(); n != 0 {
		t.Errorf("%d compiles of the opener at submit, want 0", n)
	}
	ch, err := e.Watch(testContext(t), res.GetJob().GetJobId())
	if err != nil {
		t.Fatal(err)
	}
	var last *jobs.Job
	for j := range ch {
		last = j
	}
	if last == nil || last.State != jobs.StateSucceeded {
		t.Fatalf("job ended as %+v", last)
	}
	if n := opens.Load(); n != int64(last.Slices) {
		t.Errorf("%d compiles of the opener for %d slices, want one per slice", n, last.Slices)
	}
	t.Logf("compiles of one job: 1 at submit + %d for %d slices", opens.Load(), last.Slices)
}

// The job-work limit counts the polish's neighbourhood rounds and the
// refinement (study.Size), and a job over it because of either is refused
// naming the field. Bounds worked out by hand for testSpec(2): population
// 8, one island, 2 generations, 2 road cases, four ratio genes; its front
// holds at most 8 × 1 × (2 + 1) = 24 points.
//
//   - polish_budget 4: search 8 × 1 × (2 + 4) × 2 = 96, rounds 24 points ×
//     8 rounds × (1 twin + 2^4 corners + 2 model steps + 4) × 2 cases =
//     8832: 8928, the limit here, so it is accepted at the limit;
//   - polish_budget 5: 8 × 7 × 2 = 112 + 24 × 8 × 24 × 2 = 9216: 9328, over
//     it (112 alone, all that was counted before, is far under);
//   - refinement of 10 s: 8 × 2 × 2 = 32 + 24 points × 2 road cases ×
//     ⌈8 × 10⌉ = 3840: 3872, under it;
//   - refinement of 30 s: 32 + 24 × 2 × 240 = 11 552, over it.
func TestJobWorkCountsPolishRoundsAndRefinement(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxJobWork: 8928})
	polished := func(budget int32) *pb.JobSpec {
		s := testSpec(2)
		s.Search.PolishBudget = budget
		return s
	}
	refined := func(seconds float64) *pb.JobSpec {
		s := testSpec(2)
		s.Refinement = &pb.Refinement{Enabled: true, DurationS: seconds}
		return s
	}
	for _, c := range []struct {
		what, field, work string
		spec              *pb.JobSpec
	}{
		{"polish budget 5", "search.polish_budget", "9328", polished(5)},
		{"refinement of 30 s", "refinement.duration_s", "11552", refined(30)},
	} {
		_, err := b.server.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: c.spec})
		wantErrorInfo(t, c.what, err, codes.ResourceExhausted, ReasonJobTooLarge, "field", c.field)
		wantErrorInfo(t, c.what, err, codes.ResourceExhausted, ReasonJobTooLarge, "work", c.work)
		if st := status.Convert(err); !strings.Contains(st.Message(), c.field) {
			t.Errorf("%s: message %q does not name %s", c.what, st.Message(), c.field)
		}
	}
	for what, spec := range map[string]*pb.JobSpec{"polish budget 4 (at the limit)": polished(4), "refinement of 10 s": refined(10)} {
		if _, err := b.server.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec}); err != nil {
			t.Errorf("%s: %v", what, err)
		}
	}
}
