package main

import (
	"bytes"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// refiningSummary is a refinement in progress: 212 of 586 points checked.
func refiningSummary() *pb.RefinementSummary {
	return &pb.RefinementSummary{Points: 586, DurationS: 120, Seed: 7, Sigmas: 3, InProgress: true, PointsChecked: 212}
}

// get prints how far a running job's refinement is, as of its last
// checkpoint, and none of the counts a finished one has.
func TestGetShowsRefining(t *testing.T) {
	t.Parallel()
	j := &pb.Job{Name: "jobs/j1", State: pb.JobState_JOB_STATE_RUNNING,
		Progress: &pb.Progress{Generation: 16, Generations: 16}, RefinementSummary: refiningSummary()}
	var b bytes.Buffer
	if err := writeJob(&b, j); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	if !strings.Contains(out, "Refining on the nonlinear car: 212 of 586 points checked (as of the last checkpoint)") || strings.Contains(out, "off the refined front") {
		t.Errorf("get of a refining job:\n%s", out)
	}
}

// watch's bar follows the search's generations, then the refinement's
// points checked as the events report them, and ends full when the job
// succeeded.
func TestWatchBarFollowsRefinement(t *testing.T) {
	t.Parallel()
	var b bytes.Buffer
	bar := newProgressBar(&b, nil)
	bar.update(&pb.Progress{Generation: 16, Generations: 16})
	bar.refine(refiningSummary())
	// Progress events keep coming while the job refines; the bar stays
	// on the points.
	bar.update(&pb.Progress{Generation: 16, Generations: 16})
	more := refiningSummary()
	more.PointsChecked = 300
	bar.refine(more)
	bar.finish(&pb.Job{State: pb.JobState_JOB_STATE_SUCCEEDED, Progress: &pb.Progress{Generation: 16, Generations: 16},
		RefinementSummary: &pb.RefinementSummary{Points: 586, DurationS: 120, Seed: 7, Sigmas: 3}})
	out := b.String()
	for _, want := range []string{"16/16", refiningText, "212/586", "300/586", "586/586"} {
		if !strings.Contains(out, want) {
			t.Errorf("watch's bars have no %q:\n%q", want, out)
		}
	}
}
