package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

// frontJSON is the part of "front --format json" the tests read.
type frontJSON struct {
	Job           string           `json:"job"`
	State         string           `json:"state"`
	Partial       bool             `json:"partial"`
	TotalSize     int              `json:"total_size"`
	GeneNames     []string         `json:"gene_names"`
	BalancedIndex int              `json:"balanced_index"`
	Solutions     []map[string]any `json:"solutions"`
	Objectives    []map[string]any `json:"objectives"`
	Constraints   []map[string]any `json:"constraints"`
}

func parseFrontJSON(t *testing.T, s string) frontJSON {
	t.Helper()
	var f frontJSON
	if err := json.Unmarshal([]byte(s), &f); err != nil {
		t.Fatalf("front --format json: %v\n%s", err, s)
	}
	return f
}

// The client subcommands against a served SQLite database: submit and
// watch the demo job, list, get, front in its three formats, curves, eval
// and check with its exit codes, cancel of a second job, bad specs and
// unknown jobs.
func TestServeClientCommands(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "serve.db"), nil)
	dir := t.TempDir()

	r := mustRun(t, exitOK, nil, s.client("submit", testdataPath("demo-job.yaml"), "--watch", "--quiet", "--label", "test=serve")...)
	id := firstLine(r.stdout)
	if len(id) == 0 || strings.Contains(id, " ") {
		t.Fatalf("submit printed %q as the job ID", id)
	}
	if !strings.Contains(r.stdout, "jobs/"+id+" succeeded: 30 of 30 generations") {
		t.Errorf("submit --watch --quiet: no final line:\n%s", r.stdout)
	}

	t.Run("list and get", func(t *testing.T) {
		r := mustRun(t, exitOK, nil, s.client("list", "--label", "test=serve")...)
		if !strings.Contains(r.stdout, id) || !strings.Contains(r.stdout, "succeeded") {
			t.Errorf("list lacks the job:\n%s", r.stdout)
		}
		r = mustRun(t, exitOK, nil, s.client("list", "--state", "failed")...)
		if strings.Contains(r.stdout, id) {
			t.Errorf("list --state failed shows the succeeded job:\n%s", r.stdout)
		}
		r = mustRun(t, exitOK, nil, s.client("get", id)...)
		for _, want := range []string{"succeeded", "Quillon GT (invented demo car)", "30 of 30", "best grip"} {
			if !strings.Contains(r.stdout, want) {
				t.Errorf("get lacks %q:\n%s", want, r.stdout)
			}
		}
		r = mustRun(t, exitOK, nil, s.client("get", id, "--format", "json")...)
		var j pb.Job
		if err := protojson.Unmarshal([]byte(r.stdout), &j); err != nil {
			t.Fatalf("get --format json is not a Job: %v", err)
		}
		if j.GetState() != pb.JobState_JOB_STATE_SUCCEEDED || j.GetSeed() != 7 {
			t.Errorf("get --format json: state %v seed %d, want succeeded and the spec's seed 7", j.GetState(), j.GetSeed())
		}
	})

	var front frontJSON
	t.Run("front", func(t *testing.T) {
		r := mustRun(t, exitOK, nil, s.client("front", id)...)
		if !strings.Contains(r.stdout, "Pareto front of jobs/"+id) || !strings.Contains(r.stdout, cautionText) {
			t.Errorf("front table lacks its heading or the caution:\n%s", r.stdout)
		}
		front = parseFrontJSON(t, mustRun(t, exitOK, nil, s.client("front", id, "--format", "json")...).stdout)
		if front.TotalSize == 0 || len(front.Solutions) != front.TotalSize || front.Partial {
			t.Fatalf("front json: %d of %d solutions, partial %v", len(front.Solutions), front.TotalSize, front.Partial)
		}
		want := []string{"front_bump_ratio", "front_rebound_ratio", "rear_bump_ratio", "rear_rebound_ratio"}
		if strings.Join(front.GeneNames, ",") != strings.Join(want, ",") {
			t.Errorf("gene names %v, want %v", front.GeneNames, want)
		}
		for _, col := range []string{"grip_rel", "platform_m", "front_bump_slope_n_s_per_m", "jacking_violation", "feasible"} {
			if _, ok := front.Solutions[0][col]; !ok {
				t.Errorf("front json solution lacks column %s: %v", col, front.Solutions[0])
			}
		}
		// The table sorts by the first objective; the front is
		// non-dominated, so the second objective falls (ties aside).
		for i := 1; i < len(front.Solutions); i++ {
			g0, g1 := front.Solutions[i-1]["grip_rel"].(float64), front.Solutions[i]["grip_rel"].(float64)
			p0, p1 := front.Solutions[i-1]["platform_m"].(float64), front.Solutions[i]["platform_m"].(float64)
			if g1 < g0 || (g1 > g0 && p1 > p0) {
				t.Errorf("solutions %d and %d out of order or dominated: grip %g %g, platform %g %g", i-1, i, g0, g1, p0, p1)
			}
		}
		// CSV: the same values, bit for bit (shortest round-trip text).
		rows, err := csv.NewReader(strings.NewReader(mustRun(t, exitOK, nil, s.client("front", id, "--format", "csv")...).stdout)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		if len(rows) != front.TotalSize+1 {
			t.Fatalf("csv has %d rows, want %d and a header", len(rows)-1, front.TotalSize)
		}
		col := -1
		for k, h := range rows[0] {
			if h == "platform_m" {
				col = k
			}
		}
		for i, row := range rows[1:] {
			v, err := strconv.ParseFloat(row[col], 64)
			if err != nil || v != front.Solutions[i]["platform_m"].(float64) {
				t.Errorf("csv row %d platform_m %q differs from json %v", i, row[col], front.Solutions[i]["platform_m"])
			}
		}
	})

	// A front solution exported as a setup file reads back in eval and
	// check: eval gives the front's objectives bit for bit (the same
	// evaluation of the same setup), and check passes it at epsilon 0 (no
	// front solution dominates a front member).
	t.Run("setup export", func(t *testing.T) {
		if len(front.Solutions) == 0 {
			t.Skip("no front")
		}
		var sol map[string]any
		for _, s := range front.Solutions {
			if s["feasible"] == true {
				sol = s
				break
			}
		}
		if sol == nil {
			t.Fatal("no feasible solution in the demo front")
		}
		idx := strconv.Itoa(int(sol["index"].(float64)))
		r := mustRun(t, exitOK, nil, s.client("front", id, "--solution", idx, "--format", "setup")...)
		if !strings.HasPrefix(r.stdout, "# Setup of solution "+idx+" of jobs/"+id) {
			t.Errorf("setup file header:\n%s", r.stdout)
		}
		path := filepath.Join(dir, "exported-setup.yaml")
		if err := os.WriteFile(path, []byte(r.stdout), 0o644); err != nil {
			t.Fatal(err)
		}
		ev := &pb.EvaluateSetupsResponse{}
		if err := protojson.Unmarshal([]byte(mustRun(t, exitOK, nil, s.client("eval", "--job", id, "--setup", path, "--format", "json")...).stdout), ev); err != nil {
			t.Fatal(err)
		}
		got := ev.GetEvaluations()[0].GetObjectives()
		if len(got) != 2 || got[0] != sol["grip_rel"].(float64) || got[1] != sol["platform_m"].(float64) {
			t.Errorf("eval of the exported setup: objectives %v, front %v %v", got, sol["grip_rel"], sol["platform_m"])
		}
		mustRun(t, exitOK, nil, s.client("check", id, "--setup", path, "--epsilon", "0")...)
		mustRun(t, exitUsage, nil, s.client("front", id, "--format", "setup")...)
		mustRun(t, exitUsage, nil, s.client("front", id, "--solution", "100000", "--format", "setup")...)
	})

	t.Run("curves", func(t *testing.T) {
		r := mustRun(t, exitOK, nil, s.client("curves", id)...)
		if !strings.Contains(r.stdout, "balanced point, solution "+strconv.Itoa(front.BalancedIndex)) || !strings.Contains(r.stdout, cautionText) {
			t.Errorf("curves of the balanced point:\n%s", r.stdout)
		}
		r = mustRun(t, exitOK, nil, s.client("curves", id, "--solution", "0", "--points", "5", "--max-velocity", "100")...)
		if !strings.Contains(r.stdout, "solution 0") || !strings.Contains(r.stdout, "\n    100 ") {
			t.Errorf("curves --solution 0 --points 5 --max-velocity 100 lacks its 100 mm/s row:\n%s", r.stdout)
		}
		mustRun(t, exitUsage, nil, s.client("curves", id, "--solution", "100000")...)
	})

	t.Run("sheet", func(t *testing.T) {
		path := filepath.Join(t.TempDir(), "sheet.html")
		r := mustRun(t, exitOK, nil, s.client("sheet", id, "-o", path)...)
		if want := "solution " + strconv.Itoa(front.BalancedIndex) + ", the balanced point"; !strings.Contains(r.stdout, want) || !strings.Contains(r.stdout, cautionText) {
			t.Errorf("sheet of the balanced point: stdout lacks %q or the caution:\n%s", want, r.stdout)
		}
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		for _, want := range []string{"Damper specification", "Forces at the test velocities", "@media print", "<svg", "qualified engineers"} {
			if !strings.Contains(string(b), want) {
				t.Errorf("the sheet file lacks %q", want)
			}
		}
		mustRun(t, exitUsage, nil, s.client("sheet", id, "--solution", "100000", "-o", path)...)
	})

	// A setup that passes: the balanced point's own setup, from curves
	// --format json. It is on the front, so no front point dominates it.
	balanced := filepath.Join(dir, "balanced.json")
	{
		r := mustRun(t, exitOK, nil, s.client("curves", id, "--format", "json")...)
		var resp pb.GetDamperCurvesResponse
		if err := protojson.Unmarshal([]byte(r.stdout), &resp); err != nil {
			t.Fatal(err)
		}
		b, err := protojson.Marshal(resp.GetSetup())
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(balanced, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}

	t.Run("check", func(t *testing.T) {
		tests := []struct {
			name  string
			setup string
			args  []string
			code  int
			want  string
		}{
			{"front member passes", balanced, nil, exitOK, "PASS: constraints met; no solution of the front"},
			{"front member passes at epsilon 0", balanced, []string{"--epsilon", "0"}, exitOK, "PASS"},
			// candidate-setup.yaml is a hand-made setup: some front point
			// beats it in both objectives (measured: by about 4 % of the
			// front's extent), so epsilon 0 fails it and a generous one
			// passes it.
			{"dominated fails at epsilon 0", testdataPath("candidate-setup.yaml"), []string{"--epsilon", "0"}, exitFailure, "FAIL: solution "},
			{"dominated passes a generous epsilon", testdataPath("candidate-setup.yaml"), []string{"--epsilon", "1"}, exitOK, "PASS: constraints met; solution "},
			{"infeasible fails", testdataPath("setup-jacking.yaml"), []string{"--epsilon", "100"}, exitFailure, "FAIL: constraints not met: ride-height shift over its limit 3.00 mm"},
			{"missing setup file", filepath.Join(dir, "none.yaml"), nil, exitUsage, ""},
			{"bad setup file", testdataPath("bad/not-yaml.yaml"), nil, exitUsage, ""},
		}
		for _, tt := range tests {
			t.Run(tt.name, func(t *testing.T) {
				r := mustRun(t, tt.code, nil, s.client(append([]string{"check", id, "--setup", tt.setup}, tt.args...)...)...)
				if tt.code == exitUsage {
					return
				}
				if line := firstLine(r.stdout); !strings.HasPrefix(line, tt.want) {
					t.Errorf("verdict %q, want it to start with %q", line, tt.want)
				}
				if !strings.Contains(r.stdout, cautionText) {
					t.Errorf("check output lacks the caution:\n%s", r.stdout)
				}
			})
		}
		mustRun(t, exitUsage, nil, s.client("check", "0123456789abcdef01234567", "--setup", balanced)...)
		// The README's day of work checks the candidate against this
		// job (the demo spec, seed 7) and goes on when it passes.
		args := readmeCommand(t, "check", id)
		if r := dampfront(t, nil, s.client(args...)...); r.code != exitOK || !strings.HasPrefix(r.stdout, "PASS") {
			t.Errorf("the README's example dampfront %s exits %d, want 0 and a PASS:\n%s%s", strings.Join(args, " "), r.code, r.stdout, r.stderr)
		}
	})

	t.Run("eval", func(t *testing.T) {
		r := mustRun(t, exitOK, nil, s.client("eval", "--job", id, "--setup", testdataPath("candidate-setup.yaml"), "--setup", testdataPath("setup-jacking.yaml"))...)
		for _, want := range []string{"Ashgrove Ring, fast sweepers", "Tolvane Hill, rough slow section", "constraints: all met", "constraints: NOT met", cautionText,
			"car at speed", "ride height at speed mm F/R", "bump-stop gap left mm FL/FR/RL/RR",
			"undamped Hz", "damped Hz", "modal ratio", "hand ratio", "the tyres in series leave the dampers", "overdamped (decay "} {
			if !strings.Contains(r.stdout, want) {
				t.Errorf("eval lacks %q:\n%s", want, r.stdout)
			}
		}
		// The same car and roads from their own files give the same
		// evaluation as the job's spec.
		fromJob := mustRun(t, exitOK, nil, s.client("eval", "--job", id, "--setup", testdataPath("candidate-setup.yaml"), "--format", "json")...)
		fromFiles := mustRun(t, exitOK, nil, s.client("eval", "--spec", testdataPath("demo-job.yaml"), "--vehicle", testdataPath("quillon-gt.yaml"),
			"--roads", testdataPath("roads.yaml"), "--setup", testdataPath("candidate-setup.yaml"), "--format", "json")...)
		var a, b pb.EvaluateSetupsResponse
		if err := protojson.Unmarshal([]byte(fromJob.stdout), &a); err != nil {
			t.Fatal(err)
		}
		if err := protojson.Unmarshal([]byte(fromFiles.stdout), &b); err != nil {
			t.Fatal(err)
		}
		if ga, gb := a.GetEvaluations()[0].GetObjectives(), b.GetEvaluations()[0].GetObjectives(); len(ga) != 2 || ga[0] != gb[0] || ga[1] != gb[1] {
			t.Errorf("eval from the job %v and from the files %v differ", ga, gb)
		}
		// The car at 55 m/s: the demo car's downforce compresses the front
		// about 22 mm (statics, see model.TestOperatingPointClosedForm) and
		// the JSON carries the gap left, 30 mm less that.
		fast := a.GetEvaluations()[0].GetCaseMetrics()[0]
		fl := fast.GetCorners()[0]
		if c := fl.GetCompressionAtSpeedM(); c < 0.021 || c > 0.023 || math.Abs(fl.GetBumpStopGapAtSpeedM()-(0.030-c)) > 1e-12 || fast.GetAtSpeed().GetFrontRideHeightChangeM() >= -0.02 {
			t.Errorf("%s: front compression %g m, gap left %g m, ride change %g m; want about 0.022, 0.030 less it, below -0.02",
				fast.GetRoadCase(), c, fl.GetBumpStopGapAtSpeedM(), fast.GetAtSpeed().GetFrontRideHeightChangeM())
		}
		// candidate-setup.yaml says its rebound, stiffer than bump, makes
		// the car jack down: the mean force of Caughey's linearisation,
		// E[f] = sigma (m_bump - m_rebound) (model/linearise.go), pulls body
		// and wheel together, so every case's ride shift is negative.
		for _, m := range a.GetEvaluations()[0].GetCaseMetrics() {
			if f, r := m.GetFront().GetRideHeightShiftM(), m.GetRear().GetRideHeightShiftM(); !(f < 0 && r < 0) {
				t.Errorf("%s: the candidate's ride shift is %g/%g m, not down as its comment says", m.GetRoadCase(), f, r)
			}
		}
	})

	t.Run("bad specs", func(t *testing.T) {
		r := mustRun(t, exitUsage, nil, s.client("submit", testdataPath("bad/five-bad-fields.yaml"))...)
		for _, field := range []string{
			"spec.vehicle.sprung_mass_kg",
			"spec.vehicle.corners[2].tyre_rate_n_per_m",
			"spec.vehicle.corners[3].tyre_rate_n_per_m",
			"spec.road_cases[1].speed_m_per_s",
			"spec.design_space.ratios.rear_rebound.max",
		} {
			if !strings.Contains(r.stderr, " "+field+": ") {
				t.Errorf("submit of five bad fields does not name %s:\n%s", field, r.stderr)
			}
		}
		r = mustRun(t, exitFailure, nil, s.client("submit", testdataPath("bad/too-large.yaml"))...)
		if !strings.Contains(r.stderr, "resource exhausted") {
			t.Errorf("submit of a too large job:\n%s", r.stderr)
		}
	})

	t.Run("unknown job", func(t *testing.T) {
		for _, sub := range []string{"get", "watch", "front", "cancel", "curves"} {
			r := mustRun(t, exitUsage, nil, s.client(sub, "0123456789abcdef01234567")...)
			if !strings.Contains(r.stderr, "not found") {
				t.Errorf("%s of an unknown job: %s", sub, r.stderr)
			}
		}
	})

	t.Run("cancel", func(t *testing.T) {
		// A long job (2000 generations, far more than the test waits
		// for), cancelled once it runs: it ends cancelled with a partial
		// front, and front, check and cancel behave accordingly.
		spec := writeSpec(t, "generations: 30", "generations: 2000")
		long := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec)...).stdout)
		waitGeneration(t, s, long, 2)
		r := mustRun(t, exitOK, nil, s.client("cancel", long)...)
		if !strings.Contains(r.stdout, "jobs/"+long) {
			t.Errorf("cancel: %s", r.stdout)
		}
		r = mustRun(t, exitFailure, nil, s.client("watch", long, "--quiet")...)
		if !strings.Contains(r.stdout, "cancelled") || !strings.Contains(r.stdout, "front partial") {
			t.Errorf("watch of a cancelled job: %s", r.stdout)
		}
		f := parseFrontJSON(t, mustRun(t, exitOK, nil, s.client("front", long, "--format", "json")...).stdout)
		if !f.Partial || f.State != "cancelled" || f.TotalSize == 0 {
			t.Errorf("front of a cancelled job: partial %v state %s size %d, want a partial front", f.Partial, f.State, f.TotalSize)
		}
		r = mustRun(t, exitOK, nil, s.client("check", long, "--setup", balanced, "--epsilon", "100")...)
		if !strings.Contains(r.stdout, "partial front") {
			t.Errorf("check against a partial front does not say so: %s", r.stdout)
		}
		mustRun(t, exitUsage, nil, s.client("cancel", long)...) // finished: failed precondition
	})
}

// waitGeneration polls get until job id has completed at least gen
// generations, within commandTimeout.
func waitGeneration(t *testing.T, s *server, id string, gen int32) *pb.Job {
	t.Helper()
	return waitJob(t, s, id, fmt.Sprintf("generation %d", gen), func(j *pb.Job) bool { return j.GetProgress().GetGeneration() >= gen })
}

// waitJob polls get every 50 ms until job id meets reached, within
// commandTimeout, and returns it; a job that ends first fails the test,
// saying it ended before what (as reached's description).
func waitJob(t *testing.T, s *server, id, what string, reached func(*pb.Job) bool) *pb.Job {
	t.Helper()
	deadline := timeNow().Add(commandTimeout)
	for timeNow().Before(deadline) {
		r := dampfront(t, nil, s.client("get", id, "--format", "json")...)
		if r.code == exitOK {
			var j pb.Job
			if err := protojson.Unmarshal([]byte(r.stdout), &j); err != nil {
				t.Fatal(err)
			}
			if reached(&j) {
				return &j
			}
			if terminal(j.GetState()) {
				t.Fatalf("job %s ended (%v) before %s", id, j.GetState(), what)
			}
		}
		sleep(50)
	}
	t.Fatalf("job %s did not reach %s within %v", id, what, commandTimeout)
	return nil
}
