package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"google.golang.org/protobuf/encoding/protojson"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// evalAbout is the help text of eval.
const evalAbout = `
Evaluates one or more damper setups (dampfront.v1 Setup messages in YAML or
JSON, see testdata/candidate-setup.yaml) on the car, road cases, objectives
and constraints of a job spec file or of a stored job, synchronously. The
table shows per setup its objectives and constraints and per road case the
ride metrics in trade units; --format json prints the EvaluateSetups
response as protojson (SI, units in the field names).`

var evalCommand = &command{name: "eval", synopsis: "[flags] --setup FILE [--setup FILE...] (--spec FILE | --job JOB)", client: true,
	summary: "evaluate setups on the road cases of a spec or a job", about: evalAbout, flags: bindEval}

func bindEval(fs *flagSet, _ *env) (runFunc, error) {
	f := &evalFlags{sf: addSpecFlags(fs), format: newFormat("table", "table", "json")}
	fs.StringVar(&f.specPath, "spec", "", "job spec `file` giving the car, road cases, objectives and constraints")
	fs.StringVar(&f.job, "job", "", "a stored `job` whose spec to use instead of --spec")
	fs.Var(&f.setupPaths, "setup", "setup `file` to evaluate (repeatable)")
	fs.Var(f.format, "format", "output `format`: table or json")
	return f.run, nil
}

// evalFlags are eval's own flags.
type evalFlags struct {
	sf         *specFlags
	specPath   string
	job        string
	setupPaths stringList
	format     *formatFlag
}

func (f *evalFlags) run(ctx context.Context, e *env, in *parsed) error {
	if len(f.setupPaths) == 0 {
		return usagef("eval", "--setup is required")
	}
	fromSpec := f.specPath != "" || f.sf.vehicle != "" || f.sf.roads != ""
	if fromSpec == (f.job != "") {
		return usagef("eval", "give either --spec (optionally with --vehicle, --roads) or --job")
	}
	var src api.TextSources
	setups, err := readSetupsAt(e, f.setupPaths, &src, "setups")
	if err != nil {
		return err
	}
	req := &pb.EvaluateSetupsRequest{Setups: setups, View: pb.SolutionView_SOLUTION_VIEW_FULL}
	if fromSpec {
		spec, err := f.sf.load(e, f.specPath)
		if err != nil {
			return err
		}
		req.Source = &pb.EvaluateSetupsRequest_Spec{Spec: spec}
		src = append(src, f.sf.src...)
	} else {
		req.Source = &pb.EvaluateSetupsRequest_Job{Job: jobName(f.job)}
	}
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.EvaluateSetups(cctx, req)
	cancel()
	if err != nil {
		return locate(err, src)
	}
	if f.format.value == "json" {
		b, err := protojson.MarshalOptions{Multiline: true}.Marshal(resp)
		if err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "%s\n", b)
		return nil
	}
	for i, s := range resp.GetEvaluations() {
		if i > 0 {
			fmt.Fprintln(e.stdout)
		}
		if err := writeEvaluation(e.stdout, f.setupPaths[i], s, resp.GetObjectives(), resp.GetConstraints()); err != nil {
			return err
		}
	}
	printCaution(e.stdout)
	return nil
}

// setupText is a one-line description of a setup's ratios.
func setupText(s *pb.Setup) string {
	f, r := s.GetFront(), s.GetRear()
	text := fmt.Sprintf("front bump %.3f rebound %.3f, rear bump %.3f rebound %.3f (ratios at the wheel)",
		f.GetBumpRatio(), f.GetReboundRatio(), r.GetBumpRatio(), r.GetReboundRatio())
	for ax, h := range [2]*pb.AxleDamping{s.GetFrontHeave(), s.GetRearHeave()} {
		if h != nil {
			text += fmt.Sprintf("; %s heave bump %.3f rebound %.3f (of heave critical)", model.AxleNames[ax], h.GetBumpRatio(), h.GetReboundRatio())
		}
	}
	return text
}

// objectivesText is "grip 6.10 % static, platform 1.234 mm".
func objectivesText(values []float64, objectives []*pb.Objective) string {
	var parts []string
	for i, v := range values {
		if i < len(objectives) {
			q := objectiveQuantity(objectives[i].GetKind())
			parts = append(parts, fmt.Sprintf("%s %s %s", q.label, tradeNum(q, v), q.unit))
		}
	}
	return strings.Join(parts, ", ")
}

// writeEvaluation prints one evaluated setup: objectives, constraints,
// warnings and a metrics table with one row per road case.
func writeEvaluation(w io.Writer, title string, s *pb.Solution, objectives []*pb.Objective, constraints []*pb.Constraint) error {
	fmt.Fprintf(w, "Setup %s: %s\n", title, setupText(s.GetSetup()))
	fmt.Fprintf(w, "  objectives: %s\n", objectivesText(s.GetObjectives(), objectives))
	writeRobust(w, s.GetRobust(), objectives)
	if s.GetFeasible() {
		fmt.Fprintln(w, "  constraints: all met")
	} else {
		fmt.Fprintf(w, "  constraints: NOT met: %s\n", plain(s.GetInfeasibleReason()))
	}
	for k, c := range constraints {
		if k < len(s.GetViolations()) && s.GetViolations()[k] > 0 {
			q := constraintQuantity(c.GetKind())
			fmt.Fprintf(w, "    %s over its limit %s %s by %.1f %%\n", q.label, tradeNum(q, c.GetLimit()), q.unit, pct(s.GetViolations()[k]))
		}
	}
	for _, c := range s.GetClicks() {
		fmt.Fprintf(w, "  clicks from the stiffest: %s\n", api.ClicksText(c))
	}
	for _, wn := range s.GetWarnings() {
		fmt.Fprintf(w, "  warning: %s\n", plain(wn))
	}
	if len(s.GetCaseMetrics()) == 0 {
		return nil
	}
	fmt.Fprintln(w)
	t := newTable(w, false)
	t.row("road case", qLoadSDRel.header()+" FL/FR/RL/RR", qRideSD.header()+" F/R", qRideShift.header()+" F/R",
		qPitchSD.header(), qHeaveSD.header(), qTravelSD.header()+" F/R", qDamperVelSD.header()+" F/R",
		"lift-off % max", "bump-stop % max")
	for _, m := range s.GetCaseMetrics() {
		cm := m.GetCorners()
		per := func(q quantity, get func(*pb.CornerMetrics) float64, idx ...int) string {
			parts := make([]string, 0, len(idx))
			for _, i := range idx {
				if i < len(cm) {
					parts = append(parts, tradeNum(q, get(cm[i])))
				}
			}
			return strings.Join(parts, "/")
		}
		maxOf := func(get func(*pb.CornerMetrics) float64) float64 {
			v := 0.0
			for _, c := range cm {
				v = max(v, get(c))
			}
			return v
		}
		t.row(m.GetRoadCase(),
			per(qLoadSDRel, (*pb.CornerMetrics).GetRelativeTyreLoadSd, 0, 1, 2, 3),
			tradeNum(qRideSD, m.GetFront().GetRideHeightSdM())+"/"+tradeNum(qRideSD, m.GetRear().GetRideHeightSdM()),
			tradeNum(qRideShift, m.GetFront().GetRideHeightShiftM())+"/"+tradeNum(qRideShift, m.GetRear().GetRideHeightShiftM()),
			tradeNum(qPitchSD, m.GetPitchSdRad()),
			tradeNum(qHeaveSD, m.GetHeaveAccelSdMPerS2()),
			per(qTravelSD, (*pb.CornerMetrics).GetTravelSdM, 0, 2),
			per(qDamperVelSD, (*pb.CornerMetrics).GetDamperVelocitySdMPerS, 0, 2),
			tradeNum(qProbability, maxOf((*pb.CornerMetrics).GetLiftOffProbability)),
			tradeNum(qProbability, maxOf((*pb.CornerMetrics).GetBumpStopProbability)))
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	if err := writeAtSpeed(w, s.GetCaseMetrics()); err != nil {
		return err
	}
	if err := writeAeroPlatform(w, s.GetCaseMetrics()); err != nil {
		return err
	}
	if len(s.GetTransientMetrics()) > 0 {
		fmt.Fprintln(w)
		if err := writeTransients(w, s.GetTransientMetrics()); err != nil {
			return err
		}
	}
	fmt.Fprintln(w)
	if err := writeHeave(w, s.GetCaseMetrics()); err != nil {
		return err
	}
	return writeCaseModes(w, s.GetCaseMetrics())
}
