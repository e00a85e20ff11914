package main

import (
	"context"
	"fmt"
	"io"
	"sort"
	"strings"
	"time"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/web"
)

// listAbout is the help text of list.
const listAbout = `
Lists jobs, newest first, as a table or as JSON lines (one protojson Job
per line).`

var listCommand = &command{name: "list", synopsis: "[flags]", client: true,
	summary: "list jobs, newest first", about: listAbout, flags: bindList}

func bindList(fs *flagSet, _ *env) (runFunc, error) {
	f := &listFlags{labels: labelFlag{}, format: newFormat("table", "table", "json")}
	fs.Var(&f.states, "state", "keep jobs in this `state` (queued, running, succeeded, failed, cancelled; repeatable)")
	fs.Var(f.labels, "label", "keep jobs carrying this label `key=value` (repeatable)")
	fs.IntVar(&f.limit, "limit", 50, "largest number of jobs listed; 0 lists all")
	fs.Var(f.format, "format", "output `format`: table or json")
	return f.run, nil
}

// listFlags are list's own flags.
type listFlags struct {
	states stringList
	labels labelFlag
	limit  int
	format *formatFlag
}

func (f *listFlags) run(ctx context.Context, e *env, in *parsed) error {
	if f.limit < 0 {
		return usagef("list", "--limit must not be negative")
	}
	req := &pb.ListJobsRequest{Labels: f.labels, View: pb.JobView_JOB_VIEW_BASIC}
	for _, s := range f.states {
		st, ok := parseJobState(s)
		if !ok {
			return usagef("list", "--state %q is not one of queued, running, succeeded, failed, cancelled", s)
		}
		req.States = append(req.States, st)
	}
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	var jobs []*pb.Job
	for {
		if f.limit > 0 {
			req.PageSize = int32(min(f.limit-len(jobs), 1000))
		}
		cctx, cancel := c.call(ctx)
		resp, err := c.svc.ListJobs(cctx, req)
		cancel()
		if err != nil {
			return err
		}
		jobs = append(jobs, resp.GetJobs()...)
		if resp.GetNextPageToken() == "" || (f.limit > 0 && len(jobs) >= f.limit) {
			break
		}
		req.PageToken = resp.GetNextPageToken()
	}
	if f.format.value == "json" {
		for _, j := range jobs {
			b, err := protojson.Marshal(j)
			if err != nil {
				return err
			}
			fmt.Fprintf(e.stdout, "%s\n", b)
		}
		return nil
	}
	return writeJobList(e.stdout, jobs)
}

// listTime is the layout of the list's times: local time with its offset
// from UTC, so that a list read elsewhere is not off by a time zone.
const listTime = time.DateTime + " -07:00"

// writeJobList prints jobs as a table, one row each.
func writeJobList(w io.Writer, jobs []*pb.Job) error {
	t := newTable(w, false)
	t.row("JOB", "STATE", "GENERATION", "CREATED", "NAME", "LABELS")
	for _, j := range jobs {
		p := j.GetProgress()
		state := stateName(j.GetState()) + flagText(j.GetInfeasible(), ", infeasible")
		if rs := web.Refining(j); rs != nil {
			state += fmt.Sprintf(", refining %d/%d", rs.GetPointsChecked(), rs.GetPoints())
		}
		t.row(j.GetJobId(), state, fmt.Sprintf("%d/%d", p.GetGeneration(), p.GetGenerations()),
			j.GetCreateTime().AsTime().Local().Format(listTime), j.GetDisplayName(), formatLabels(j.GetLabels()))
	}
	return t.flush()
}

// parseJobState reads a state by its short name (or its enum name).
func parseJobState(s string) (pb.JobState, bool) {
	s = strings.ToUpper(s)
	if !strings.HasPrefix(s, "JOB_STATE_") {
		s = "JOB_STATE_" + s
	}
	if s == "JOB_STATE_CANCELED" {
		s = "JOB_STATE_CANCELLED"
	}
	v, ok := pb.JobState_value[s]
	if !ok || v == 0 {
		return 0, false
	}
	return pb.JobState(v), true
}

// stateName is a state's short name: "succeeded".
func stateName(s pb.JobState) string {
	return strings.ToLower(strings.TrimPrefix(s.String(), "JOB_STATE_"))
}

func formatLabels(l map[string]string) string {
	keys := make([]string, 0, len(l))
	for k := range l {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for i, k := range keys {
		keys[i] = k + "=" + l[k]
	}
	return strings.Join(keys, ",")
}
