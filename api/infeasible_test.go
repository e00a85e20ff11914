package api

import (
	"math"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestInfeasibleJobReportsClosest runs a small seeded job whose travel
// limit (0.1 mm of suspension travel SD at every corner) no setup can
// meet: it succeeds with a non-empty front of least-violating setups, and
// GetJob and the watch's final job mark it infeasible with the smallest
// shortfall on its front. The figures are checked against the front's own
// case metrics (the travel SD per corner), recomputed here: the largest
// over cases and corners, less the limit, smallest over the front.
// Tolerance: exact, the same float64 values pass through.
func TestInfeasibleJobReportsClosest(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	const limit = 1e-4 // m
	spec := testSpec(6)
	spec.Constraints = []*pb.Constraint{{Kind: pb.ConstraintKind_CONSTRAINT_KIND_TRAVEL, Limit: limit}}
	job := b.submit(t, spec)
	_, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED || !final.GetInfeasible() {
		t.Fatalf("final job: state %v, infeasible %v; want succeeded and infeasible", final.GetState(), final.GetInfeasible())
	}
	got, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetName()})
	if err != nil {
		t.Fatal(err)
	}
	if !got.GetJob().GetInfeasible() {
		t.Fatal("GetJob does not mark the job infeasible")
	}

	front, _ := b.wholeFront(t, job.GetName(), 0)
	if len(front.GetSolutions()) == 0 {
		t.Fatal("an infeasible job's front is empty; it keeps the least violating setups")
	}
	want := math.Inf(1)
	wantCase := ""
	for _, sol := range front.GetSolutions() {
		if sol.GetFeasible() {
			t.Fatalf("solution %d feasible under an impossible limit", sol.GetIndex())
		}
		worst, worstCase := math.Inf(-1), ""
		for _, c := range sol.GetCaseMetrics() {
			for _, k := range c.GetCorners() {
				if k.GetTravelSdM() > worst {
					worst, worstCase = k.GetTravelSdM(), c.GetRoadCase()
				}
			}
		}
		sf := sol.GetShortfalls()
		if len(sf) != 1 || sf[0].GetKind() != pb.ConstraintKind_CONSTRAINT_KIND_TRAVEL || sf[0].GetWorst() != worst ||
			sf[0].GetRoadCase() != worstCase || sf[0].GetOver() != worst-limit || sf[0].GetLimit() != limit {
			t.Errorf("solution %d shortfalls %v; want travel worst %g on %q", sol.GetIndex(), sf, worst, worstCase)
		}
		if worst-limit < want {
			want, wantCase = worst-limit, worstCase
		}
	}
	listed := listedJob(t, b, job.GetName())
	for what, j := range map[string]*pb.Job{"watch": final, "GetJob": got.GetJob(), "ListJobs": listed} {
		if !j.GetInfeasible() {
			t.Errorf("%s does not mark the job infeasible", what)
		}
		c := j.GetClosest()
		if len(c) != 1 || c[0].GetKind() != pb.ConstraintKind_CONSTRAINT_KIND_TRAVEL || c[0].GetOver() != want || c[0].GetRoadCase() != wantCase {
			t.Errorf("%s: closest %v; want travel %g over on %q", what, c, want, wantCase)
		}
	}
}

// TestFeasibleJobNotInfeasible checks that a job whose front meets its
// constraints is not marked infeasible and its solutions carry no
// shortfall.
func TestFeasibleJobNotInfeasible(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	job := b.submit(t, testSpec(4))
	_, final := b.watch(t, job.GetName())
	if final.GetInfeasible() || len(final.GetClosest()) != 0 {
		t.Errorf("feasible job marked infeasible: %v", final)
	}
	if l := listedJob(t, b, job.GetName()); l.GetInfeasible() || len(l.GetClosest()) != 0 {
		t.Errorf("ListJobs marks a feasible job infeasible: %v", l)
	}
	front, _ := b.wholeFront(t, job.GetName(), 0)
	for _, sol := range front.GetSolutions() {
		if sol.GetFeasible() && len(sol.GetShortfalls()) != 0 {
			t.Errorf("feasible solution %d has shortfalls %v", sol.GetIndex(), sol.GetShortfalls())
		}
	}
}

// listedJob is the job named name as ListJobs returns it.
func listedJob(t *testing.T, b *testBundle, name string) *pb.Job {
	t.Helper()
	res, err := b.client.ListJobs(testContext(t), &pb.ListJobsRequest{})
	if err != nil {
		t.Fatal(err)
	}
	for _, j := range res.GetJobs() {
		if j.GetName() == name {
			return j
		}
	}
	t.Fatalf("ListJobs does not list %s", name)
	return nil
}
