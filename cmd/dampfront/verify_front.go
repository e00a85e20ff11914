package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// The time-domain check of every solution of a job's front (verify JOB
// --all): the check of one setup, run for each, and summarised one row
// per solution.

// checkVerifyAllFlags refuses --all beside the flags that pick one setup
// or the local mode, and --parallel without --all.
func checkVerifyAllFlags(fs *flagSet, withJob, all bool, parallel int) error {
	if !all {
		for _, name := range []string{"parallel", "quiet"} {
			if isFlagSet(fs, name) {
				return usagef("verify", "--%s needs --all", name)
			}
		}
		return nil
	}
	var given []string
	for _, name := range []string{"spec", "solution", "balanced", "setup"} {
		if isFlagSet(fs, name) {
			given = append(given, "--"+name)
		}
	}
	switch {
	case len(given) > 0:
		return usagef("verify", "--all checks every solution of a JOB's front: it conflicts with %s", strings.Join(given, " and "))
	case !withJob:
		return usagef("verify", "--all needs a JOB")
	case parallel < 1:
		return usagef("verify", "--parallel must be a number of solutions >= 1, got %d", parallel)
	}
	return nil
}

// verifyAllOptions are the flags of verify --all.
type verifyAllOptions struct {
	opt      model.VerifyOptions // Model is filled in from the job's spec
	parallel int                 // solutions checked at once
	json     bool                // --format json
	quiet    bool                // no progress bar
}

// runVerifyAll fetches the job's spec and whole front and checks every
// solution on the same road realisations.
func runVerifyAll(ctx context.Context, e *env, cf *clientFlags, sf *specFlags, name string, o verifyAllOptions) error {
	// Replacement files are read before the server is dialled.
	over, err := sf.load(e, "")
	if err != nil {
		return err
	}
	c, err := cf.dial()
	if err != nil {
		return err
	}
	fd, err := fetchFront(ctx, c, name, pb.SolutionView_SOLUTION_VIEW_BASIC)
	c.Close()
	if err != nil {
		return err
	}
	spec := replaceParts(fd.job.GetSpec(), over)
	in, err := api.SpecToModel(spec)
	if err != nil {
		return err
	}
	o.opt.Model = in.Options
	sols := fd.front.GetSolutions()
	setups := make([]model.Setup, len(sols))
	for i, s := range sols {
		if setups[i], err = setupToModel(s.GetSetup(), solutionSource(s, name)); err != nil {
			return err
		}
	}
	done := func() {}
	if !o.quiet {
		bar := newCountBar(e.stderr, len(setups), "time-domain checks", "solutions")
		done = func() { _ = bar.Add(1) }
		defer func() { _ = bar.Exit(); fmt.Fprintln(e.stderr) }()
	}
	reps, err := model.VerifySetups(ctx, in.Vehicle, in.RoadCases, setups, o.opt, o.parallel, done)
	if err != nil {
		var se *model.SetupError
		if errors.As(err, &se) {
			err = fmt.Errorf("%s: %w", solutionSource(sols[se.Index], name), err)
		}
		return verifyError(err)
	}
	if o.json {
		return writeVerifyAllJSON(e.stdout, reps, in, fd, name)
	}
	if err := writeVerifyAllTable(e.stdout, reps, in, fd, o.opt); err != nil {
		return err
	}
	printCaution(e.stdout)
	return nil
}

// solutionSource names a solution in a report, as verify --solution does.
func solutionSource(s *pb.Solution, job string) string {
	return fmt.Sprintf("solution %d of %s", s.GetIndex(), job)
}

// verdictWidth is the width of the verdict column.
var verdictWidth = len(model.VerdictDiffers.String())

func writeVerifyAllTable(w io.Writer, reps []*model.VerifyReport, in *api.ModelInputs, fd *frontData, opt model.VerifyOptions) error {
	f, j := fd.front, fd.job
	sols := f.GetSolutions()
	fmt.Fprintf(w, "Time-domain check of every solution of the front of %s %q on %s: %d solutions", j.GetName(), j.GetDisplayName(), plain(in.Vehicle.Name), len(sols))
	if f.GetPartial() {
		fmt.Fprintf(w, " (partial: the job %s before its end)", stateName(j.GetState()))
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "Road seed %d, %g s of road per case after settling: every solution on the same road realisations.\n", opt.Seed, opt.Time.Duration)
	fmt.Fprintln(w, "Frequency domain: statistically linearised model; time domain: nonlinear dampers, tyres may leave the road.")
	fmt.Fprintln(w, "Road cases:")
	for i, rc := range in.RoadCases {
		fmt.Fprintf(w, "  %d  %s at %g m/s\n", i, plain(rc.Name), rc.Speed)
	}
	if len(sols) == 0 {
		fmt.Fprintln(w, "\nThe front is empty: there is no solution to check.")
		return nil
	}
	bal := balancedIndex(sols)
	cols := newSolutionColumns(f)
	sums := make([]model.VerifySummary, len(reps))
	labels := make([]string, len(reps))
	mw := len("metric")
	for i, rep := range reps {
		sums[i] = rep.Summary()
		if !math.IsNaN(sums[i].Worst) {
			labels[i] = metricLabel(sums[i].WorstMetric)
		}
		mw = max(mw, len(labels[i]))
	}

	fmt.Fprintln(w)
	t := newTable(w, true)
	h1, h2 := cols.headers()
	h1 = append(h1, "worst", fmt.Sprintf("%-*s", mw, "metric"), "case", "off road", "bump stop", "verdict")
	h2 = append(h2, "errors", fmt.Sprintf("%-*s", mw, ""), "", "% time", "% time", fmt.Sprintf("%-*s", verdictWidth, ""))
	t.row(h1...)
	t.row(h2...)
	held := 0
	for i, s := range sols {
		p := sums[i]
		row := cols.cells(s, i == bal)
		worst, metric, rc := "-", "-", "-"
		if !math.IsNaN(p.Worst) {
			worst, metric, rc = num(p.Worst, 1), labels[i], fmt.Sprint(p.WorstCase)
		}
		if p.Verdict == model.VerdictHolds {
			held++
		}
		row = append(row, worst, fmt.Sprintf("%-*s", mw, metric), rc,
			tradeNum(qProbability, p.LiftOff), tradeNum(qProbability, p.BumpStop), fmt.Sprintf("%-*s", verdictWidth, p.Verdict))
		t.row(row...)
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "\nworst: the largest |time domain - frequency domain| over the road cases and judged metrics, in statistical\n"+
		"errors of the record; a solution differs when a metric is more than %d statistical errors off on any case.\n", model.VerdictSigmas)
	fmt.Fprintln(w, "off road, bump stop: the largest time fraction of any corner on any case; verify JOB --solution N shows one in full.")
	fmt.Fprintf(w, "* balanced point: solution %d.\n", sols[bal].GetIndex())
	fmt.Fprintf(w, "\nThe linear answer holds on every road case for %d of %d solutions.\n", held, len(sols))
	return nil
}

// verifyPointJSON is one solution's report in the output of --all
// --format json: the single-setup report and the solution's index.
type verifyPointJSON struct {
	Index int `json:"index"`
	verifyJSON
}

func writeVerifyAllJSON(w io.Writer, reps []*model.VerifyReport, in *api.ModelInputs, fd *frontData, name string) error {
	sols := fd.front.GetSolutions()
	out := make([]verifyPointJSON, len(sols))
	for i, s := range sols {
		v, err := verifyReportJSON(reps[i], in, s.GetSetup(), solutionSource(s, name))
		if err != nil {
			return err
		}
		out[i] = verifyPointJSON{Index: int(s.GetIndex()), verifyJSON: v}
	}
	b, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}
