package main

import (
	"bytes"
	"context"
	"dampfront/api"
	"errors"
	"flag"
	"fmt"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
	"dampfront/model"
)

var plotCommand = &command{name: "plot", synopsis: "CHART [flags] [JOB] (--svg FILE | --png FILE)", maxArgs: 2, client: true,
	summary: "write a chart as SVG or PNG: front, damper curves, modal ratios, hypervolume, road input, output spectra, time history", about: plotAbout, flags: bindPlot}

// plotCharts are the charts of "plot", each with the flags of its own;
// the flags of the page and the files, and the client's, go with every
// chart.
var plotCharts = map[string][]string{
	"front":       {"objectives", "colour", "mark"},
	"curves":      {"solution", "balanced"},
	"modes":       {"objectives"},
	"hypervolume": nil,
	"road":        {"spec"},
	"spectra":     {"spec", "setup", "case", "solution", "balanced"},
	"history":     {"case", "solution", "balanced"},
}

// plotAbout is the help text of plot.
const plotAbout = `
Writes one chart to --svg FILE, --png FILE or both. Charts:

  front JOB          the Pareto front: each pair of objectives in trade
                     units, the solutions coloured by the front/rear
                     damping balance (--colour GENE for a gene), the
                     balanced point ringed, --mark solutions boxed
  curves JOB         damper force-velocity curves at the component of the
                     balanced point (the default) or of --solution N, with
                     the adjuster range shaded and the knees marked
  modes JOB          heave, pitch and roll modal damping ratios of every
                     solution against the first objective (--objectives I
                     for another), a panel per road case, the hand ratio
                     (rigid tyres, same slopes) dashed beside each
  hypervolume JOB    hypervolume per generation, up to the last checkpoint
  road JOB           the road cases' displacement PSDs over the ISO 8608
  road --spec FILE   classes, of a stored job or of a spec file
  spectra JOB [--solution N | --setup FILE] [--case I]
  spectra --spec FILE --setup FILE [--case I]
                     tyre load and ride-height PSDs front and rear of a
                     setup on road case I (0, the first, by default), with
                     the car's modes marked: the balanced point of a job's
                     front (the default), its --solution N, or a --setup
                     FILE on the job's car and roads; or a setup on a spec
                     file's, with no server. Computed here.
  history JOB [--solution N] [--case NAME]
                     time history of the balanced point (the default) or
                     of --solution N on the job's manoeuvre or kerb case
                     NAME (the first by default), simulated by the server:
                     roll, pitch, the front share of the lateral load
                     transfer with their steady values, and the four tyre
                     loads

The page is --width by --height in mm (0: the chart's own size), PNGs at
--dpi. Every chart carries the model's caution in its footnote.`

func bindPlot(fs *flagSet, e *env) (runFunc, error) {
	svgPath := fs.String("svg", "", "write the chart as SVG to this `file`")
	pngPath := fs.String("png", "", "write the chart as PNG to this `file`")
	width := fs.Float64("width", 0, "page width, `mm` (0: the chart's default)")
	height := fs.Float64("height", 0, "page height, `mm` (0: the chart's default)")
	dpi := fs.Int("dpi", 0, fmt.Sprintf("PNG resolution, `dots` per inch (0: %d)", plot.DefaultDPI))
	title := fs.String("title", "", "the chart's `title` instead of its default")
	var objectives, marked intList
	fs.Var(&objectives, "objectives", "front: the `positions` of the two or three objectives drawn, as 0,1 (default: all); modes: the one along x")
	colour := fs.String("colour", "", "front: colour the points by this `gene` (default: the front/rear balance)")
	fs.Var(&marked, "mark", "front: box the solutions of these `indices`, as 3,17 (repeatable)")
	solution := fs.Int("solution", -1, "curves, spectra, history: `index` of a solution of the job's front")
	fs.Bool("balanced", false, "curves, spectra, history: the balanced point of the front (the default)")
	specPath := fs.String("spec", "", "road, spectra: job spec `file` giving the car and the road cases")
	setupPath := fs.String("setup", "", "spectra: setup `file` whose spectra to draw (with --spec, or on a JOB's car and roads)")
	caseArg := fs.String("case", "", "spectra: the road `case`'s index in the spec, from 0 (default 0); history: the manoeuvre or kerb case's name (default: the first)")
	return func(ctx context.Context, e *env, in *parsed) error {
		pos, cf := in.args, in.client
		if len(pos) == 0 {
			return usagef("plot", "name a chart: front, curves, modes, hypervolume, road, spectra or history")
		}
		chart := pos[0]
		own, ok := plotCharts[chart]
		if !ok {
			return usagef("plot", "unknown chart %q (want front, curves, modes, hypervolume, road, spectra or history)", chart)
		}
		if err := checkChartFlags(fs, chart, own); err != nil {
			return err
		}
		job := ""
		if len(pos) == 2 {
			job = jobName(pos[1])
		}
		if *svgPath == "" && *pngPath == "" {
			return usagef("plot", "give --svg FILE, --png FILE or both")
		}
		if err := checkPlotSource(fs, chart, job, *specPath, *setupPath); err != nil {
			return err
		}
		switch {
		case isFlagSet(fs, "solution") && *solution < 0:
			return usagef("plot", "--solution must be a front index >= 0")
		case !(*width >= 0) || !(*height >= 0) || math.IsInf(*width, 0) || math.IsInf(*height, 0) || *dpi < 0:
			return usagef("plot", "--width, --height and --dpi must be numbers >= 0")
		}

		var fig *plot.Figure
		var err error
		page := plotPage{title: *title, width: vg.Length(*width) * vg.Millimeter, height: vg.Length(*height) * vg.Millimeter}
		switch chart {
		case "spectra":
			fig, err = plotSpectra(ctx, e, cf, job, *specPath, *setupPath, *solution, *caseArg, page)
		case "history":
			fig, err = plotHistory(ctx, cf, job, *solution, *caseArg, page)
		case "road":
			if job == "" {
				var spec *pb.JobSpec
				if spec, err = readSpec(e, *specPath); err == nil {
					fig, err = plotRoad(spec, page)
				}
				break
			}
			fallthrough
		default:
			fig, err = plotOfJob(ctx, cf, chart, job, plot.FrontOptions{Objectives: objectives, ColourGene: *colour, Marked: int32s(marked)}, *solution, page)
		}
		if err != nil {
			return figureError(err)
		}
		fig.DPI = *dpi
		return writeFigure(e, fig, chart, *svgPath, *pngPath)
	}, nil
}

// plotOfJob draws a chart of a job from the server: front (with opt),
// curves (of the solution, or the balanced point when < 0), hypervolume
// or road.
func plotOfJob(ctx context.Context, cf *clientFlags, chart, job string, opt plot.FrontOptions, solution int, page plotPage) (*plot.Figure, error) {
	c, err := cf.dial()
	if err != nil {
		return nil, err
	}
	defer c.Close()
	switch chart {
	case "front":
		return plotFront(ctx, c, job, opt, page)
	case "curves":
		return plotCurves(ctx, c, job, solution, page)
	case "modes":
		return plotModes(ctx, c, job, opt.Objectives, page)
	}
	return plotFromJob(ctx, c, job, chart, page)
}

// checkPlotSource refuses a chart without its JOB or spec file, or with
// more than one of the setups to draw.
func checkPlotSource(fs *flagSet, chart, job, specPath, setupPath string) error {
	switch {
	case (chart == "front" || chart == "curves" || chart == "modes" || chart == "hypervolume" || chart == "history") && job == "":
		return usagef("plot", "the %s chart needs a JOB", chart)
	case chart == "road" && (job == "") == (specPath == ""):
		return usagef("plot", "the road chart needs a JOB or --spec FILE, not both")
	case chart == "spectra" && job == "" && (specPath == "" || setupPath == ""):
		return usagef("plot", "the spectra chart needs a JOB, or --spec FILE and --setup FILE")
	case chart == "spectra" && job != "" && specPath != "":
		return usagef("plot", "the spectra chart takes a JOB or --spec FILE, not both")
	case chart == "spectra" && job == "" && (isFlagSet(fs, "solution") || isFlagSet(fs, "balanced")):
		return usagef("plot", "--solution and --balanced need a JOB")
	case countSet(fs, "solution", "balanced", "setup") > 1:
		return usagef("plot", "give at most one of --solution, --balanced and --setup")
	}
	return nil
}

// checkChartFlags refuses the flags of other charts than chart, whose
// own flags are own.
func checkChartFlags(fs *flagSet, chart string, own []string) error {
	var wrong []string
	fs.Visit(func(f *flag.Flag) {
		for c, names := range plotCharts {
			if c != chart && slices.Contains(names, f.Name) && !slices.Contains(own, f.Name) && !slices.Contains(wrong, f.Name) {
				wrong = append(wrong, f.Name)
			}
		}
	})
	if len(wrong) > 0 {
		slices.Sort(wrong)
		return usagef("plot", "--%s: not a flag of the %s chart", strings.Join(wrong, ", --"), chart)
	}
	return nil
}

// writeFigure writes the chart as SVG to svgPath and PNG to pngPath
// (each when not empty). Both formats are rendered before either file is
// written, so that a page the PNG refuses leaves no SVG behind either.
func writeFigure(e *env, fig *plot.Figure, chart, svgPath, pngPath string) error {
	outs := []struct {
		path   string
		format plot.Format
		b      bytes.Buffer
	}{{path: svgPath, format: plot.SVG}, {path: pngPath, format: plot.PNG}}
	for i := range outs {
		if outs[i].path != "" {
			if err := fig.Write(&outs[i].b, outs[i].format); err != nil {
				return figureError(err)
			}
		}
	}
	for i := range outs {
		if outs[i].path == "" {
			continue
		}
		if err := os.WriteFile(outs[i].path, outs[i].b.Bytes(), 0o644); err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "Wrote %s (%s chart, %s).\n", outs[i].path, chart, strings.ToUpper(string(outs[i].format)))
	}
	return nil
}

// plotPage is what the flags set of every chart's page.
type plotPage struct {
	title         string
	width, height vg.Length
}

// apply sets the page of a built figure: the chart's own defaults stay
// where a flag is 0 or empty.
func (pg plotPage) apply(fig *plot.Figure) *plot.Figure {
	if pg.title != "" {
		fig.Title = pg.title
	}
	if pg.width > 0 {
		fig.Width = pg.width
	}
	if pg.height > 0 {
		fig.Height = pg.height
	}
	return fig
}

// plotFront draws the whole front of a job.
func plotFront(ctx context.Context, c *client, job string, opt plot.FrontOptions, page plotPage) (*plot.Figure, error) {
	fd, err := fetchFront(ctx, c, job, pb.SolutionView_SOLUTION_VIEW_BASIC)
	if err != nil {
		return nil, err
	}
	opt.Title = "Pareto front, " + jobTitle(fd.job)
	fig, err := plot.Front(fd.front, opt)
	if err != nil {
		return nil, err
	}
	fig.Notes = append(fig.Notes, jobNote(fd.job))
	return page.apply(fig), nil
}

// plotCurves draws the damper curves of a solution of a job's front, the
// balanced point when solution < 0.
func plotCurves(ctx context.Context, c *client, job string, solution int, page plotPage) (*plot.Figure, error) {
	req := &pb.GetDamperCurvesRequest{Job: job}
	what := fmt.Sprintf("solution %d", solution)
	var j *pb.Job
	if solution < 0 {
		fd, err := fetchFront(ctx, c, job, pb.SolutionView_SOLUTION_VIEW_BASIC)
		if err != nil {
			return nil, err
		}
		b := balancedIndex(fd.front.GetSolutions())
		if b < 0 {
			return nil, &exitError{code: exitFailure, msg: "the front of " + job + " is empty: no balanced point"}
		}
		solution = int(fd.front.GetSolutions()[b].GetIndex())
		what = fmt.Sprintf("balanced point (solution %d)", solution)
		j = fd.job
	}
	req.Target = &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: int32(solution)}
	resp, err := unary(ctx, c, c.svc.GetDamperCurves, req)
	if err != nil {
		return nil, err
	}
	if j == nil {
		j = &pb.Job{Name: job}
	}
	fig, err := plot.DamperCurves(resp.GetCurves(), plot.CurveOptions{Title: "Damper curves at the component, " + what})
	if err != nil {
		return nil, err
	}
	fig.Notes = append(fig.Notes, "Setup: "+setupText(resp.GetSetup())+".", jobNote(j))
	return page.apply(fig), nil
}

// plotFromJob draws a chart of a job's stored record: its hypervolume
// history or its spec's road cases.
func plotFromJob(ctx context.Context, c *client, job, chart string, page plotPage) (*plot.Figure, error) {
	cctx, cancel := c.call(ctx)
	jr, err := c.svc.GetJob(cctx, &pb.GetJobRequest{Name: job, View: pb.JobView_JOB_VIEW_FULL})
	cancel()
	if err != nil {
		return nil, err
	}
	j := jr.GetJob()
	if chart == "road" {
		fig, err := plotRoad(j.GetSpec(), page)
		if err != nil {
			return nil, err
		}
		fig.Notes = append(fig.Notes, jobNote(j))
		return fig, nil
	}
	if len(j.GetHistory()) == 0 {
		return nil, &exitError{code: exitFailure, msg: fmt.Sprintf("%s has no progress to draw yet (%s)", job, stateName(j.GetState()))}
	}
	fig, err := plot.Hypervolume(j.GetHistory(), j.GetSpec().GetObjectives(), plot.HypervolumeOptions{
		Title: "Hypervolume per generation, " + jobTitle(j)})
	if err != nil {
		return nil, err
	}
	fig.Notes = append(fig.Notes, jobNote(j))
	return page.apply(fig), nil
}

// plotRoad draws the road cases of a spec.
func plotRoad(spec *pb.JobSpec, page plotPage) (*plot.Figure, error) {
	in, err := api.SpecToModel(spec)
	if err != nil {
		return nil, err
	}
	title := "Road input"
	if name := spec.GetDisplayName(); name != "" {
		title += ", " + name
	}
	fig, err := plot.RoadInput(in.RoadCases, plot.RoadOptions{Title: title})
	if err != nil {
		return nil, err
	}
	return page.apply(fig), nil
}

// plotSpectra computes and draws the output spectra of a setup on one
// road case, with the car's modes at the case's speed: a setup file on a
// spec file's car and roads, or a solution of a job's front (or a setup
// file) on the job's, fetched from the server.
func plotSpectra(ctx context.Context, e *env, cf *clientFlags, job, specPath, setupPath string, solution int, caseArg string, page plotPage) (*plot.Figure, error) {
	ci := 0
	if caseArg != "" {
		n, err := strconv.Atoi(caseArg)
		if err != nil || n < 0 {
			return nil, usagef("plot", "--case must be a road case index >= 0, got %q", caseArg)
		}
		ci = n
	}
	var spec *pb.JobSpec
	var setup *pb.Setup
	source := ""
	if setupPath != "" {
		setups, err := readSetups(e, []string{setupPath})
		if err != nil {
			return nil, err
		}
		setup, source = setups[0], "setup "+setupPath
	}
	var err error
	if job == "" {
		spec, err = readSpec(e, specPath)
	} else {
		spec, setup, source, err = fetchJobSetup(ctx, cf, job, setup, source, solution)
	}
	if err != nil {
		return nil, err
	}
	in, err := api.SpecToModel(spec)
	if err != nil {
		return nil, err
	}
	if ci >= len(in.RoadCases) {
		return nil, usagef("plot", "--case %d: the spec has %d road cases (0 to %d)", ci, len(in.RoadCases), len(in.RoadCases)-1)
	}
	s, err := setupToModel(setup, source)
	if err != nil {
		return nil, err
	}
	sp, cm, err := in.Evaluator.Spectra(s, ci)
	if err != nil {
		return nil, err
	}
	speed := in.RoadCases[ci].Speed
	modes, err := model.ModesAtHeave(&in.Vehicle, speed, cm.EquivalentDamping, cm.HeaveEquivalentDamping)
	if err != nil {
		return nil, err
	}
	fig, err := plot.Spectra(sp, modes, plot.SpectraOptions{})
	if err != nil {
		return nil, err
	}
	fig.Notes = append(fig.Notes, fmt.Sprintf("%s: %s; %s at %g m/s.", capitalise(source), setupText(setup), sp.Case, speed))
	return page.apply(fig), nil
}

// readSpec reads a job spec file.
func readSpec(e *env, path string) (*pb.JobSpec, error) {
	spec := &pb.JobSpec{}
	if err := readMessage(e, path, spec); err != nil {
		return nil, err
	}
	return spec, nil
}

// jobTitle names a job in a chart's title: its display name, or its
// resource name when it has none.
func jobTitle(j *pb.Job) string {
	if j.GetDisplayName() == "" {
		return j.GetName()
	}
	return j.GetDisplayName()
}

// jobNote is the footnote naming the job a chart comes from: "Job
// jobs/01a2..., seed 7." (the seed makes the search reproducible).
func jobNote(j *pb.Job) string {
	if j.GetSeed() == 0 {
		return "Job " + j.GetName() + "."
	}
	return fmt.Sprintf("Job %s, seed %d.", j.GetName(), j.GetSeed())
}

// plotFlags are the flags that the chart options' field paths stand for.
var plotFlags = map[string]string{
	"width": "width", "height": "height", "dpi": "dpi",
	"objectives": "objectives", "colour_gene": "colour", "marked": "mark",
}

// figureError makes a chart's *model.ValidationError about the page or
// the options a usage error naming the flags (exit code 2), and one about
// the data (an empty front, say) a failure (exit code 1).
func figureError(err error) error {
	var ve *model.ValidationError
	if !errors.As(err, &ve) {
		return err
	}
	var flags, data []string
	for _, p := range ve.Problems {
		root, _, _ := strings.Cut(p.Field, "[")
		if f, ok := plotFlags[root]; ok {
			flags = append(flags, fmt.Sprintf("--%s: %s", f, p.Reason))
			continue
		}
		data = append(data, p.Error())
	}
	if len(data) > 0 {
		return &exitError{code: exitFailure, msg: "cannot draw the chart: " + strings.Join(append(data, flags...), "; ")}
	}
	return usagef("plot", "%s", strings.Join(flags, "; "))
}

// intList is a flag of integers, comma-separated or repeated.
type intList []int

func (l *intList) String() string {
	parts := make([]string, len(*l))
	for i, v := range *l {
		parts[i] = strconv.Itoa(v)
	}
	return strings.Join(parts, ",")
}

func (l *intList) Set(s string) error {
	for _, p := range strings.Split(s, ",") {
		v, err := strconv.Atoi(strings.TrimSpace(p))
		if err != nil {
			return fmt.Errorf("%q is not a list of integers", s)
		}
		*l = append(*l, v)
	}
	return nil
}

func int32s(l intList) []int32 {
	out := make([]int32, len(l))
	for i, v := range l {
		out[i] = int32(v)
	}
	return out
}
