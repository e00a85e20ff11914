package api

import (
	"math"
	"slices"
	"testing"

	"google.golang.org/grpc/codes"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestJobLifecycle submits a small seeded job, watches it to the end,
// pages through its front, and checks the front against the same spec run
// directly through the study adapter: the engine's slices, checkpoints
// and resumes must not change a bit (DESIGN.md, "a job with a seed is
// bit-for-bit reproducible, also after a resume").
func TestJobLifecycle(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	spec := testSpec(40)
	job := b.submit(t, spec)
	if job.GetName() != "jobs/"+job.GetJobId() || job.GetSeed() != 7 || job.GetLabels()["suite"] != "api" {
		t.Errorf("submitted job %v", job)
	}
	if s := job.GetState(); s != pb.JobState_JOB_STATE_QUEUED && s != pb.JobState_JOB_STATE_RUNNING {
		t.Errorf("SubmitJob returned state %v, want queued or running", s)
	}
	if got := job.GetSpec().GetSearch().GetPopulationSize(); got != 8 {
		t.Errorf("stored spec population %d, want 8", got)
	}

	progress, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED || final.GetPartial() {
		t.Fatalf("final job %v", final)
	}
	for i := 1; i < len(progress); i++ {
		if progress[i].GetGeneration() < progress[i-1].GetGeneration() {
			t.Errorf("progress went back: generation %d after %d", progress[i].GetGeneration(), progress[i-1].GetGeneration())
		}
	}
	if p := final.GetProgress(); p.GetGeneration() != 40 || p.GetGenerations() != 40 || len(p.GetBestObjectives()) != 2 || !(p.GetHypervolume() > 0) {
		t.Errorf("final progress %v", p)
	}

	got, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetJobId(), View: pb.JobView_JOB_VIEW_BASIC})
	if err != nil {
		t.Fatal(err)
	}
	if got.GetJob().GetSpec() != nil || got.GetJob().GetFinishTime() == nil || got.GetJob().GetStartTime() == nil {
		t.Errorf("GetJob basic view: %v", got.GetJob())
	}

	front, pages := b.wholeFront(t, job.GetName(), 3)
	n := len(front.GetSolutions())
	if n == 0 || int(front.GetTotalSize()) != n || pages != (n+2)/3 {
		t.Fatalf("front of %d solutions (total %d) in %d pages of 3", n, front.GetTotalSize(), pages)
	}
	if !slices.Equal(front.GetGeneNames(), []string{"front_bump_ratio", "front_rebound_ratio", "rear_bump_ratio", "rear_rebound_ratio"}) {
		t.Errorf("gene names %v", front.GetGeneNames())
	}
	if j, err := b.engine.Get(testContext(t), job.GetJobId()); err == nil {
		t.Logf("the job ran in %d slices", j.Slices)
	}
	stored, _ := MarshalSpec(spec)
	direct := frontOf(t, stored, 100, false)
	if len(direct) != n {
		t.Fatalf("engine front has %d solutions, a direct run %d", n, len(direct))
	}
	for i, s := range front.GetSolutions() {
		d := direct[i]
		if s.GetIndex() != int32(i) || geneKey(s.GetGenes()) != geneKey(d.Genes) || geneKey(s.GetObjectives()) != geneKey(d.Objectives) {
			t.Fatalf("solution %d differs from the direct run", i)
		}
		if len(s.GetCaseMetrics()) != 2 || len(s.GetDamperCurves()) != 4 || len(s.GetCaseMetrics()[0].GetModes()) == 0 {
			t.Errorf("solution %d lacks detail", i)
		}
	}

	list, err := b.client.ListJobs(testContext(t), &pb.ListJobsRequest{
		States: []pb.JobState{pb.JobState_JOB_STATE_SUCCEEDED}, Labels: map[string]string{"suite": "api"}})
	if err != nil {
		t.Fatal(err)
	}
	if len(list.GetJobs()) != 1 || list.GetJobs()[0].GetJobId() != job.GetJobId() || list.GetJobs()[0].GetSpec() != nil {
		t.Errorf("ListJobs(succeeded, suite=api) = %v", list.GetJobs())
	}
	for _, req := range []*pb.ListJobsRequest{
		{States: []pb.JobState{pb.JobState_JOB_STATE_RUNNING}},
		{Labels: map[string]string{"suite": "other"}},
	} {
		list, err := b.client.ListJobs(testContext(t), req)
		if err != nil {
			t.Fatal(err)
		}
		if len(list.GetJobs()) != 0 {
			t.Errorf("ListJobs(%v) = %d jobs, want none", req, len(list.GetJobs()))
		}
	}

	checkEvaluateAndCompare(t, b, job.GetName(), front)
	checkCurves(t, b, job.GetName(), front)
}

// checkEvaluateAndCompare evaluates front members again, synchronously
// and by comparison. The evaluation is deterministic, so a member's
// objectives come back bit for bit, and by the definition of the epsilon
// (Zitzler et al. 2003; see compare.go) a member of a front of mutually
// non-dominated points has ε = 0 exactly, attained at itself, and is not
// dominated.
func checkEvaluateAndCompare(t *testing.T, b *testBundle, name string, front *pb.Front) {
	t.Helper()
	var setups []*pb.Setup
	for _, s := range front.GetSolutions() {
		setups = append(setups, s.GetSetup())
	}
	ev, err := b.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Job{Job: name}, Setups: setups, View: pb.SolutionView_SOLUTION_VIEW_BASIC})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range ev.GetEvaluations() {
		want := front.GetSolutions()[i]
		if geneKey(e.GetObjectives()) != geneKey(want.GetObjectives()) || geneKey(e.GetGenes()) != geneKey(want.GetGenes()) || !e.GetFeasible() {
			t.Errorf("EvaluateSetups of member %d: objectives %v, stored %v", i, e.GetObjectives(), want.GetObjectives())
		}
		if e.GetCaseMetrics() != nil {
			t.Errorf("basic view returned case metrics")
		}
	}
	k := len(front.GetSolutions()) / 2
	cmp, err := b.client.CompareSetup(testContext(t), &pb.CompareSetupRequest{Job: name, Setup: front.GetSolutions()[k].GetSetup()})
	if err != nil {
		t.Fatal(err)
	}
	if cmp.GetDominated() || cmp.GetAdditiveEpsilon() != 0 || cmp.GetNormalizedAdditiveEpsilon() != 0 || cmp.GetNearestIndex() != int32(k) ||
		!slices.Equal(cmp.GetObjectiveGaps(), []float64{0, 0}) || int(cmp.GetFrontSize()) != len(front.GetSolutions()) {
		t.Errorf("CompareSetup of member %d: %v", k, cmp)
	}
}

// checkCurves asks for the damper curves of a front member, with the
// spec's adjustment and with another one, and checks the low-speed
// slopes: ζ · 2 sqrt(k_w m_s) / MR² (critical damping of a mass-spring
// oscillator, Thomson and Dahleh, Theory of Vibration with
// Applications, §2.6; referred to the damper through the motion ratio).
func checkCurves(t *testing.T, b *testBundle, name string, front *pb.Front) {
	t.Helper()
	sol := front.GetSolutions()[0]
	res, err := b.client.GetDamperCurves(testContext(t), &pb.GetDamperCurvesRequest{Job: name, Target: &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: 0}})
	if err != nil {
		t.Fatal(err)
	}
	if !proto.Equal(res.GetSetup(), sol.GetSetup()) || len(res.GetCurves()) != 4 || !proto.Equal(res.GetCurves()[2], sol.GetDamperCurves()[2]) {
		t.Errorf("curves of solution 0 differ from the front's")
	}
	adj := &pb.Adjustment{BumpSoftestRatio: 0.25, BumpStiffestRatio: 2, ReboundSoftestRatio: 0.3, ReboundStiffestRatio: 2.2}
	res, err = b.client.GetDamperCurves(testContext(t), &pb.GetDamperCurvesRequest{Job: name,
		Target: &pb.GetDamperCurvesRequest_Setup{Setup: testSetup()}, Adjustment: adj, Curves: &pb.CurveSettings{MaxVelocityMPerS: 0.02, Points: 5}})
	if err != nil {
		t.Fatal(err)
	}
	veh := testVehicle()
	c := veh.GetCorners()[2] // rear left
	l := veh.GetCgToFrontAxleM() + veh.GetCgToRearAxleM()
	ms := veh.GetSprungMassKg() * veh.GetCgToFrontAxleM() / l / 2 // rear corner, lever rule
	kw := c.GetSpringRateNPerM() * c.GetSpringMotionRatio() * c.GetSpringMotionRatio()
	crit := 2 * math.Sqrt(kw*ms) / (c.GetDamperMotionRatio() * c.GetDamperMotionRatio())
	rl := res.GetCurves()[2]
	// Points at -0.02, -0.01, 0, 0.01, 0.02 m/s, all below the 0.05 m/s knee.
	for _, chk := range []struct {
		name      string
		got, want float64
	}{
		{"bump slope", rl.GetBumpSlopeNSPerM(), 0.55 * crit},
		{"force at +0.02 m/s", rl.GetForceN()[4], 0.55 * crit * 0.02},
		{"softest force at +0.02 m/s", rl.GetSoftestForceN()[4], 0.25 * crit * 0.02},
		{"stiffest force at -0.01 m/s", rl.GetStiffestForceN()[1], -2.2 * crit * 0.01},
	} {
		if math.Abs(chk.got-chk.want) > sumTol*math.Abs(chk.want) {
			t.Errorf("rear left %s = %.17g, want %.17g", chk.name, chk.got, chk.want)
		}
	}
	_, err = b.client.GetDamperCurves(testContext(t), &pb.GetDamperCurvesRequest{Job: name, Target: &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: int32(len(front.GetSolutions()))}})
	wantCode(t, "GetDamperCurves past the front", err, codes.NotFound, ReasonSolutionNotFound)
}

// TestCancelRunningJob: the front of a running job is refused; a cancel
// stops it within the engine's poll and keeps its front so far, partial;
// a second cancel is refused.
func TestCancelRunningJob(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	spec := testSpec(5000) // far longer than the test waits
	job := b.submit(t, spec)

	stream, err := b.client.WatchJob(testContext(t), &pb.WatchJobRequest{Name: job.GetName()})
	if err != nil {
		t.Fatal(err)
	}
	for {
		ev, err := stream.Recv()
		if err != nil {
			t.Fatalf("watch before any progress: %v", err)
		}
		if ev.GetProgress().GetGeneration() >= 2 {
			break
		}
		if ev.GetJob() != nil {
			t.Fatalf("the job ended before it was cancelled: %v", ev.GetJob())
		}
	}
	// A running job's front is the one of its last checkpoint, marked
	// partial; comparing with it waits for the end.
	fr, err := b.client.GetFront(testContext(t), &pb.GetFrontRequest{Job: job.GetName()})
	if err != nil || !fr.GetFront().GetPartial() {
		t.Errorf("GetFront of a running job: partial %v, err %v; want a partial front", fr.GetFront().GetPartial(), err)
	}
	_, err = b.client.CompareSetup(testContext(t), &pb.CompareSetupRequest{Job: job.GetName(), Setup: testSetup()})
	wantCode(t, "CompareSetup on a running job", err, codes.FailedPrecondition, ReasonJobNotFinished)

	if _, err := b.client.CancelJob(testContext(t), &pb.CancelJobRequest{Name: job.GetName()}); err != nil {
		t.Fatal(err)
	}
	_, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_CANCELLED || !final.GetPartial() || !final.GetCancelRequested() {
		t.Fatalf("after cancel: %v", final)
	}
	if g := final.GetProgress().GetGeneration(); g < 2 || g >= 5000 {
		t.Errorf("cancelled at generation %d", g)
	}
	front, _ := b.wholeFront(t, job.GetName(), 0)
	if !front.GetPartial() || len(front.GetSolutions()) == 0 {
		t.Errorf("front of the cancelled job: partial %v, %d solutions", front.GetPartial(), len(front.GetSolutions()))
	}
	_, err = b.client.CancelJob(testContext(t), &pb.CancelJobRequest{Name: job.GetName()})
	wantCode(t, "second CancelJob", err, codes.FailedPrecondition, ReasonJobFinished)
}

// TestUnknownJob: every call naming a job that does not exist is NotFound.
func TestUnknownJob(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	ctx := testContext(t)
	const name = "jobs/0123456789abcdef01234567"
	calls := map[string]func() error{
		"GetJob":    func() error { _, err := b.client.GetJob(ctx, &pb.GetJobRequest{Name: name}); return err },
		"CancelJob": func() error { _, err := b.client.CancelJob(ctx, &pb.CancelJobRequest{Name: name}); return err },
		"GetFront":  func() error { _, err := b.client.GetFront(ctx, &pb.GetFrontRequest{Job: name}); return err },
		"CompareSetup": func() error {
			_, err := b.client.CompareSetup(ctx, &pb.CompareSetupRequest{Job: name, Setup: testSetup()})
			return err
		},
		"GetDamperCurves": func() error {
			_, err := b.client.GetDamperCurves(ctx, &pb.GetDamperCurvesRequest{Job: name, Target: &pb.GetDamperCurvesRequest_SolutionIndex{}})
			return err
		},
		"EvaluateSetups": func() error {
			_, err := b.client.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Job{Job: name}, Setups: []*pb.Setup{testSetup()}})
			return err
		},
		"WatchJob": func() error {
			s, err := b.client.WatchJob(ctx, &pb.WatchJobRequest{Name: name})
			if err != nil {
				return err
			}
			_, err = s.Recv()
			return err
		},
	}
	for call, f := range calls {
		wantCode(t, call, f(), codes.NotFound, ReasonJobNotFound)
	}
	_, err := b.client.GetJob(ctx, &pb.GetJobRequest{Name: "jobs/"})
	if got := violations(t, "GetJob(jobs/)", err); !slices.Equal(got, []string{"name"}) {
		t.Errorf("GetJob(jobs/) violations %v", got)
	}
}
