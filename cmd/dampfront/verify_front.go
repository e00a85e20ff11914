package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"sync"
	"sync/atomic"

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
	reps, at, err := verifyPoints(ctx, in, setups, o.opt, o.parallel, done)
	if err != nil {
		if at >= 0 {
			err = fmt.Errorf("%s: %w", solutionSource(sols[at], name), err)
		}
		var ve *model.ValidationError
		if errors.As(err, &ve) {
			return &exitError{code: exitUsage, msg: err.Error()}
		}
		return err
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

// verifyPoints runs model.Verify for each setup, at most parallel at a
// time, and returns the reports in the order of setups. Each report
// depends only on its setup and opt (case i of every setup draws its road
// from the stream (opt.Seed, i)), never on which goroutine ran it or
// when; done is called as each ends (from its goroutine). After an error
// no further setup is started, and the error of the
// first failed setup in order is returned with its position (-1 for an
// interrupt). model.Verify cannot be
// cancelled, so an interrupt returns at once and leaves the running
// checks to the end of the process.
func verifyPoints(ctx context.Context, in *api.ModelInputs, setups []model.Setup, opt model.VerifyOptions, parallel int, done func()) ([]*model.VerifyReport, int, error) {
	reps := make([]*model.VerifyReport, len(setups))
	errs := make([]error, len(setups))
	var next atomic.Int64 // index of the next setup to start
	var failed atomic.Bool
	var wg sync.WaitGroup
	for range min(parallel, len(setups)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for !failed.Load() && ctx.Err() == nil {
				i := int(next.Add(1) - 1)
				if i >= len(setups) {
					return
				}
				reps[i], errs[i] = model.Verify(in.Vehicle, in.RoadCases, setups[i], opt)
				done()
				if errs[i] != nil {
					failed.Store(true)
				}
			}
		}()
	}
	all := make(chan struct{})
	go func() { wg.Wait(); close(all) }()
	select {
	case <-all:
	case <-ctx.Done():
		return nil, -1, fmt.Errorf("interrupted: %w", ctx.Err())
	}
	if err := ctx.Err(); err != nil {
		return nil, -1, fmt.Errorf("interrupted: %w", err)
	}
	for i, err := range errs {
		if err != nil {
			return nil, i, err
		}
	}
	return reps, -1, nil
}

// pointSummary is one solution's check in a row.
type pointSummary struct {
	holds     bool    // the linear answer holds on every case
	worst     float64 // largest |Diff|/StatError over the cases and judged rows; NaN when none is judged
	metric    string  // its metric as the single-setup table labels it
	roadCase  int     // and its road case
	liftOff   float64 // largest time fraction off the road, over cases and corners
	bumpStop  float64 // largest time fraction beyond the bump-stop gap
	judgedAny bool
}

// summarise reduces a report to its row; the first of equal worst rows,
// in case and row order, is named.
func summarise(rep *model.VerifyReport) pointSummary {
	p := pointSummary{holds: true, worst: math.NaN()}
	for ci := range rep.Cases {
		c := &rep.Cases[ci]
		rows := make([]shownRow, len(c.Rows))
		for k, r := range c.Rows {
			rows[k] = showRow(r, c.Frequency.StaticTyreLoad)
			if rows[k].judged && (!p.judgedAny || rows[k].sigmas > p.worst) {
				p.worst, p.metric, p.roadCase, p.judgedAny = rows[k].sigmas, rows[k].label, ci, true
			}
		}
		if holds, _ := verifyVerdict(rows); !holds {
			p.holds = false
		}
		for i := 0; i < 4; i++ {
			p.liftOff = math.Max(p.liftOff, c.Time.LiftOffProbability[i])
			p.bumpStop = math.Max(p.bumpStop, c.Time.BumpStopProbability[i])
		}
	}
	return p
}

// Verdict words of the summary table.
const (
	verdictHolds   = "holds"
	verdictDiffers = "differs"
)

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
	sums := make([]pointSummary, len(reps))
	mw := len("metric")
	for i, rep := range reps {
		sums[i] = summarise(rep)
		mw = max(mw, len(sums[i].metric))
	}

	fmt.Fprintln(w)
	t := newTable(w, true)
	h1, h2 := cols.headers()
	h1 = append(h1, "worst", fmt.Sprintf("%-*s", mw, "metric"), "case", "off road", "bump stop", "verdict")
	h2 = append(h2, "errors", fmt.Sprintf("%-*s", mw, ""), "", "% time", "% time", fmt.Sprintf("%-*s", len(verdictDiffers), ""))
	t.row(h1...)
	t.row(h2...)
	held := 0
	for i, s := range sols {
		p := sums[i]
		row := cols.cells(s, i == bal)
		worst, metric, rc := "-", "-", "-"
		if p.judgedAny {
			worst, metric, rc = num(p.worst, 1), p.metric, fmt.Sprint(p.roadCase)
		}
		verdict := verdictDiffers
		if p.holds {
			verdict = verdictHolds
			held++
		}
		row = append(row, worst, fmt.Sprintf("%-*s", mw, metric), rc,
			tradeNum(qProbability, p.liftOff), tradeNum(qProbability, p.bumpStop), fmt.Sprintf("%-*s", len(verdictDiffers), verdict))
		t.row(row...)
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "\nworst: the largest |time domain - frequency domain| over the road cases and judged metrics, in statistical\n"+
		"errors of the record; a solution differs when a metric is more than %d statistical errors off on any case.\n", verifySigmas)
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
