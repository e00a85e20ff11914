package main

import (
	"context"
	"dampfront/api"
	"errors"
	"math"
	"runtime"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

var verifyCommand = &command{name: "verify", synopsis: verifySynopsis, maxArgs: 1, client: true,
	summary: "time-domain check of a setup: the nonlinear dampers against the linear answer", about: verifyAbout, flags: bindVerify}

func bindVerify(fs *flagSet, _ *env) (runFunc, error) { return newVerifyFlags(fs).run, nil }

// verifyWarn is the time fraction off the road or beyond the bump-stop
// gap above which a corner is named: the 1 % of the design's validity
// warnings (DESIGN.md, "Validity"), the model's default as well.
const verifyWarn = 0.01

const verifySynopsis = "[flags] (--spec FILE --setup FILE | JOB [--solution N | --balanced | --setup FILE | --all])"

const verifyAbout = `
Runs the time-domain check of one damper setup: on every road case it
synthesises a road with the case's spectrum, coherence and wheelbase delay
(seeded), integrates the nonlinear car (piecewise dampers with knees and
high-speed slopes, tyres that can leave the road) and compares its
statistics with the statistically linearised frequency-domain model.

Locally, without a server: --spec FILE --setup FILE (the spec's car and
road cases; --vehicle and --roads replace them, as for eval). Against a
server: JOB with --solution N (a solution of its front), --balanced (the
balanced point, the default) or --setup FILE; the job's spec and the
solution's setup are fetched and the check runs in this process.

Per road case the table gives each metric in both models in trade units,
their difference in per cent, and the statistical error of the
time-domain value from the record length (in per cent of the
frequency-domain value), then the time-domain peaks and a verdict: the
linear answer holds within the statistical error, or it differs by more
than 3 statistical errors in the metrics named. Rows without a
statistical error (equivalent damping, mean damper force) are shown, not
judged. The demo car takes about 0.2 s per case for 120 s of road on one
core; --format json prints the report in SI.

JOB --all checks every solution of the job's front, all on the same road
realisations (the same --seed and --duration), --parallel of them at a
time; the output is in front order and the same whatever --parallel. The
table has one row per solution: its damping ratios and objectives as
front shows them, the worst |time domain - frequency domain| in
statistical errors over the road cases and judged metrics with the metric
and case where it occurs, the largest time fraction a tyre is off the
road and a travel is beyond its bump-stop gap, and the verdict (holds on
every case, or differs); then how many solutions hold. --format json gives
an array of the single-setup reports, each with its solution's index.
The demo's front of about 150 solutions takes about 50 s on 2 cores; a
progress bar on stderr counts the solutions checked (--quiet: none).

The exit code is 0 whatever the verdicts.`

// verifyFlags are the flags of verify.
type verifyFlags struct {
	fs                  *flagSet
	cf                  *clientFlags
	sf                  *specFlags
	specPath, setupPath *string
	solution            *int
	duration            *float64
	seed                *uint64
	format              *formatFlag
	all, quiet          *bool
	parallel            *int
}

func newVerifyFlags(fs *flagSet) *verifyFlags {
	f := &verifyFlags{fs: fs, sf: addSpecFlags(fs)}
	f.specPath = fs.String("spec", "", "job spec `file` giving the car and road cases (local check)")
	f.setupPath = fs.String("setup", "", "setup `file` to check")
	f.solution = fs.Int("solution", -1, "`index` of a solution of the job's front")
	fs.Bool("balanced", false, "the balanced point of the job's front (the default with JOB)")
	f.duration = fs.Float64("duration", model.DefaultDuration, "recorded `seconds` of road per case, after settling")
	f.seed = fs.Uint64("seed", 1, "`seed` of the road realisations (case i uses the stream (seed, i))")
	f.format = newFormat("table", "table", "json")
	fs.Var(f.format, "format", "output `format`: table or json (SI)")
	f.all = fs.Bool("all", false, "check every solution of the JOB's front and print a summary")
	f.parallel = fs.Int("parallel", runtime.NumCPU(), "with --all: solutions checked at once, `N` >= 1, one per CPU by default")
	f.quiet = fs.Bool("quiet", false, "with --all: no progress bar on stderr")
	return f
}

// options are the check's options from the flags; Model is the spec's.
func (f *verifyFlags) options() model.VerifyOptions {
	return model.VerifyOptions{Time: model.TimeOptions{Duration: *f.duration, WarnThreshold: verifyWarn}, Seed: *f.seed}
}

// check refuses the flags that do not go together for one setup.
func (f *verifyFlags) check(pos []string) error {
	fs := f.fs
	local := *f.specPath != "" || f.sf.vehicle != "" || f.sf.roads != ""
	targets := countSet(fs, "solution", "balanced", "setup")
	switch {
	case len(pos) == 0 && !local:
		return usagef("verify", "give --spec FILE --setup FILE, or a JOB")
	case len(pos) == 0 && *f.setupPath == "":
		return usagef("verify", "--setup is required with --spec")
	case len(pos) == 0 && (isFlagSet(fs, "solution") || isFlagSet(fs, "balanced")):
		return usagef("verify", "--solution and --balanced need a JOB")
	case len(pos) == 0 && *f.specPath == "" && (f.sf.vehicle == "" || f.sf.roads == ""):
		return usagef("verify", "without --spec give both --vehicle and --roads")
	case len(pos) == 1 && *f.specPath != "":
		return usagef("verify", "give either --spec or a JOB, not both")
	case targets > 1:
		return usagef("verify", "give at most one of --solution, --balanced and --setup")
	case isFlagSet(fs, "solution") && *f.solution < 0:
		return usagef("verify", "--solution must be a front index >= 0")
	}
	return nil
}

// run checks one setup, or with --all every solution of a job's front;
// the client flags are the dispatcher's.
func (f *verifyFlags) run(ctx context.Context, e *env, parsed *parsed) error {
	f.cf = parsed.client
	pos := parsed.args
	if !(*f.duration > 0) || math.IsInf(*f.duration, 0) {
		return usagef("verify", "--duration must be a number of seconds > 0, got %g", *f.duration)
	}
	if err := checkVerifyAllFlags(f.fs, len(pos) == 1, *f.all, *f.parallel); err != nil {
		return err
	}
	if *f.all {
		return runVerifyAll(ctx, e, f.cf, f.sf, jobName(pos[0]), verifyAllOptions{
			opt: f.options(), parallel: *f.parallel, json: f.format.value == "json", quiet: *f.quiet,
		})
	}
	if err := f.check(pos); err != nil {
		return err
	}
	spec, setup, source, err := f.source(ctx, e, pos)
	if err != nil {
		return err
	}
	in, err := api.SpecToModel(spec)
	if err != nil {
		return err
	}
	s, err := setupToModel(setup, source)
	if err != nil {
		return err
	}
	opt := f.options()
	opt.Model = in.Options
	reps, err := model.VerifySetups(ctx, in.Vehicle, in.RoadCases, []model.Setup{s}, opt, 1, nil)
	if err != nil {
		return verifyError(err)
	}
	if f.format.value == "json" {
		return writeVerifyJSON(e.stdout, reps[0], in, setup, source)
	}
	if err := writeVerifyTable(e.stdout, reps[0], in, setup, source); err != nil {
		return err
	}
	printCaution(e.stdout)
	return nil
}

// verifyError is a check's error; a bad setup or option is a usage error.
func verifyError(err error) error {
	var ve *model.ValidationError
	if errors.As(err, &ve) {
		return &exitError{code: exitUsage, msg: err.Error()}
	}
	return err
}

// source reads the spec and the setup to check, and names the setup: a
// local spec (or --vehicle and --roads) with --setup, or a JOB's spec
// with a setup of its front or --setup.
func (f *verifyFlags) source(ctx context.Context, e *env, pos []string) (*pb.JobSpec, *pb.Setup, string, error) {
	var setup *pb.Setup
	var source string
	if *f.setupPath != "" {
		setups, err := readSetups(e, []string{*f.setupPath})
		if err != nil {
			return nil, nil, "", err
		}
		setup, source = setups[0], "setup "+*f.setupPath
	}
	if len(pos) == 0 {
		spec, err := f.sf.load(e, *f.specPath)
		return spec, setup, source, err
	}
	// Replacement files are read before the server is dialled.
	over, err := f.sf.load(e, "")
	if err != nil {
		return nil, nil, "", err
	}
	spec, setup, source, err := fetchJobSetup(ctx, f.cf, jobName(pos[0]), setup, source, *f.solution)
	if err != nil {
		return nil, nil, "", err
	}
	return replaceParts(spec, over), setup, source, nil
}

// fetchJobSetup reads a job's spec and a setup to use on it: the given
// one, the solution of that index, or the balanced point.
func fetchJobSetup(ctx context.Context, cf *clientFlags, name string, setup *pb.Setup, source string, solution int) (*pb.JobSpec, *pb.Setup, string, error) {
	c, err := cf.dial()
	if err != nil {
		return nil, nil, "", err
	}
	defer c.Close()
	if setup != nil {
		cctx, cancel := c.call(ctx)
		jr, err := c.svc.GetJob(cctx, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_FULL})
		cancel()
		if err != nil {
			return nil, nil, "", err
		}
		return jr.GetJob().GetSpec(), setup, source + " on " + name, nil
	}
	fd, err := fetchFront(ctx, c, name, pb.SolutionView_SOLUTION_VIEW_BASIC)
	if err != nil {
		return nil, nil, "", err
	}
	s, what, err := pickSolution(fd, name, solution)
	if err != nil {
		return nil, nil, "", err
	}
	return fd.job.GetSpec(), s.GetSetup(), what + " of " + name, nil
}

// setupToModel converts a setup read from path; a bad one is an input
// error naming the file (exit code 2).
func setupToModel(s *pb.Setup, path string) (model.Setup, error) {
	out, err := api.SetupToModel(s, "setup")
	if err != nil {
		return out, &inputFileError{path: path, err: err}
	}
	return out, nil
}
