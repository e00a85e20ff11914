package main

import (
	"context"
	"encoding/csv"
	"strconv"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// historyAbout is the help text of history.
const historyAbout = `
Simulates one damper setup on one manoeuvre or kerb case of a job spec file
or of a stored job (the nonlinear time-domain model, from the car at speed)
and prints its time history as CSV in SI: time, roll, pitch, the front share
of the lateral load transfer, the four tyre loads and the input
accelerations. --case names the case (default: the first).`

var historyCommand = &command{name: "history", synopsis: "[flags] --setup FILE (--spec FILE | --job JOB) [--case NAME]", client: true,
	summary: "time history of a setup on a manoeuvre or kerb case", about: historyAbout, flags: bindHistory}

// historyColumns are the CSV's columns.
var historyColumns = []string{"time_s", "roll_rad", "pitch_rad", "lltd_front", "tyre_load_fl_n", "tyre_load_fr_n",
	"tyre_load_rl_n", "tyre_load_rr_n", "ax_m_per_s2", "ay_m_per_s2"}

// historyFlags are history's own flags.
type historyFlags struct {
	sf        *specFlags
	specPath  string
	job       string
	setupPath string
	caseName  string
	points    int
}

func bindHistory(fs *flagSet, _ *env) (runFunc, error) {
	f := &historyFlags{sf: addSpecFlags(fs)}
	fs.StringVar(&f.specPath, "spec", "", "job spec `file` giving the car and the cases")
	fs.StringVar(&f.job, "job", "", "a stored `job` whose spec to use instead of --spec")
	fs.StringVar(&f.setupPath, "setup", "", "setup `file` to simulate")
	fs.StringVar(&f.caseName, "case", "", "`name` of the manoeuvre or kerb case (default: the first)")
	fs.IntVar(&f.points, "points", 0, "most `samples` printed (0: the server's default, 2000)")
	return f.run, nil
}

func (f *historyFlags) run(ctx context.Context, e *env, in *parsed) error {
	fromSpec := f.specPath != "" || f.sf.vehicle != "" || f.sf.roads != ""
	if f.setupPath == "" || fromSpec == (f.job != "") {
		return usagef("history", "give --setup and either --spec (optionally with --vehicle, --roads) or --job")
	}
	var src api.TextSources
	setups, err := readSetupsAt(e, []string{f.setupPath}, &src, "setup")
	if err != nil {
		return err
	}
	req := &pb.GetTransientHistoryRequest{Setup: setups[0], CaseName: f.caseName, MaxPoints: int32(f.points)}
	if fromSpec {
		spec, err := f.sf.load(e, f.specPath)
		if err != nil {
			return err
		}
		req.Source = &pb.GetTransientHistoryRequest_Spec{Spec: spec}
		src = append(src, f.sf.src...)
	} else {
		req.Source = &pb.GetTransientHistoryRequest_Job{Job: jobName(f.job)}
	}
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.GetTransientHistory(cctx, req)
	cancel()
	if err != nil {
		return locate(err, src)
	}
	w := csv.NewWriter(e.stdout)
	if err := w.Write(historyColumns); err != nil {
		return err
	}
	cols := [][]float64{resp.GetTimeS(), resp.GetRollRad(), resp.GetPitchRad(), resp.GetLltdFront(), resp.GetTyreLoadFlN(),
		resp.GetTyreLoadFrN(), resp.GetTyreLoadRlN(), resp.GetTyreLoadRrN(), resp.GetAxMPerS2(), resp.GetAyMPerS2()}
	for i := range resp.GetTimeS() {
		rec := make([]string, len(cols))
		for k, col := range cols {
			rec[k] = strconv.FormatFloat(col[i], 'g', -1, 64)
		}
		if err := w.Write(rec); err != nil {
			return err
		}
	}
	w.Flush()
	return w.Error()
}
