package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"time"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/types/known/timestamppb"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/web"
)

// getAbout is the help text of get.
const getAbout = `
Shows a job: its state, progress, times and error. --format json prints
the Job message as protojson, the stored spec (with its defaults filled
in) included.`

var getCommand = &command{name: "get", synopsis: "[flags] JOB", minArgs: 1, maxArgs: 1, client: true,
	summary: "show one job: state, progress, times", about: getAbout, flags: bindGet}

func bindGet(fs *flagSet, _ *env) (runFunc, error) {
	format := newFormat("text", "text", "json")
	fs.Var(format, "format", "output `format`: text or json")
	return func(ctx context.Context, e *env, in *parsed) error { return runGet(ctx, e, in, format.value) }, nil
}

func runGet(ctx context.Context, e *env, in *parsed, format string) error {
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.GetJob(cctx, &pb.GetJobRequest{Name: jobName(in.args[0]), View: pb.JobView_JOB_VIEW_FULL})
	cancel()
	if err != nil {
		return err
	}
	j := resp.GetJob()
	if format == "json" {
		b, err := protojson.MarshalOptions{Multiline: true}.Marshal(j)
		if err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "%s\n", b)
		return nil
	}
	return writeJob(e.stdout, j)
}

// writeJob prints a job as a table of its fields, one a line.
func writeJob(w io.Writer, j *pb.Job) error {
	p := j.GetProgress()
	t := newTable(w, false)
	t.row("job", j.GetName())
	t.row("name", j.GetDisplayName())
	t.row("state", stateName(j.GetState())+flagText(j.GetCancelRequested() && !terminal(j.GetState()), ", cancel requested")+flagText(j.GetPartial(), ", front partial")+flagText(j.GetInfeasible(), ", infeasible"))
	t.row("labels", formatLabels(j.GetLabels()))
	t.row("seed", fmt.Sprint(j.GetSeed()))
	t.row("car", j.GetSpec().GetVehicle().GetName())
	var cases []string
	for _, rc := range j.GetSpec().GetRoadCases() {
		cases = append(cases, rc.GetName())
	}
	t.row("road cases", strings.Join(cases, "; "))
	t.row("generation", fmt.Sprintf("%d of %d", p.GetGeneration(), p.GetGenerations()))
	t.row("evaluations", fmt.Sprint(p.GetEvaluations()))
	t.row("hypervolume", hypervolumeText(p.GetHypervolume(), j.GetSpec().GetObjectives()))
	for i, v := range p.GetBestObjectives() {
		if obj := j.GetSpec().GetObjectives(); i < len(obj) {
			q := objectiveQuantity(obj[i].GetKind())
			t.row("best "+q.label, tradeNum(q, v)+" "+q.unit)
		}
	}
	t.row("created", formatTime(j.GetCreateTime()))
	t.row("started", formatTime(j.GetStartTime()))
	t.row("finished", formatTime(j.GetFinishTime()))
	if j.GetErrorMessage() != "" {
		t.row("error", j.GetErrorMessage())
	}
	if v := web.InfeasibleText(j); v != "" {
		t.row("verdict", v)
	}
	if v := web.FrontCheckText(j); v != "" {
		t.row("front check", v)
	}
	if v := web.RefinementText(j); v != "" {
		t.row("refinement", v)
	}
	if v := api.RobustText(j); v != "" {
		t.row("uncertainty", v)
	}
	return t.flush()
}

func terminal(s pb.JobState) bool {
	return s == pb.JobState_JOB_STATE_SUCCEEDED || s == pb.JobState_JOB_STATE_FAILED || s == pb.JobState_JOB_STATE_CANCELLED
}

func flagText(on bool, s string) string {
	if on {
		return s
	}
	return ""
}

func formatTime(t *timestamppb.Timestamp) string {
	if t == nil {
		return "-"
	}
	return t.AsTime().Local().Format(time.RFC3339)
}
