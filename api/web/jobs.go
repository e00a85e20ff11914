package web

import (
	"fmt"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"time"

	"google.golang.org/protobuf/types/known/timestamppb"

	pb "dampfront/api/gen/dampfront/v1"
)

// stateNames are the states' names on the page and in its URLs, in
// life-cycle order.
var stateNames = []string{"queued", "running", "succeeded", "failed", "cancelled"}

// stateName is a state's name on the page ("running").
func stateName(s pb.JobState) string {
	return strings.ToLower(strings.TrimPrefix(s.String(), "JOB_STATE_"))
}

// parseState is the enum value of a state's name, or false.
func parseState(name string) (pb.JobState, bool) {
	if !slices.Contains(stateNames, name) {
		return 0, false
	}
	v, ok := pb.JobState_value["JOB_STATE_"+strings.ToUpper(name)]
	return pb.JobState(v), ok
}

// terminal reports whether no further state follows s.
func terminal(s pb.JobState) bool {
	return s == pb.JobState_JOB_STATE_SUCCEEDED || s == pb.JobState_JOB_STATE_FAILED || s == pb.JobState_JOB_STATE_CANCELLED
}

// timeText is a time on the page, in UTC to the second; "" when unset.
func timeText(t *timestamppb.Timestamp) string {
	if t == nil {
		return ""
	}
	return t.AsTime().UTC().Format("2006-01-02 15:04:05") + " UTC"
}

// progressView is a job's progress as the page shows it.
type progressView struct {
	State       string  `json:"state"`
	Terminal    bool    `json:"terminal"`
	Generation  int32   `json:"generation"`
	Generations int32   `json:"generations"`
	Evaluations int64   `json:"evaluations"`
	Percent     float64 `json:"percent"` // generations done over planned, 0 to 100
	Text        string  `json:"text"`
	Updated     string  `json:"updated"`
}

func newProgressView(j *pb.Job) progressView {
	p := j.GetProgress()
	v := progressView{
		State: badge(j), Terminal: terminal(j.GetState()),
		Generation: p.GetGeneration(), Generations: p.GetGenerations(), Evaluations: p.GetEvaluations(),
		Updated: timeText(p.GetUpdateTime()),
	}
	if v.Generations > 0 {
		v.Percent = min(100, 100*float64(v.Generation)/float64(v.Generations))
	}
	if j.GetState() == pb.JobState_JOB_STATE_SUCCEEDED {
		v.Percent = 100
	}
	switch {
	case j.GetState() == pb.JobState_JOB_STATE_QUEUED && v.Generation == 0:
		v.Text = "waiting for a worker"
	case v.Generations > 0:
		v.Text = fmt.Sprintf("generation %d of %d, %d evaluations", v.Generation, v.Generations, v.Evaluations)
	default:
		v.Text = fmt.Sprintf("generation %d, %d evaluations", v.Generation, v.Evaluations)
	}
	if rs := Refining(j); rs != nil {
		v.Text += "; refining on the nonlinear car: " + checkedText(rs)
	}
	return v
}

// jobRow is one job of the list, and the head of the job page.
type jobRow struct {
	ID          string
	Name        string
	URL         string
	DisplayName string
	State       string
	Progress    progressView
	Labels      []string // key=value, sorted
	Created     string
	Started     string
	Finished    string
	Error       string
}

// badge is the word of a job's state badge: its state, or "infeasible"
// for a finished job no setup of which met every constraint, so that such
// a job never shows the green of success.
func badge(j *pb.Job) string {
	if j.GetInfeasible() && terminal(j.GetState()) {
		return "infeasible"
	}
	return stateName(j.GetState())
}

func newJobRow(j *pb.Job) jobRow {
	r := jobRow{
		ID: j.GetJobId(), Name: j.GetName(), URL: "/jobs/" + url.PathEscape(j.GetJobId()),
		DisplayName: j.GetDisplayName(), State: badge(j), Progress: newProgressView(j),
		Created: timeText(j.GetCreateTime()), Started: timeText(j.GetStartTime()), Finished: timeText(j.GetFinishTime()),
		Error: j.GetErrorMessage(),
	}
	for k, v := range j.GetLabels() {
		r.Labels = append(r.Labels, k+"="+v)
	}
	slices.Sort(r.Labels)
	return r
}

type stateOption struct {
	Value    string
	Selected bool
}

type jobsView struct {
	pageView
	States  []stateOption
	Label   string // the label filter as given
	Jobs    []jobRow
	NextURL string
	Filter  bool // a filter is set
}

// parseLabels reads a label filter: key=value pairs separated by commas
// or blanks.
func parseLabels(s string) (map[string]string, error) {
	fields := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ' ' || r == '\t' })
	if len(fields) == 0 {
		return nil, nil
	}
	out := map[string]string{}
	for _, f := range fields {
		k, v, ok := strings.Cut(f, "=")
		if !ok || k == "" {
			return nil, fmt.Errorf("label filter %q must be key=value", f)
		}
		out[k] = v
	}
	return out, nil
}

// jobs is the jobs list, newest first, filtered by ?state= (repeatable)
// and ?label=key=value,..., paged by ?page_token=.
func (h *Handler) jobs(w http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	req := &pb.ListJobsRequest{PageSize: int32(h.opt.JobsPageSize), PageToken: q.Get("page_token"), View: pb.JobView_JOB_VIEW_BASIC}
	v := &jobsView{pageView: pageView{Title: "Jobs"}, Label: q.Get("label")}
	chosen := q["state"]
	for _, name := range stateNames {
		v.States = append(v.States, stateOption{Value: name, Selected: slices.Contains(chosen, name)})
	}
	for _, name := range chosen {
		if name == "" {
			continue
		}
		st, ok := parseState(name)
		if !ok {
			h.fail(w, r, http.StatusBadRequest, fmt.Sprintf("state %q is not one of %s", name, strings.Join(stateNames, ", ")))
			return
		}
		req.States = append(req.States, st)
	}
	labels, err := parseLabels(v.Label)
	if err != nil {
		h.fail(w, r, http.StatusBadRequest, err.Error())
		return
	}
	req.Labels = labels
	v.Filter = len(req.States) > 0 || len(labels) > 0
	ctx, cancel := h.callContext(r)
	defer cancel()
	res, err := h.client.ListJobs(ctx, req)
	if err != nil {
		h.serviceError(w, r, err, true)
		return
	}
	for _, j := range res.GetJobs() {
		v.Jobs = append(v.Jobs, newJobRow(j))
	}
	if t := res.GetNextPageToken(); t != "" {
		next := url.Values{"page_token": {t}}
		for _, s := range chosen {
			next.Add("state", s)
		}
		if v.Label != "" {
			next.Set("label", v.Label)
		}
		v.NextURL = "/?" + next.Encode()
	}
	for _, j := range v.Jobs {
		if !j.Progress.Terminal {
			v.Refresh = int(max(5*time.Second, 5*h.opt.PollInterval) / time.Second)
			v.Reload = v.Refresh
			break
		}
	}
	h.render(w, r, http.StatusOK, "jobs", v)
}
