package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"slices"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

var curvesCommand = &command{name: "curves", synopsis: "[flags] JOB", minArgs: 1, maxArgs: 1, client: true,
	summary: "damper force-velocity tables at the component for a solution or a setup", about: curvesAbout, flags: bindCurves}

// curvesAbout is the help text of curves.
const curvesAbout = `
Prints the damper force-velocity curves at the component (damper velocity
and force, not wheel) of one setup on a job's car: a solution of the
job's front (--solution, or the balanced point by default) or a setup
file (--setup). Per corner, at each damper speed, the force of the setting
in bump and in rebound (velocity positive in bump, rebound forces
negative) and, when an adjuster range is known (the spec's, or --adjust-*),
the forces at its softest and stiffest clicks. Corners with equal curves
are printed once.`

func bindCurves(fs *flagSet, e *env) (runFunc, error) {
	solution := fs.Int("solution", -1, "`index` of a solution of the job's front")
	fs.Bool("balanced", false, "the balanced point of the front (the default without --solution or --setup)")
	setupPath := fs.String("setup", "", "a setup `file` of your own instead of a solution")
	var bump, rebound rangeFlag
	fs.Var(&bump, "adjust-bump", "adjuster range in bump as damping ratios at the wheel, `SOFTEST,STIFFEST`")
	fs.Var(&rebound, "adjust-rebound", "adjuster range in rebound, `SOFTEST,STIFFEST`")
	vmax := fs.Float64("max-velocity", 0, "largest damper speed tabulated, `mm/s` (0: the spec's)")
	points := fs.Int("points", 0, "tabulated `points` from -max to +max, odd (0: the spec's)")
	format := newFormat("table", "table", "csv", "json")
	fs.Var(format, "format", "output `format`: table, csv (SI) or json (SI, GetDamperCurves response)")
	return func(ctx context.Context, e *env, in *parsed) error {
		pos, cf := in.args, in.client
		if countSet(fs, "solution", "balanced", "setup") > 1 {
			return usagef("curves", "give at most one of --solution, --balanced and --setup")
		}
		if isFlagSet(fs, "solution") && *solution < 0 {
			return usagef("curves", "--solution must be a front index >= 0")
		}
		if bump.set != rebound.set {
			return usagef("curves", "give both --adjust-bump and --adjust-rebound, or neither")
		}
		if *vmax < 0 || *points < 0 {
			return usagef("curves", "--max-velocity and --points must not be negative")
		}
		c, err := cf.dial()
		if err != nil {
			return err
		}
		defer c.Close()
		req := &pb.GetDamperCurvesRequest{Job: jobName(pos[0])}
		title, err := curvesTarget(ctx, e, c, req, *setupPath, *solution)
		if err != nil {
			return err
		}
		if bump.set {
			req.Adjustment = &pb.Adjustment{BumpSoftestRatio: bump.min, BumpStiffestRatio: bump.max,
				ReboundSoftestRatio: rebound.min, ReboundStiffestRatio: rebound.max}
		}
		if *vmax > 0 || *points > 0 {
			req.Curves = &pb.CurveSettings{MaxVelocityMPerS: fromMmPerS(*vmax), Points: int32(*points)}
		}
		cctx, cancel := c.call(ctx)
		resp, err := c.svc.GetDamperCurves(cctx, req)
		cancel()
		if err != nil {
			return err
		}
		switch format.value {
		case "json":
			b, err := protojson.MarshalOptions{Multiline: true}.Marshal(resp)
			if err != nil {
				return err
			}
			fmt.Fprintf(e.stdout, "%s\n", b)
			return nil
		case "csv":
			return writeCurvesCSV(e.stdout, resp.GetCurves())
		}
		fmt.Fprintf(e.stdout, "Damper curves of %s of %s: %s\n", title, req.Job, setupText(resp.GetSetup()))
		if err := writeCurvesTables(e.stdout, resp); err != nil {
			return err
		}
		printCaution(e.stdout)
		return nil
	}, nil
}

// curvesTarget sets the request's setup: a setup file, a solution, or
// the balanced point of the job's front; it returns its name.
func curvesTarget(ctx context.Context, e *env, c *client, req *pb.GetDamperCurvesRequest, setupPath string, solution int) (string, error) {
	switch {
	case setupPath != "":
		setups, err := readSetups(e, []string{setupPath})
		if err != nil {
			return "", err
		}
		req.Target = &pb.GetDamperCurvesRequest_Setup{Setup: setups[0]}
		return "setup " + setupPath, nil
	case solution >= 0:
		req.Target = &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: int32(solution)}
		return fmt.Sprintf("solution %d", solution), nil
	}
	fd, err := fetchFront(ctx, c, req.Job, pb.SolutionView_SOLUTION_VIEW_BASIC)
	if err != nil {
		return "", err
	}
	b := balancedIndex(fd.front.GetSolutions())
	if b < 0 {
		return "", &exitError{code: exitFailure, msg: "the front of " + req.Job + " is empty: no balanced point"}
	}
	idx := fd.front.GetSolutions()[b].GetIndex()
	req.Target = &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: idx}
	return fmt.Sprintf("balanced point, solution %d", idx), nil
}

// countSet is how many of the named flags are set.
func countSet(fs *flagSet, names ...string) int {
	n := 0
	fs.Visit(func(f *flag.Flag) {
		if slices.Contains(names, f.Name) {
			n++
		}
	})
	return n
}

func isFlagSet(fs *flagSet, name string) bool {
	set := false
	fs.Visit(func(f *flag.Flag) { set = set || f.Name == name })
	return set
}

var cornerNames = map[pb.CornerPosition]string{
	pb.CornerPosition_CORNER_POSITION_FRONT_LEFT:  "front left",
	pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT: "front right",
	pb.CornerPosition_CORNER_POSITION_REAR_LEFT:   "rear left",
	pb.CornerPosition_CORNER_POSITION_REAR_RIGHT:  "rear right",
}

// sameCurve reports whether two corners' curves are equal in every value.
func sameCurve(a, b *pb.DamperCurve) bool {
	return slices.Equal(a.GetVelocityMPerS(), b.GetVelocityMPerS()) && slices.Equal(a.GetForceN(), b.GetForceN()) &&
		slices.Equal(a.GetSoftestForceN(), b.GetSoftestForceN()) && slices.Equal(a.GetStiffestForceN(), b.GetStiffestForceN())
}

// writeCurvesTable prints one table per distinct corner curve.
func writeCurvesTable(w io.Writer, curves []*pb.DamperCurve) error {
	for i := 0; i < len(curves); i++ {
		dc := curves[i]
		name := cornerNames[dc.GetCorner()]
		if i%2 == 0 && i+1 < len(curves) && sameCurve(dc, curves[i+1]) {
			name += " = " + cornerNames[curves[i+1].GetCorner()]
			i++
		}
		if err := writeCurveTable(w, name, dc); err != nil {
			return err
		}
	}
	return nil
}

// writeCurvesTables prints the corner dampers' tables, then the heave
// dampers' when the car has them.
func writeCurvesTables(w io.Writer, resp *pb.GetDamperCurvesResponse) error {
	if err := writeCurvesTable(w, resp.GetCurves()); err != nil {
		return err
	}
	return writeHeaveCurvesTable(w, resp.GetHeaveCurves())
}

// writeHeaveCurvesTable prints one table per heave damper, at the heave
// element (nothing for a car without).
func writeHeaveCurvesTable(w io.Writer, curves []*pb.HeaveDamperCurve) error {
	for _, hc := range curves {
		name := map[pb.AxlePosition]string{pb.AxlePosition_AXLE_POSITION_FRONT: "front", pb.AxlePosition_AXLE_POSITION_REAR: "rear"}[hc.GetAxle()]
		if err := writeCurveTable(w, name+" heave", hc.GetCurve()); err != nil {
			return err
		}
	}
	return nil
}

func writeCurveTable(w io.Writer, name string, dc *pb.DamperCurve) error {
	fmt.Fprintf(w, "\n%s damper, at the component: low-speed slopes bump %s, rebound %s N s/mm",
		capitalise(name), tradeNum(qSlope, dc.GetBumpSlopeNSPerM()), tradeNum(qSlope, dc.GetReboundSlopeNSPerM()))
	if dc.GetKneeBumpMPerS() > 0 || dc.GetKneeReboundMPerS() > 0 {
		fmt.Fprintf(w, "; knees %s/%s mm/s, high-speed factors %.2f/%.2f (bump/rebound)",
			tradeNum(qKnee, dc.GetKneeBumpMPerS()), tradeNum(qKnee, dc.GetKneeReboundMPerS()),
			dc.GetHighSpeedBumpFactor(), dc.GetHighSpeedReboundFactor())
	}
	fmt.Fprintln(w)
	band := len(dc.GetSoftestForceN()) == len(dc.GetForceN()) && len(dc.GetStiffestForceN()) == len(dc.GetForceN()) && len(dc.GetForceN()) > 0
	t := newTable(w, true)
	if band {
		t.row("speed", "bump", "softest", "stiffest", "rebound", "softest", "stiffest")
		t.row("mm/s", "N", "N", "N", "N", "N", "N")
	} else {
		t.row("speed", "bump", "rebound")
		t.row("mm/s", "N", "N")
	}
	v, f := dc.GetVelocityMPerS(), dc.GetForceN()
	n := len(v)
	for k := n / 2; k < n; k++ {
		r := n - 1 - k // the same speed in rebound
		if v[k] < 0 {
			continue
		}
		row := []string{tradeNum(qVelocity, v[k]), tradeNum(qForce, f[k])}
		if band {
			row = append(row, tradeNum(qForce, dc.GetSoftestForceN()[k]), tradeNum(qForce, dc.GetStiffestForceN()[k]))
		}
		row = append(row, tradeNum(qForce, f[r]))
		if band {
			row = append(row, tradeNum(qForce, dc.GetSoftestForceN()[r]), tradeNum(qForce, dc.GetStiffestForceN()[r]))
		}
		t.row(row...)
	}
	return t.flush()
}

func capitalise(s string) string {
	if s == "" {
		return s
	}
	return string(s[0]-'a'+'A') + s[1:]
}

func writeCurvesCSV(w io.Writer, curves []*pb.DamperCurve) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"corner", "velocity_m_per_s", "force_n", "softest_force_n", "stiffest_force_n"}); err != nil {
		return err
	}
	for _, dc := range curves {
		for k, v := range dc.GetVelocityMPerS() {
			soft, stiff := "", ""
			if k < len(dc.GetSoftestForceN()) {
				soft = siNum(dc.GetSoftestForceN()[k])
			}
			if k < len(dc.GetStiffestForceN()) {
				stiff = siNum(dc.GetStiffestForceN()[k])
			}
			if err := cw.Write([]string{dc.GetCorner().String(), siNum(v), siNum(dc.GetForceN()[k]), soft, stiff}); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
