package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/schollz/progressbar/v3"
	"google.golang.org/grpc/codes"
	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/web"
)

// watchAbout is the help text of watch.
const watchAbout = `
Follows a job until it ends: a progress bar of generations on standard
error with the hypervolume and the best value of each objective (for a
job with a refinement, then a bar of the front's points checked on the
nonlinear car, moved at each checkpoint), then one line with the final
state on standard output. The exit code is 0 when the job succeeded and
1 when it failed or was cancelled. If the server goes away (restart,
crash) the watch reconnects for up to --reconnect.`

var watchCommand = &command{name: "watch", synopsis: "[flags] JOB", minArgs: 1, maxArgs: 1, client: true,
	summary: "follow a job with a progress bar until it ends", about: watchAbout, flags: bindWatch}

func bindWatch(fs *flagSet, _ *env) (runFunc, error) {
	wf := addWatchModeFlags(fs)
	return func(ctx context.Context, e *env, in *parsed) error { return runWatch(ctx, e, in, wf) }, nil
}

func runWatch(ctx context.Context, e *env, in *parsed, wf *watchModes) error {
	if err := wf.check("watch"); err != nil {
		return err
	}
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	_, err = watchJob(ctx, e, c, jobName(in.args[0]), wf)
	return err
}

// watchModes are the output modes of watch and submit --watch.
type watchModes struct {
	quiet     bool
	json      bool
	reconnect time.Duration
}

func addWatchModeFlags(fs *flagSet) *watchModes {
	w := &watchModes{}
	fs.BoolVar(&w.quiet, "quiet", false, "no progress bar: print only the final state line")
	fs.BoolVar(&w.json, "json", false, "print every event as one line of protojson (WatchJobResponse) on standard output")
	fs.DurationVar(&w.reconnect, "reconnect", 60*time.Second, "how long to keep reconnecting while the server is unreachable")
	return w
}

func (w *watchModes) check(cmd string) error {
	if w.quiet && w.json {
		return usagef(cmd, "--quiet and --json exclude each other")
	}
	if w.reconnect < 0 {
		return usagef(cmd, "--reconnect must not be negative")
	}
	return nil
}

// watchJob follows job name to its end and returns it. The error is nil
// when it succeeded, an exit code 1 when it failed or was cancelled.
func watchJob(ctx context.Context, e *env, c *client, name string, w *watchModes) (*pb.Job, error) {
	var objectives []*pb.Objective
	if !w.json && !w.quiet {
		cctx, cancel := c.call(ctx)
		resp, err := c.svc.GetJob(cctx, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_FULL})
		cancel()
		if err != nil {
			return nil, err
		}
		objectives = resp.GetJob().GetSpec().GetObjectives()
	}
	var bar *progressBar
	if !w.json && !w.quiet {
		bar = newProgressBar(e.stderr, objectives)
	}
	var final *pb.Job
	lastContact := time.Now()
	for final == nil {
		job, err := watchOnce(ctx, e, c, name, w, bar, &lastContact)
		if err == nil {
			final = job
			break
		}
		if !isCode(err, codes.Unavailable) || time.Since(lastContact) > w.reconnect || ctx.Err() != nil {
			if bar != nil {
				bar.abandon()
			}
			return nil, err
		}
		select {
		case <-ctx.Done():
			return nil, ctx.Err()
		case <-time.After(250 * time.Millisecond):
		}
	}
	if bar != nil {
		bar.finish(final)
	}
	if !w.json {
		fmt.Fprintln(e.stdout, finalLine(final))
	}
	switch final.GetState() {
	case pb.JobState_JOB_STATE_SUCCEEDED:
		return final, nil
	default:
		return final, &exitError{code: exitFailure}
	}
}

// watchOnce runs one WatchJob stream; it returns the terminal job, or the
// error that broke the stream.
func watchOnce(ctx context.Context, e *env, c *client, name string, w *watchModes, bar *progressBar, lastContact *time.Time) (*pb.Job, error) {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	stream, err := c.svc.WatchJob(ctx, &pb.WatchJobRequest{Name: name})
	if err != nil {
		return nil, err
	}
	for {
		ev, err := stream.Recv()
		if err == io.EOF {
			return nil, fmt.Errorf("the server ended the watch of %s before the job finished", name)
		}
		if err != nil {
			return nil, err
		}
		*lastContact = time.Now()
		if w.json {
			b, err := protojson.Marshal(ev)
			if err != nil {
				return nil, err
			}
			fmt.Fprintf(e.stdout, "%s\n", b)
		}
		switch ev := ev.GetEvent().(type) {
		case *pb.WatchJobResponse_Progress:
			if bar != nil {
				bar.update(ev.Progress)
			}
		case *pb.WatchJobResponse_Refinement:
			if bar != nil {
				bar.refine(ev.Refinement)
			}
		case *pb.WatchJobResponse_Job:
			if ev.Job.GetState() == pb.JobState_JOB_STATE_QUEUED || ev.Job.GetState() == pb.JobState_JOB_STATE_RUNNING {
				if bar != nil {
					bar.update(ev.Job.GetProgress())
				}
				continue
			}
			return ev.Job, nil
		}
	}
}

// finalLine is the one-line summary of a finished job.
func finalLine(j *pb.Job) string {
	p := j.GetProgress()
	state := strings.ToLower(strings.TrimPrefix(j.GetState().String(), "JOB_STATE_"))
	s := fmt.Sprintf("%s %s: %d of %d generations, %d evaluations", j.GetName(), state, p.GetGeneration(), p.GetGenerations(), p.GetEvaluations())
	if j.GetPartial() {
		s += ", front partial"
	}
	if j.GetErrorMessage() != "" {
		s += ": " + plain(j.GetErrorMessage())
	}
	if v := web.InfeasibleText(j); v != "" {
		s += "\n" + v
	}
	if v := web.FrontCheckText(j); v != "" {
		s += "\n" + v
	}
	if v := web.RefinementText(j); v != "" {
		s += "\n" + v
	}
	return s
}

// progressBar shows generations done, hypervolume and best objectives;
// then, for a job with a refinement, the front's points checked on the
// nonlinear car.
type progressBar struct {
	bar        *progressbar.ProgressBar
	w          io.Writer
	objectives []*pb.Objective
	max        int
	refining   bool // the bar counts the refinement's points (refine)
}

// refiningText describes the refinement's bar: its count moves at each
// checkpoint of the job, when the points checked are stored.
const refiningText = "refining on the nonlinear car: points checked, as of the last checkpoint"

func newProgressBar(w io.Writer, objectives []*pb.Objective) *progressBar {
	return &progressBar{w: w, objectives: objectives, bar: newCountBar(w, 1, "queued", "gen")}
}

// newCountBar is the look of the CLI's progress bars on w: 30 wide,
// counting to max items of the unit, with elapsed and predicted time,
// redrawn at most every 100 ms; extra options follow these.
func newCountBar(w io.Writer, max int, description, unit string, extra ...progressbar.Option) *progressbar.ProgressBar {
	return progressbar.NewOptions(max, append([]progressbar.Option{
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowCount(),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionSetElapsedTime(true),
		progressbar.OptionThrottle(100 * time.Millisecond),
		progressbar.OptionSetDescription(description),
		progressbar.OptionSetItsString(unit),
		progressbar.OptionSetRenderBlankState(true),
	}, extra...)...)
}

func (b *progressBar) update(p *pb.Progress) {
	if p == nil || p.GetGenerations() == 0 || b.refining {
		return
	}
	if int(p.GetGenerations()) != b.max {
		b.max = int(p.GetGenerations())
		b.bar.ChangeMax(b.max)
	}
	// Count first: Describe renders at once, Set only past the throttle.
	_ = b.bar.Set(int(p.GetGeneration()))
	b.bar.Describe(progressText(p, b.objectives))
}

// refine leaves the search's bar complete, at the first report of a
// refinement in progress, for a bar of the front's points checked, and
// moves that to r.
func (b *progressBar) refine(r *pb.RefinementSummary) {
	if !b.refining {
		if b.max > 0 {
			_ = b.bar.Set(b.max)
		}
		b.abandon()
		b.refining, b.max = true, int(r.GetPoints())
		// Unthrottled: the count moves once a checkpoint, and each
		// move must show at once. No predicted time: a watch begun
		// while the job refines counts the points checked before it.
		b.bar = newCountBar(b.w, b.max, refiningText, "points", progressbar.OptionThrottle(0), progressbar.OptionSetPredictTime(false))
	}
	_ = b.bar.Set(int(r.GetPointsChecked()))
}

// finish draws the last state of job j (unthrottled) and leaves the bar.
func (b *progressBar) finish(j *pb.Job) {
	p, rs := j.GetProgress(), j.GetRefinementSummary()
	done := int(p.GetGeneration())
	switch {
	case !b.refining:
		b.update(p)
	case rs == nil:
		done = 0
	case rs.GetInProgress():
		done = int(rs.GetPointsChecked())
		_ = b.bar.Set(done)
	default:
		done = int(rs.GetPoints())
		_ = b.bar.Set(done)
	}
	if b.max > 0 && done >= b.max {
		_ = b.bar.Finish()
	}
	b.abandon()
}

func (b *progressBar) abandon() {
	_ = b.bar.Exit()
	fmt.Fprintln(b.w)
}

// progressText is the bar's description: hypervolume and the best value
// of each objective in trade units (the bar counts the generations).
func progressText(p *pb.Progress, objectives []*pb.Objective) string {
	var parts []string
	if hv := p.GetHypervolume(); hv > 0 {
		parts = append(parts, "hv "+hypervolumeText(hv, objectives))
	}
	for i, v := range p.GetBestObjectives() {
		if i < len(objectives) {
			q := objectiveQuantity(objectives[i].GetKind())
			parts = append(parts, fmt.Sprintf("%s %s %s", q.label, tradeNum(q, v), q.unit))
		}
	}
	return strings.Join(parts, "  ")
}
