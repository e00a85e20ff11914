package main

import (
	"context"
	"dampfront/api"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"runtime"
	"strings"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

var verifyCommand = &command{
	name:    "verify",
	summary: "time-domain check of a setup: the nonlinear dampers against the linear answer",
	run:     runVerify,
}

// verifySigmas is how many statistical errors a time-domain value may lie
// from the frequency-domain one before the verdict names it: for a
// Gaussian estimate, |z| > 3 has probability 0.27 % (common practice for
// a significance bound; the errors are upper bounds for the standard
// deviations of a linear car, see model.Verify).
const verifySigmas = 3

// verifyWarn is the time fraction off the road or beyond the bump-stop
// gap above which a corner is named: the 1 % of the design's validity
// warnings (DESIGN.md, "Validity"), the model's default as well.
const verifyWarn = 0.01

func runVerify(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, "verify", "[flags] (--spec FILE --setup FILE | JOB [--solution N | --balanced | --setup FILE | --all])", `
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

The exit code is 0 whatever the verdicts.`)
	cf := addClientFlags(fs, e)
	sf := addSpecFlags(fs)
	specPath := fs.String("spec", "", "job spec `file` giving the car and road cases (local check)")
	setupPath := fs.String("setup", "", "setup `file` to check")
	solution := fs.Int("solution", -1, "`index` of a solution of the job's front")
	fs.Bool("balanced", false, "the balanced point of the job's front (the default with JOB)")
	duration := fs.Float64("duration", model.DefaultDuration, "recorded `seconds` of road per case, after settling")
	seed := fs.Uint64("seed", 1, "`seed` of the road realisations (case i uses the stream (seed, i))")
	format := newFormat("table", "table", "json")
	fs.Var(format, "format", "output `format`: table or json (SI)")
	all := fs.Bool("all", false, "check every solution of the JOB's front and print a summary")
	parallel := fs.Int("parallel", runtime.NumCPU(), "with --all: solutions checked at once, `N` >= 1, one per CPU by default")
	quiet := fs.Bool("quiet", false, "with --all: no progress bar on stderr")
	pos, err := fs.parse(args, 0, 1)
	if err != nil {
		return err
	}
	if !(*duration > 0) || math.IsInf(*duration, 0) {
		return usagef("verify", "--duration must be a number of seconds > 0, got %g", *duration)
	}
	if err := checkVerifyAllFlags(fs, len(pos) == 1, *all, *parallel); err != nil {
		return err
	}
	if *all {
		return runVerifyAll(ctx, e, cf, sf, jobName(pos[0]), verifyAllOptions{
			opt:      model.VerifyOptions{Time: model.TimeOptions{Duration: *duration, WarnThreshold: verifyWarn}, Seed: *seed},
			parallel: *parallel, json: format.value == "json", quiet: *quiet,
		})
	}
	local := *specPath != "" || sf.vehicle != "" || sf.roads != ""
	targets := 0
	fs.Visit(func(f *flag.Flag) {
		switch f.Name {
		case "solution", "balanced", "setup":
			targets++
		}
	})
	switch {
	case len(pos) == 0 && !local:
		return usagef("verify", "give --spec FILE --setup FILE, or a JOB")
	case len(pos) == 0 && *setupPath == "":
		return usagef("verify", "--setup is required with --spec")
	case len(pos) == 0 && (isFlagSet(fs, "solution") || isFlagSet(fs, "balanced")):
		return usagef("verify", "--solution and --balanced need a JOB")
	case len(pos) == 0 && *specPath == "" && (sf.vehicle == "" || sf.roads == ""):
		return usagef("verify", "without --spec give both --vehicle and --roads")
	case len(pos) == 1 && *specPath != "":
		return usagef("verify", "give either --spec or a JOB, not both")
	case targets > 1:
		return usagef("verify", "give at most one of --solution, --balanced and --setup")
	case isFlagSet(fs, "solution") && *solution < 0:
		return usagef("verify", "--solution must be a front index >= 0")
	}

	var spec *pb.JobSpec
	var setup *pb.Setup
	var source string
	if *setupPath != "" {
		setups, err := readSetups(e, []string{*setupPath})
		if err != nil {
			return err
		}
		setup, source = setups[0], "setup "+*setupPath
	}
	if len(pos) == 0 {
		if spec, err = sf.load(e, *specPath); err != nil {
			return err
		}
	} else {
		// Replacement files are read before the server is dialled.
		over, err := sf.load(e, "")
		if err != nil {
			return err
		}
		if spec, setup, source, err = fetchJobSetup(ctx, cf, jobName(pos[0]), setup, source, *solution); err != nil {
			return err
		}
		spec = replaceParts(spec, over)
	}
	in, err := api.SpecToModel(spec)
	if err != nil {
		return err
	}
	s, err := setupToModel(setup, source)
	if err != nil {
		return err
	}
	rep, err := verifyInBackground(ctx, in, s, model.VerifyOptions{
		Time: model.TimeOptions{Duration: *duration, WarnThreshold: verifyWarn}, Model: in.Options, Seed: *seed,
	})
	if err != nil {
		var ve *model.ValidationError
		if errors.As(err, &ve) {
			return &exitError{code: exitUsage, msg: err.Error()}
		}
		return err
	}
	if format.value == "json" {
		return writeVerifyJSON(e.stdout, rep, in, setup, source)
	}
	if err := writeVerifyTable(e.stdout, rep, in, setup, source); err != nil {
		return err
	}
	printCaution(e.stdout)
	return nil
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
	sols := fd.front.GetSolutions()
	if solution >= 0 {
		for _, s := range sols {
			if int(s.GetIndex()) == solution {
				return fd.job.GetSpec(), s.GetSetup(), fmt.Sprintf("solution %d of %s", solution, name), nil
			}
		}
		return nil, nil, "", &exitError{code: exitUsage, msg: fmt.Sprintf("the front of %s has no solution %d (it has %d solutions)", name, solution, len(sols))}
	}
	b := balancedIndex(sols)
	if b < 0 {
		return nil, nil, "", &exitError{code: exitFailure, msg: "the front of " + name + " is empty: no balanced point"}
	}
	return fd.job.GetSpec(), sols[b].GetSetup(), fmt.Sprintf("balanced point, solution %d of %s", sols[b].GetIndex(), name), nil
}

// verifyInBackground runs model.Verify, which cannot be cancelled, so
// that an interrupt still ends the command at once.
func verifyInBackground(ctx context.Context, in *api.ModelInputs, s model.Setup, opt model.VerifyOptions) (*model.VerifyReport, error) {
	type outcome struct {
		rep *model.VerifyReport
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		rep, err := model.Verify(in.Vehicle, in.RoadCases, s, opt)
		done <- outcome{rep, err}
	}()
	select {
	case o := <-done:
		return o.rep, o.err
	case <-ctx.Done():
		return nil, fmt.Errorf("interrupted: %w", ctx.Err())
	}
}

// relabel is q under another label and column, in the same unit.
func relabel(q quantity, label, column string) quantity {
	q.label, q.column = label, column
	return q
}

// withPrec is q shown with other decimals.
func withPrec(q quantity, prec int) quantity {
	q.prec = prec
	return q
}

// fractionMetrics are the time fractions (probabilities in the frequency
// domain), whose differences and errors are shown in percentage points:
// relative to a Gaussian tail probability of 1e-30 they mean nothing.
var fractionMetrics = map[string]bool{"lift_off_fraction": true, "bump_stop_fraction": true}

// verifyMetrics pairs each metric name of model.VerifyRow (without its
// corner or axle) with its display.
var verifyMetrics = map[string]quantity{
	"tyre_load_sd_n":               relabel(qLoadSDRel, "tyre load sd", "tyre_load_sd_n"),
	"lift_off_fraction":            relabel(qProbability, "lift-off time", "lift_off_fraction"),
	"ride_height_sd_m":             qRideSD,
	"pitch_sd_rad":                 qPitchSD,
	"roll_sd_rad":                  relabel(qPitchSD, "roll sd", "roll_sd_rad"),
	"heave_accel_sd_m_per_s2":      qHeaveSD,
	"travel_sd_m":                  qTravelSD,
	"bump_stop_fraction":           relabel(qProbability, "bump-stop time", "bump_stop_fraction"),
	"damper_velocity_sd_m_per_s":   qDamperVelSD,
	"equivalent_damping_n_s_per_m": relabel(qSlope, "equiv. damping (wheel)", "equivalent_damping_n_s_per_m"),
	"mean_damper_force_n":          relabel(qForce, "mean damper force", "mean_damper_force_n"),
	"ride_height_shift_m":          qRideShift,
	"pitch_shift_rad":              withPrec(relabel(qPitchSD, "pitch shift", "pitch_shift_rad"), 5),
	"travel_shift_m":               relabel(qTravelSD, "travel shift", "travel_shift_m"),
}

// shownRow is one row of a verify table in trade units.
type shownRow struct {
	label, unit string
	freq, time  string
	diffPct     string // "-" when the frequency-domain value is 0
	errPct      string // "-" when there is no statistical error
	judged      bool
	sigmas      float64 // |Diff|/StatError when judged
}

// showRow converts a row to trade units; static are the case's static
// tyre loads (N).
func showRow(r model.VerifyRow, static [4]float64) shownRow {
	base, pos, _ := strings.Cut(strings.TrimSuffix(r.Metric, "]"), "[")
	q, ok := verifyMetrics[base]
	if !ok {
		q = quantity{label: strings.ReplaceAll(base, "_", " "), scale: 1, prec: 4, column: base}
	}
	f, t := r.Frequency, r.Time
	if base == "tyre_load_sd_n" {
		i := cornerIndex(pos)
		if i >= 0 && static[i] > 0 {
			f, t = f/static[i], t/static[i]
		}
	}
	out := shownRow{label: q.label, unit: q.unit, freq: tradeNum(q, f), time: tradeNum(q, t), diffPct: "-", errPct: "-"}
	if pos != "" {
		out.label += " " + pos
	}
	absolute := fractionMetrics[base] || r.Frequency == 0
	switch {
	case absolute && fractionMetrics[base]:
		out.diffPct = signedNum(q.trade(r.Diff), q.prec) + " pt"
	case absolute:
		out.diffPct = signedNum(q.trade(r.Diff), q.prec) + " " + q.unit
	default:
		out.diffPct = signedNum(pct(r.RelDiff), 1)
	}
	if r.StatError > 0 && !math.IsInf(r.StatError, 0) {
		out.judged = true
		out.sigmas = math.Abs(r.Diff) / r.StatError
		switch {
		case absolute && fractionMetrics[base]:
			out.errPct = fmt.Sprintf("%.*f pt", q.prec, q.trade(r.StatError))
		case absolute:
			out.errPct = fmt.Sprintf("%.*f %s", q.prec, q.trade(r.StatError), q.unit)
		default:
			out.errPct = fmt.Sprintf("%.1f", pct(r.StatError/math.Abs(r.Frequency)))
		}
	}
	if r.Diff == 0 && r.Frequency == 0 {
		out.diffPct = "0"
	}
	return out
}

// signedNum is v with prec decimals and its sign, "0.000" when it rounds
// to zero.
func signedNum(v float64, prec int) string {
	s := fmt.Sprintf("%+.*f", prec, v)
	if strings.Trim(s, "+-0.") == "" {
		return s[1:]
	}
	return s
}

func cornerIndex(name string) int {
	for i, c := range model.CornerNames {
		if c == name {
			return i
		}
	}
	return -1
}

// verifyVerdict is the judgement of one case: the rows beyond verifySigmas.
func verifyVerdict(rows []shownRow) (holds bool, line string) {
	var off []string
	for _, r := range rows {
		if r.judged && r.sigmas > verifySigmas {
			unit := ""
			if r.unit != "" {
				unit = " " + r.unit
			}
			rel := ""
			if !strings.HasSuffix(r.diffPct, "pt") && r.diffPct != "-" {
				rel = r.diffPct + " %, "
			}
			off = append(off, fmt.Sprintf("%s %s against %s%s (%s%.1f errors)", r.label, r.time, r.freq, unit, rel, r.sigmas))
		}
	}
	if len(off) == 0 {
		return true, "linear answer holds within the statistical error"
	}
	return false, fmt.Sprintf("differs by more than %d statistical errors in: %s", verifySigmas, strings.Join(off, "; "))
}

func writeVerifyTable(w io.Writer, rep *model.VerifyReport, in *api.ModelInputs, setup *pb.Setup, source string) error {
	fmt.Fprintf(w, "Time-domain check of %s on %s: %s\n", source, plain(in.Vehicle.Name), setupText(setup))
	fmt.Fprintf(w, "Road seed %d. Frequency domain: statistically linearised model; time domain: nonlinear dampers, tyres may leave the road.\n", rep.Seed)
	for i := range rep.Cases {
		c := &rep.Cases[i]
		tm := &c.Time
		fmt.Fprintf(w, "\nRoad case %q at %g m/s: %g s of road after %.1f s settling, RK4 step %.3f ms, road up to %.3g cycles/m\n",
			c.Case, in.RoadCases[i].Speed, tm.Duration, tm.Settle, tm.Step*1000, tm.RoadMaxN)
		rows := make([]shownRow, len(c.Rows))
		for k, r := range c.Rows {
			rows[k] = showRow(r, c.Frequency.StaticTyreLoad)
		}
		lw, uw := len("metric"), len("unit")
		for _, r := range rows {
			lw, uw = max(lw, len(r.label)), max(uw, len(r.unit))
		}
		t := newTable(w, true)
		t.row(fmt.Sprintf("%-*s", lw, "metric"), fmt.Sprintf("%-*s", uw, "unit"), "frequency domain", "time domain", "difference %", "statistical error %")
		for _, r := range rows {
			t.row(fmt.Sprintf("%-*s", lw, r.label), fmt.Sprintf("%-*s", uw, r.unit), r.freq, r.time, r.diffPct, r.errPct)
		}
		if err := t.flush(); err != nil {
			return err
		}
		if err := writePeaks(w, tm); err != nil {
			return err
		}
		for _, wn := range timeWarnings(tm) {
			fmt.Fprintf(w, "  warning: %s\n", plain(wn))
		}
		_, line := verifyVerdict(rows)
		fmt.Fprintf(w, "  verdict: %s\n", line)
	}
	return nil
}

// timeWarnings names the corners whose tyre left the road or whose travel
// passed the bump-stop gap for more than verifyWarn of the time.
func timeWarnings(tm *model.TimeMetrics) []string {
	var out []string
	for i, c := range model.CornerNames {
		if p := tm.LiftOffProbability[i]; p > verifyWarn {
			out = append(out, fmt.Sprintf("%s tyre off the road %s %% of the time (over %s %%)", c, tradeNum(qProbability, p), num(pct(verifyWarn), 0)))
		}
	}
	for i, c := range model.CornerNames {
		if p := tm.BumpStopProbability[i]; p > verifyWarn {
			out = append(out, fmt.Sprintf("%s travel beyond the bump-stop gap %s %% of the time (over %s %%)", c, tradeNum(qProbability, p), num(pct(verifyWarn), 0)))
		}
	}
	return out
}

// writePeaks prints the extremes of the time history per corner and axle.
func writePeaks(w io.Writer, tm *model.TimeMetrics) error {
	p := &tm.Peaks
	fmt.Fprintln(w, "  peaks of the time history:")
	t := newTable(w, true)
	const lw, uw = 31, 4 // the longest label and unit below
	t.row(fmt.Sprintf("%-*s", lw, ""), fmt.Sprintf("%-*s", uw, ""), "FL", "FR", "RL", "RR")
	corner := func(label string, q quantity, v [4]float64) {
		t.row(fmt.Sprintf("%-*s", lw, label), fmt.Sprintf("%-*s", uw, q.unit), tradeNum(q, v[0]), tradeNum(q, v[1]), tradeNum(q, v[2]), tradeNum(q, v[3]))
	}
	corner("lowest tyre load", qForce, p.TyreLoadMin)
	corner("highest tyre load", qForce, p.TyreLoadMax)
	corner("most travel in bump", qTravelSD, p.TravelMax)
	corner("most travel in rebound", qTravelSD, p.TravelMin)
	corner("highest damper speed in bump", qDamperVelSD, p.DamperVelocityMax)
	corner("highest damper speed in rebound", qDamperVelSD, p.DamperVelocityMin)
	if p.BumpStopForceMax != [4]float64{} {
		corner("highest bump-stop force", qForce, p.BumpStopForceMax)
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "  ride height change from %s to %s mm front, %s to %s mm rear; largest heave acceleration %s g\n",
		tradeNum(qRideShift, p.RideHeightMin[0]), tradeNum(qRideShift, p.RideHeightMax[0]),
		tradeNum(qRideShift, p.RideHeightMin[1]), tradeNum(qRideShift, p.RideHeightMax[1]),
		tradeNum(qHeaveSD, p.HeaveAccelMax))
	return nil
}

// verifyJSON is the report of --format json, SI throughout.
type verifyJSON struct {
	Source  string           `json:"source"`
	Vehicle string           `json:"vehicle"`
	Setup   json.RawMessage  `json:"setup"`
	Seed    uint64           `json:"seed"`
	Sigmas  float64          `json:"verdict_sigmas"`
	Cases   []verifyCaseJSON `json:"cases"`
	Caution string           `json:"caution"`
}

type verifyCaseJSON struct {
	RoadCase string          `json:"road_case"`
	Speed    float64         `json:"speed_m_per_s"`
	Holds    bool            `json:"holds"`
	Verdict  string          `json:"verdict"`
	Differs  []string        `json:"differs"`
	Step     float64         `json:"step_s"`
	Settle   float64         `json:"settle_s"`
	Duration float64         `json:"duration_s"`
	Samples  int             `json:"samples"`
	RoadMaxN float64         `json:"road_max_n_cycles_per_m"`
	Static   [4]float64      `json:"static_tyre_load_n"`
	Rows     []verifyRowJSON `json:"rows"`
	Peaks    verifyPeaksJSON `json:"peaks"`
	Warnings []string        `json:"warnings"`
}

type verifyRowJSON struct {
	Metric    string  `json:"metric"`
	Frequency float64 `json:"frequency"`
	Time      float64 `json:"time"`
	Diff      float64 `json:"diff"`
	RelDiff   float64 `json:"rel_diff"`
	StatError float64 `json:"stat_error"`
}

type verifyPeaksJSON struct {
	TyreLoadMin       [4]float64 `json:"tyre_load_min_n"`
	TyreLoadMax       [4]float64 `json:"tyre_load_max_n"`
	TravelMax         [4]float64 `json:"travel_max_m"`
	TravelMin         [4]float64 `json:"travel_min_m"`
	DamperVelocityMax [4]float64 `json:"damper_velocity_max_m_per_s"`
	DamperVelocityMin [4]float64 `json:"damper_velocity_min_m_per_s"`
	BumpStopForceMax  [4]float64 `json:"bump_stop_force_max_n"`
	RideHeightMin     [2]float64 `json:"ride_height_min_m"`
	RideHeightMax     [2]float64 `json:"ride_height_max_m"`
	HeaveAccelMax     float64    `json:"heave_accel_max_m_per_s2"`
}

func writeVerifyJSON(w io.Writer, rep *model.VerifyReport, in *api.ModelInputs, setup *pb.Setup, source string) error {
	out, err := verifyReportJSON(rep, in, setup, source)
	if err != nil {
		return err
	}
	b, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// verifyReportJSON is the report of one setup as --format json shows it.
func verifyReportJSON(rep *model.VerifyReport, in *api.ModelInputs, setup *pb.Setup, source string) (verifyJSON, error) {
	sb, err := protojson.MarshalOptions{UseProtoNames: true}.Marshal(setup)
	if err != nil {
		return verifyJSON{}, err
	}
	out := verifyJSON{Source: source, Vehicle: in.Vehicle.Name, Setup: sb, Seed: rep.Seed, Sigmas: verifySigmas,
		Caution: strings.Join(strings.Fields(caution), " ")}
	for i := range rep.Cases {
		c := &rep.Cases[i]
		tm := &c.Time
		cj := verifyCaseJSON{RoadCase: c.Case, Speed: in.RoadCases[i].Speed, Step: tm.Step, Settle: tm.Settle,
			Duration: tm.Duration, Samples: tm.Samples, RoadMaxN: tm.RoadMaxN, Static: c.Frequency.StaticTyreLoad,
			Differs: []string{}, Warnings: timeWarnings(tm)}
		shown := make([]shownRow, len(c.Rows))
		for k, r := range c.Rows {
			shown[k] = showRow(r, c.Frequency.StaticTyreLoad)
			cj.Rows = append(cj.Rows, verifyRowJSON{Metric: r.Metric, Frequency: r.Frequency, Time: r.Time,
				Diff: r.Diff, RelDiff: r.RelDiff, StatError: finiteOr0(r.StatError)})
			if shown[k].judged && shown[k].sigmas > verifySigmas {
				cj.Differs = append(cj.Differs, r.Metric)
			}
		}
		cj.Holds, cj.Verdict = verifyVerdict(shown)
		if cj.Warnings == nil {
			cj.Warnings = []string{}
		}
		p := &tm.Peaks
		cj.Peaks = verifyPeaksJSON{p.TyreLoadMin, p.TyreLoadMax, p.TravelMax, p.TravelMin, p.DamperVelocityMax,
			p.DamperVelocityMin, p.BumpStopForceMax, p.RideHeightMin, p.RideHeightMax, p.HeaveAccelMax}
		out.Cases = append(out.Cases, cj)
	}
	return out, nil
}

func finiteOr0(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0
	}
	return x
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
