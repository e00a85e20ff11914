package api

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// A finished job carries the check of its front in decision space, in the
// watch's final message and in GetJob, with the polish's figures when the
// spec asks for a polish; its point count is the stored front's.
func TestFinishedJobFrontCheck(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	spec := testSpec(3)
	spec.Search.PolishBudget = 6
	job := b.submit(t, spec)
	_, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("final job %v", final)
	}
	got, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetName()})
	if err != nil {
		t.Fatal(err)
	}
	c := got.GetJob().GetFrontCheck()
	if c == nil || final.GetFrontCheck() == nil {
		t.Fatalf("no front check: GetJob %v, watch %v", c, final.GetFrontCheck())
	}
	front, err := b.client.GetFront(testContext(t), &pb.GetFrontRequest{Job: job.GetName(), PageSize: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if int(c.GetPoints()) != len(front.GetFront().GetSolutions()) || c.GetPolishEvaluations() == 0 ||
		c.GetBeaten() != c.GetBeatenByTwin()+c.GetBeatenByNeighbour() || c.GetNeighbours() != 4 || c.GetRadius() != 0.03 {
		t.Errorf("front check %v for a front of %d points", c, len(front.GetFront().GetSolutions()))
	}
}
