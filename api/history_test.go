package api

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// The hypervolume history in GetJob's full view is the optimiser's own
// record, one entry per generation from 0, ending at the final progress.
func TestGetJobHistory(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	job := b.submit(t, testSpec(12))
	_, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("final job %v", final)
	}
	got, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetName(), View: pb.JobView_JOB_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	h := got.GetJob().GetHistory()
	if len(h) != 13 {
		t.Fatalf("history of %d generations, want 13 (0..12)", len(h))
	}
	for i, p := range h {
		if int(p.GetGeneration()) != i || p.GetGenerations() != 12 {
			t.Errorf("history[%d] = generation %d of %d", i, p.GetGeneration(), p.GetGenerations())
		}
		// Hypervolume of an elitist archive never falls (Deb et al. 2002:
		// the archive keeps every non-dominated point seen).
		if i > 0 && p.GetHypervolume() < h[i-1].GetHypervolume() {
			t.Errorf("hypervolume fell at generation %d: %g < %g", i, p.GetHypervolume(), h[i-1].GetHypervolume())
		}
	}
	if last := h[len(h)-1]; last.GetHypervolume() != final.GetProgress().GetHypervolume() {
		t.Errorf("last history hypervolume %g, final progress %g", last.GetHypervolume(), final.GetProgress().GetHypervolume())
	}
	basic, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetName(), View: pb.JobView_JOB_VIEW_BASIC})
	if err != nil {
		t.Fatal(err)
	}
	if len(basic.GetJob().GetHistory()) != 0 {
		t.Error("basic view carries the history")
	}
}
