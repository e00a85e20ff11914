package main

import (
	"context"
	_ "embed"
	"errors"
	"fmt"
	"net"
	"os"
	"path/filepath"
	"time"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// manoeuvreJob is testdata/demo-manoeuvre-job.yaml, the demo's job,
// embedded so that the binary runs the demo from any directory; a test
// keeps the two files equal.
//
//go:embed demodata/demo-manoeuvre-job.yaml
var manoeuvreJob []byte

// demoJob is testdata/demo-job.yaml, the road cases alone (demo
// --road-only), embedded alike.
//
//go:embed demodata/demo-job.yaml
var demoJob []byte

// prototypeJob is testdata/prototype-job.yaml, the second demo (demo
// --prototype), embedded alike.
//
//go:embed demodata/prototype-job.yaml
var prototypeJob []byte

// demoRows is how many solutions of the front the demo prints.
const demoRows = 15

var demoCommand = &command{name: "demo", synopsis: "[flags]",
	summary: "run the demo job on an embedded server and print its front and damper curves", about: demoAbout, flags: bindDemo}

// demoAbout is the help text of demo.
const demoAbout = `
Starts a server with an embedded worker on a temporary SQLite file and a
free port of 127.0.0.1, submits the demo job
(testdata/demo-manoeuvre-job.yaml: the invented Quillon GT on three
invented road cases, a braking and a turn-in manoeuvre and a kerb, with
the front polished and checked in the genes), watches it with a progress
bar, prints the Pareto front, a few front points beside their bump =
rebound twins (what sets the split) and the damper curves of its balanced
point, stops the server and removes the temporary files. While it runs,
the job page (live progress, the front chart, the solutions and their
damper curves) is served at the address printed; --serve-page keeps it
open after the demo, until interrupted. --road-only runs the road cases
alone (testdata/demo-job.yaml: grip and platform, no polish);
--prototype runs the second demo (testdata/prototype-job.yaml: the
invented Tessaly P3 prototype, heave springs, packers and heave dampers,
a ride-height aero map, on three invented tracks).`

func bindDemo(fs *flagSet, e *env) (runFunc, error) {
	keep := fs.Bool("keep", false, "keep the temporary directory with the database and print how to serve it")
	specPath := fs.String("spec", "", "run this job spec `file` instead of the demo's")
	prototype := fs.Bool("prototype", false, "run the second demo: the invented prototype with heave elements")
	roadOnly := fs.Bool("road-only", false, "run the demo car on its road cases alone (testdata/demo-job.yaml)")
	workers := fs.Int("eval-workers", 0, "evaluations run at once; 0 means one per CPU")
	verbose := fs.Bool("verbose", false, "log the server's and the engine's messages on standard error")
	quiet := fs.Bool("quiet", false, "no progress bar")
	wf := addDemoWebFlags(fs)
	return func(ctx context.Context, e *env, in *parsed) error {
		if *workers < 0 {
			return usagef("demo", "--eval-workers must not be negative")
		}
		start := time.Now()
		spec, err := demoSpec(e, *specPath, *prototype, *roadOnly)
		if err != nil {
			return err
		}

		dir, err := os.MkdirTemp("", "dampfront-demo-")
		if err != nil {
			return err
		}
		db := filepath.Join(dir, "demo.db")
		defer func() {
			if !*keep {
				_ = os.RemoveAll(dir)
			}
		}()

		setGCPercent(gcPercentDefault(e)) // as serve's default
		cfg := demoConfig(e, db, *verbose)
		log := cfg.Logger
		wf.configure(&cfg, log)
		eng, err := openEngine(ctx, cfg, *workers)
		if err != nil {
			return err
		}
		lis, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			_ = eng.Close()
			return err
		}
		svc, err := startService(ctx, eng, lis, api.Options{Logger: log}, cfg.StopTimeout, log, wf.grpcOptions()...)
		if err != nil {
			_ = lis.Close()
			_ = eng.Close()
			return err
		}
		pg, err := wf.start(eng, api.Options{Logger: log}, nil, log)
		if err != nil {
			_ = svc.shutdown()
			return err
		}
		runErr := demo(ctx, e, lis.Addr().String(), spec, *quiet, pg.jobURL)
		if runErr == nil {
			pg.linger(ctx, e.stdout, wf.servePage)
		}
		if err := errors.Join(pg.shutdown(pageStopTimeout), svc.shutdown()); err != nil && runErr == nil {
			runErr = err
		}
		if runErr != nil {
			return runErr
		}
		fmt.Fprintf(e.stdout, "\nDemo done in %.1f s. Next: dampfront serve, then submit, watch, front, curves, eval and check.\n", time.Since(start).Seconds())
		if *keep {
			fmt.Fprintf(e.stdout, "Kept %s; serve it with: dampfront serve --database %s\n", dir, db)
		}
		printCaution(e.stdout)
		return nil
	}, nil
}

// demoSpec is the job spec of the demo: the file's, or an embedded one.
func demoSpec(e *env, path string, prototype, roadOnly bool) (*pb.JobSpec, error) {
	spec := &pb.JobSpec{}
	switch {
	case path != "" && (prototype || roadOnly), prototype && roadOnly:
		return nil, usagef("demo", "give one of --spec, --prototype and --road-only")
	case path != "":
		return spec, readMessage(e, path, spec)
	case prototype:
		return spec, decodeMessage("testdata/prototype-job.yaml", prototypeJob, spec)
	case roadOnly:
		return spec, decodeMessage("testdata/demo-job.yaml", demoJob, spec)
	}
	return spec, decodeMessage("testdata/demo-manoeuvre-job.yaml", manoeuvreJob, spec)
}

// demoConfig is the engine's configuration of the demo on the SQLite file db.
func demoConfig(e *env, db string, verbose bool) jobs.Config {
	ef := &engineFlags{logLevel: "warn", logFormat: "text"}
	if verbose {
		ef.logLevel = "info"
	}
	log := ef.logger(e.stderr)
	cfg := jobs.Config{
		DatabaseURL: db,
		Workers:     1,
		// The demo's job is short: poll the queue often so that it starts
		// and its progress shows at once.
		FetchPollInterval: 50 * time.Millisecond,
		ProgressInterval:  100 * time.Millisecond,
		WatchInterval:     100 * time.Millisecond,
		StopTimeout:       10 * time.Second,
		NodeID:            fmt.Sprintf("demo-%d", os.Getpid()),
		Logger:            log,
	}
	return cfg
}

// demo is the client side of the demo, over the loopback port; pageURL
// gives the job page of a job ID, or "" without a page.
func demo(ctx context.Context, e *env, addr string, spec *pb.JobSpec, quiet bool, pageURL func(id string) string) error {
	c, err := dial(addr, time.Minute)
	if err != nil {
		return err
	}
	defer c.Close()
	fmt.Fprintf(e.stdout, "dampfront demo: server on %s; submitting %q\n", addr, spec.GetDisplayName())
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.SubmitJob(cctx, &pb.SubmitJobRequest{Spec: spec})
	cancel()
	if err != nil {
		return err
	}
	name := resp.GetJob().GetName()
	if u := pageURL(resp.GetJob().GetJobId()); u != "" {
		fmt.Fprintf(e.stdout, "Job page: %s\n", u)
	}
	if _, err := watchJob(ctx, e, c, name, &watchModes{quiet: quiet, reconnect: 5 * time.Second}); err != nil {
		return err
	}
	fd, err := fetchFront(ctx, c, name, pb.SolutionView_SOLUTION_VIEW_FULL)
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout)
	if err := writeFrontTable(e.stdout, fd, demoRows, "run with --keep, serve the kept database and use dampfront front to see all"); err != nil {
		return err
	}
	bal := balancedIndex(fd.front.GetSolutions())
	if bal < 0 {
		return &exitError{code: exitFailure, msg: "the front is empty"}
	}
	idx := fd.front.GetSolutions()[bal].GetIndex()
	cctx, cancel = c.call(ctx)
	cr, err := c.svc.GetDamperCurves(cctx, &pb.GetDamperCurvesRequest{Job: name,
		Target: &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: idx}})
	cancel()
	if err != nil {
		return err
	}
	if err := printTwins(ctx, e, c, name, fd, bal); err != nil {
		return err
	}
	sol := fd.front.GetSolutions()[bal]
	fmt.Fprintf(e.stdout, "\nDamper curves of the balanced point, solution %d: %s\n", idx, setupText(cr.GetSetup()))
	fmt.Fprintf(e.stdout, "Its objectives: %s.\n", objectivesText(sol.GetObjectives(), fd.front.GetObjectives()))
	return writeCurvesTables(e.stdout, cr)
}
