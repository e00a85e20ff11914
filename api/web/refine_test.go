package web

import (
	"context"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"

	pb "dampfront/api/gen/dampfront/v1"
)

// refiningJob is a job of the demo spec in state, its refinement marked
// in progress with 212 of 586 points checked.
func refiningJob(t *testing.T, state pb.JobState) *pb.Job {
	return &pb.Job{Name: "jobs/j1", JobId: "j1", State: state, Spec: specFile(t, "demo-job.yaml"),
		Progress: &pb.Progress{Generation: 16, Generations: 16, Evaluations: 8500},
		RefinementSummary: &pb.RefinementSummary{Points: 586, DurationS: 120, Seed: 7, Sigmas: 3,
			InProgress: true, PointsChecked: 212}}
}

// RefinementText words a finished refinement as it always did, a running
// one as how far it is, and one a stopped job left unfinished as such;
// none of the last two shows the counts known only at the end.
func TestRefinementText(t *testing.T) {
	t.Parallel()
	done := &pb.Job{State: pb.JobState_JOB_STATE_SUCCEEDED, RefinementSummary: &pb.RefinementSummary{Points: 152,
		OffFront: 9, Unsettled: 31, DurationS: 120, Seed: 7, Sigmas: 3}}
	for _, c := range []struct {
		name string
		job  *pb.Job
		want string
	}{
		{"finished", done, "Nonlinear refinement: 152 points checked in the time domain (120 s of road a case, seed 7); 9 off the refined front, 0 infeasible, 31 unsettled within 3 statistical errors"},
		{"running", refiningJob(t, pb.JobState_JOB_STATE_RUNNING), "Refining on the nonlinear car: 212 of 586 points checked (as of the last checkpoint)"},
		{"queued between slices", refiningJob(t, pb.JobState_JOB_STATE_QUEUED), "Refining on the nonlinear car: 212 of 586 points checked (as of the last checkpoint)"},
		{"cancelled", refiningJob(t, pb.JobState_JOB_STATE_CANCELLED), "Nonlinear refinement not finished: 212 of 586 points checked when the job stopped; the front has no refined figures"},
		{"none", &pb.Job{State: pb.JobState_JOB_STATE_RUNNING}, ""},
	} {
		if got := RefinementText(c.job); got != c.want {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
	}
}

// oneJobClient answers GetJob with its job and has no front.
type oneJobClient struct {
	Client
	job *pb.Job
}

func (c oneJobClient) GetJob(context.Context, *pb.GetJobRequest, ...grpc.CallOption) (*pb.GetJobResponse, error) {
	return &pb.GetJobResponse{Job: c.job}, nil
}

func (c oneJobClient) GetFront(context.Context, *pb.GetFrontRequest, ...grpc.CallOption) (*pb.GetFrontResponse, error) {
	return nil, status.Error(codes.NotFound, "no front yet")
}

// The page of a job that refines says how far the refinement is, and
// nothing of the finished line's counts.
func TestJobPageRefining(t *testing.T) {
	t.Parallel()
	h, err := New(oneJobClient{job: refiningJob(t, pb.JobState_JOB_STATE_RUNNING)}, Options{PollInterval: time.Second, Logger: quiet})
	if err != nil {
		t.Fatal(err)
	}
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest(http.MethodGet, "/jobs/j1", nil))
	body := rec.Body.String()
	if rec.Code != http.StatusOK {
		t.Fatalf("status %d:\n%s", rec.Code, body)
	}
	if want := `<p class="small" id="refinement">Refining on the nonlinear car: 212 of 586 points checked (as of the last checkpoint).</p>`; !strings.Contains(body, want) {
		t.Errorf("the page has no %s:\n%s", want, body)
	}
	if strings.Contains(body, "off the refined front") {
		t.Error("the page of a job still refining shows the finished refinement's counts")
	}
}

// TestProgressTextShowsRefinement: the progress text of the list and of
// the job page's poll says how far a running job's refinement is, and
// says nothing of it for a job that has ended.
func TestProgressTextShowsRefinement(t *testing.T) {
	t.Parallel()
	rs := &pb.RefinementSummary{Points: 586, PointsChecked: 212, InProgress: true}
	p := &pb.Progress{Generation: 16, Generations: 16, Evaluations: 8610}
	running := newProgressView(&pb.Job{State: pb.JobState_JOB_STATE_RUNNING, Progress: p, RefinementSummary: rs})
	if want := "generation 16 of 16, 8610 evaluations; refining on the nonlinear car: 212 of 586 points checked"; running.Text != want {
		t.Errorf("running: %q, want %q", running.Text, want)
	}
	stopped := newProgressView(&pb.Job{State: pb.JobState_JOB_STATE_CANCELLED, Progress: p, RefinementSummary: rs})
	if strings.Contains(stopped.Text, "refining") {
		t.Errorf("cancelled: %q still says it refines", stopped.Text)
	}
}
