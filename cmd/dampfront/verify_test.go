package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// testDuration is the recorded road per case in these tests (s): short,
// so that the statistical errors are a few per cent, but long against
// the demo car's body modes (1-3 Hz) for the estimates to mean something.
const testDuration = "20"

// verifyOf runs verify with --format json and decodes the report.
func verifyOf(t *testing.T, args ...string) (verifyJSON, string) {
	t.Helper()
	r := mustRun(t, exitOK, nil, append([]string{"verify", "--format", "json", "--duration", testDuration}, args...)...)
	var v verifyJSON
	if err := json.Unmarshal([]byte(r.stdout), &v); err != nil {
		t.Fatalf("verify --format json: %v\n%s", err, r.stdout)
	}
	return v, r.stdout
}

// verify of the demo car's candidate setup prints, per road case of the
// demo job, the table of both models, the peaks and a verdict, and ends
// with the caution.
func TestVerifyDemoCandidate(t *testing.T) {
	t.Parallel()
	r := mustRun(t, exitOK, nil, "verify", "--spec", testdataPath("demo-job.yaml"), "--setup", testdataPath("candidate-setup.yaml"), "--duration", testDuration)
	for _, want := range []string{
		"Time-domain check of setup " + testdataPath("candidate-setup.yaml") + " on Quillon GT (invented demo car): front bump 0.550 rebound 0.850",
		`Road case "Ashgrove Ring, fast sweepers" at 55 m/s: 20 s of road`,
		`Road case "Port Vellan streets, bumpy braking zone" at 30 m/s`,
		`Road case "Tolvane Hill, rough slow section" at 20 m/s`,
		"metric", "frequency domain", "time domain", "difference %", "statistical error %",
		"tyre load sd FL", "% static", "ride sd front", "mm", "damper vel sd RR", "mm/s", "lift-off time FL", "bump-stop time RR",
		"peaks of the time history:", "highest damper speed in rebound", "largest heave acceleration",
		cautionText,
	} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("verify output lacks %q:\n%s", want, r.stdout)
		}
	}
	verdicts := regexp.MustCompile(`(?m)^  verdict: (linear answer holds within the statistical error|differs by more than 3 statistical errors in: .+)$`).FindAllString(r.stdout, -1)
	if len(verdicts) != 3 {
		t.Errorf("want one verdict line for each of the 3 road cases, found %d:\n%s", len(verdicts), r.stdout)
	}
	if !strings.HasSuffix(strings.TrimSpace(r.stdout), cautionText) {
		t.Errorf("verify output does not end with the caution:\n%s", r.stdout)
	}
}

// The json report holds every road case with its rows in SI, the setup
// as given, and verdicts consistent with the rows: a case holds exactly
// when no row is more than 3 statistical errors off. The check is seeded:
// the same seed gives the same report, another seed another road.
func TestVerifyJSONSeededAndConsistent(t *testing.T) {
	t.Parallel()
	args := []string{"--spec", testdataPath("demo-job.yaml"), "--setup", testdataPath("candidate-setup.yaml")}
	v, text := verifyOf(t, append(args, "--seed", "5")...)
	if v.Seed != 5 || len(v.Cases) != 3 || v.Sigmas != model.VerdictSigmas {
		t.Fatalf("report seed %d, %d cases, %g sigmas; want 5, 3, %d", v.Seed, len(v.Cases), v.Sigmas, model.VerdictSigmas)
	}
	setup := &pb.Setup{}
	if err := protojson.Unmarshal(v.Setup, setup); err != nil {
		t.Fatal(err)
	}
	want := &pb.Setup{}
	if err := readMessage(&env{}, testdataPath("candidate-setup.yaml"), want); err != nil {
		t.Fatal(err)
	}
	if !proto.Equal(setup, want) {
		t.Errorf("report setup %v, want %v", setup, want)
	}
	for _, c := range v.Cases {
		if c.Duration != 20 || c.Samples == 0 || !(c.Step > 0) || len(c.Rows) < 30 {
			t.Errorf("%s: duration %g s, %d samples, step %g s, %d rows", c.RoadCase, c.Duration, c.Samples, c.Step, len(c.Rows))
		}
		var off []string
		for _, r := range c.Rows {
			if r.StatError > 0 && math.Abs(r.Diff) > model.VerdictSigmas*r.StatError {
				off = append(off, r.Metric)
			}
			if r.Diff != r.Time-r.Frequency {
				t.Errorf("%s %s: diff %g is not time - frequency = %g", c.RoadCase, r.Metric, r.Diff, r.Time-r.Frequency)
			}
		}
		if strings.Join(off, ",") != strings.Join(c.Differs, ",") || c.Holds != (len(off) == 0) {
			t.Errorf("%s: holds %v, differs %v; the rows give %v", c.RoadCase, c.Holds, c.Differs, off)
		}
		// Over a record every wheel moves both ways: the peaks bracket
		// zero travel and zero damper speed.
		for i := 0; i < 4; i++ {
			if !(c.Peaks.TravelMax[i] > 0 && c.Peaks.TravelMin[i] < 0 && c.Peaks.DamperVelocityMax[i] > 0 && c.Peaks.DamperVelocityMin[i] < 0) {
				t.Errorf("%s corner %d: peaks %+v do not bracket zero", c.RoadCase, i, c.Peaks)
			}
		}
	}
	_, again := verifyOf(t, append(args, "--seed", "5")...)
	if again != text {
		t.Error("the same seed gave another report")
	}
	other, _ := verifyOf(t, append(args, "--seed", "6")...)
	if other.Cases[0].Rows[0].Time == v.Cases[0].Rows[0].Time {
		t.Errorf("seeds 5 and 6 gave the same time-domain %s: %g", v.Cases[0].Rows[0].Metric, v.Cases[0].Rows[0].Time)
	}
}

// With linear, symmetric dampers (no knee, bump = rebound) the nonlinear
// model is the linear one, so long as no tyre leaves the road and no
// bump stop is met: both then describe the same linear system, and their
// statistics differ by the sampling error of the record only (the
// closed-form spectral analysis of a linear system, e.g. Newland, "An
// Introduction to Random Vibrations, Spectral and Wavelet Analysis", 3rd
// ed., ch. 7; from memory). The verdict must say the linear answer holds
// on every case, and the jacking of a symmetric damper is zero.
func TestVerifyLinearSetupHolds(t *testing.T) {
	t.Parallel()
	linear := filepath.Join(t.TempDir(), "linear.yaml")
	if err := os.WriteFile(linear, []byte("front: {bump_ratio: 0.6, rebound_ratio: 0.6}\nrear: {bump_ratio: 0.6, rebound_ratio: 0.6}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	v, _ := verifyOf(t, "--spec", testdataPath("demo-job.yaml"), "--setup", linear)
	for _, c := range v.Cases {
		if !c.Holds || c.Verdict != "linear answer holds within the statistical error" {
			t.Errorf("%s: %s", c.RoadCase, c.Verdict)
		}
		for _, r := range c.Rows {
			if r.Metric == "ride_height_shift_m[front]" && r.Frequency != 0 {
				t.Errorf("%s: a symmetric damper jacks the front by %g m", c.RoadCase, r.Frequency)
			}
		}
	}
}

// Against a server: the job's spec and a solution's setup are fetched
// and checked locally. The frequency-domain column equals the server's
// own evaluation (EvaluateSetups) of the same setup on the same spec, and
// a setup checked on a stored job gives the same report as on the spec
// file it was submitted from.
func TestVerifyWithAServer(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "verify.db"), nil)
	spec, setup := testdataPath("demo-job.yaml"), testdataPath("candidate-setup.yaml")

	// The server's evaluation and verify's frequency-domain column come
	// from the same model.Evaluator on the same inputs; JSON carries
	// float64 exactly, so they agree to rounding (1e-12 relative).
	const sameComputation = 1e-12
	ev := mustRun(t, exitOK, nil, s.client("eval", "--spec", spec, "--setup", setup, "--format", "json")...)
	var resp pb.EvaluateSetupsResponse
	if err := protojson.Unmarshal([]byte(ev.stdout), &resp); err != nil {
		t.Fatal(err)
	}
	local, _ := verifyOf(t, "--spec", spec, "--setup", setup)
	server := resp.GetEvaluations()[0].GetCaseMetrics()
	if len(server) != len(local.Cases) {
		t.Fatalf("eval has %d cases, verify %d", len(server), len(local.Cases))
	}
	for i, cm := range server {
		want := map[string]float64{
			"ride_height_sd_m[front]":        cm.GetFront().GetRideHeightSdM(),
			"ride_height_shift_m[rear]":      cm.GetRear().GetRideHeightShiftM(),
			"pitch_sd_rad":                   cm.GetPitchSdRad(),
			"roll_sd_rad":                    cm.GetRollSdRad(),
			"heave_accel_sd_m_per_s2":        cm.GetHeaveAccelSdMPerS2(),
			"pitch_shift_rad":                cm.GetPitchShiftRad(),
			"tyre_load_sd_n[FL]":             cm.GetCorners()[0].GetTyreLoadSdN(),
			"travel_sd_m[RR]":                cm.GetCorners()[3].GetTravelSdM(),
			"damper_velocity_sd_m_per_s[RL]": cm.GetCorners()[2].GetDamperVelocitySdMPerS(),
			"mean_damper_force_n[FR]":        cm.GetCorners()[1].GetMeanDamperForceN(),
		}
		got := map[string]float64{}
		for _, r := range local.Cases[i].Rows {
			got[r.Metric] = r.Frequency
		}
		for m, w := range want {
			if g, ok := got[m]; !ok || math.Abs(g-w) > sameComputation*math.Abs(w) {
				t.Errorf("%s %s: verify %g, eval %g", cm.GetRoadCase(), m, g, w)
			}
		}
	}

	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec, "--watch", "--quiet")...).stdout)
	onJob, _ := verifyOf(t, s.client(id, "--setup", setup)...)
	if !strings.HasSuffix(onJob.Source, " on jobs/"+id) {
		t.Errorf("source %q does not name the job", onJob.Source)
	}
	for i := range local.Cases {
		a, b := local.Cases[i], onJob.Cases[i]
		if a.RoadCase != b.RoadCase || len(a.Rows) != len(b.Rows) {
			t.Fatalf("case %d: %s with %d rows on the spec, %s with %d on the job", i, a.RoadCase, len(a.Rows), b.RoadCase, len(b.Rows))
		}
		for k := range a.Rows {
			if a.Rows[k] != b.Rows[k] {
				t.Errorf("%s: on the spec %+v, on the job %+v", a.RoadCase, a.Rows[k], b.Rows[k])
			}
		}
	}

	bal := mustRun(t, exitOK, nil, s.client("verify", id, "--balanced", "--duration", testDuration)...)
	if !regexp.MustCompile(`Time-domain check of balanced point, solution \d+ of jobs/`+regexp.QuoteMeta(id)+` on Quillon GT`).MatchString(bal.stdout) ||
		!strings.Contains(bal.stdout, "  verdict: ") || !strings.Contains(bal.stdout, cautionText) {
		t.Errorf("verify --balanced:\n%s", bal.stdout)
	}
	sol, _ := verifyOf(t, s.client(id, "--solution", "0")...)
	if sol.Source != "solution 0 of jobs/"+id || len(sol.Cases) != 3 {
		t.Errorf("verify --solution 0: source %q, %d cases", sol.Source, len(sol.Cases))
	}
	r := mustRun(t, exitUsage, nil, s.client("verify", id, "--solution", "100000", "--duration", testDuration)...)
	if !strings.Contains(r.stderr, "has no solution 100000") {
		t.Errorf("verify of a missing solution: %s", r.stderr)
	}
}

// Usage and input errors of verify exit with code 2 before any server is
// reached (see TestUsageErrorsExit2 for the address).
func TestVerifyUsageErrors(t *testing.T) {
	t.Parallel()
	noServer := "--addr=127.0.0.1:9"
	spec, setup := testdataPath("demo-job.yaml"), testdataPath("candidate-setup.yaml")
	badMass := writeSpec(t, "sprung_mass_kg: 1150", "sprung_mass_kg: -1150")
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"nothing to check", []string{"verify", noServer}, "give --spec FILE --setup FILE, or a JOB\nUsage: dampfront verify "},
		{"spec without setup", []string{"verify", "--spec", spec}, "--setup is required with --spec"},
		{"spec and job", []string{"verify", "a", "--spec", spec, "--setup", setup, noServer}, "give either --spec or a JOB"},
		{"solution without job", []string{"verify", "--spec", spec, "--setup", setup, "--solution", "2"}, "--solution and --balanced need a JOB"},
		{"two targets", []string{"verify", "a", "--solution", "1", "--balanced", noServer}, "at most one of --solution, --balanced and --setup"},
		{"negative solution", []string{"verify", "a", "--solution", "-1", noServer}, "--solution must be a front index >= 0"},
		{"vehicle without roads", []string{"verify", "--vehicle", testdataPath("quillon-gt.yaml"), "--setup", setup}, "without --spec give both --vehicle and --roads"},
		{"zero duration", []string{"verify", "--spec", spec, "--setup", setup, "--duration", "0"}, "--duration must be a number of seconds > 0"},
		{"bad format", []string{"verify", "--spec", spec, "--setup", setup, "--format", "csv"}, `"csv" is not one of table, json`},
		{"setup is a spec", []string{"verify", "--spec", spec, "--setup", spec}, "not a dampfront.v1.Setup"},
		{"misspelt spec", []string{"verify", "--spec", testdataPath("bad/misspelt-field.yaml"), "--setup", setup}, `unknown field "sprung_mass"`},
		{"bad value in spec", []string{"verify", "--spec", badMass, "--setup", setup}, "spec.vehicle.sprung_mass_kg"},
		{"record too long", []string{"verify", "--spec", spec, "--setup", setup, "--duration", "1e7"}, "time.duration_s"},
		{"all without job", []string{"verify", "--all", noServer}, "--all needs a JOB"},
		{"all with spec", []string{"verify", "--all", "--spec", spec, "--setup", setup}, "--all checks every solution of a JOB's front: it conflicts with --spec and --setup"},
		{"all with job and spec", []string{"verify", "a", "--all", "--spec", spec, noServer}, "it conflicts with --spec"},
		{"all with solution", []string{"verify", "a", "--all", "--solution", "1", noServer}, "it conflicts with --solution"},
		{"all with balanced", []string{"verify", "a", "--all", "--balanced", noServer}, "it conflicts with --balanced"},
		{"all with setup", []string{"verify", "a", "--all", "--setup", setup, noServer}, "it conflicts with --setup"},
		{"all without job, with car", []string{"verify", "--all", "--vehicle", testdataPath("quillon-gt.yaml"), "--roads", testdataPath("quillon-gt.yaml")}, "--all needs a JOB"},
		{"no goroutine", []string{"verify", "a", "--all", "--parallel", "0", noServer}, "--parallel must be a number of solutions >= 1, got 0"},
		{"parallel without all", []string{"verify", "a", "--parallel", "2", noServer}, "--parallel needs --all"},
		{"quiet without all", []string{"verify", "a", "--quiet", noServer}, "--quiet needs --all"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			r := mustRun(t, exitUsage, nil, tc.args...)
			if !strings.Contains(r.stderr, tc.want) {
				t.Errorf("stderr lacks %q:\n%s", tc.want, r.stderr)
			}
		})
	}
}

// On a road rough enough to lift the tyres the frequency-domain lift-off
// row is the Gaussian tail of the tyre-load row, P = Q(F/σ_F) =
// ½ erfc(F/(σ_F √2)) (the normal distribution's tail, Abramowitz &
// Stegun, "Handbook of Mathematical Functions", 26.2.29), F the mean
// tyre load: the static load for symmetric linear dampers, which do not
// jack. The time domain, where a tyre cannot pull, names the corners off
// the road for more than 1 % of the time.
func TestVerifyRoughRoadLiftsTheTyres(t *testing.T) {
	t.Parallel()
	// Agreement to 1e-9 relative: the closed form computed twice, here
	// and in the model, with erfc's own rounding.
	const closedForm = 1e-9
	dir := t.TempDir()
	rough, linear := filepath.Join(dir, "rough.yaml"), filepath.Join(dir, "linear.yaml")
	if err := os.WriteFile(rough, []byte("- name: rough street\n  speed_m_per_s: 40\n  power_law: {gd0_m3: 1.0e-3, waviness: 2}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(linear, []byte("front: {bump_ratio: 0.6, rebound_ratio: 0.6}\nrear: {bump_ratio: 0.6, rebound_ratio: 0.6}\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	v, _ := verifyOf(t, "--spec", testdataPath("demo-job.yaml"), "--roads", rough, "--setup", linear)
	c := v.Cases[0]
	rows := map[string]verifyRowJSON{}
	for _, r := range c.Rows {
		rows[r.Metric] = r
	}
	for i, corner := range []string{"FL", "FR", "RL", "RR"} {
		sd := rows["tyre_load_sd_n["+corner+"]"].Frequency
		want := 0.5 * math.Erfc(c.Static[i]/(sd*math.Sqrt2))
		got := rows["lift_off_fraction["+corner+"]"].Frequency
		if math.Abs(got-want) > closedForm*want {
			t.Errorf("%s: lift-off probability %g, the Gaussian tail of sd %g N at %g N static is %g", corner, got, sd, c.Static[i], want)
		}
		if lifted := rows["lift_off_fraction["+corner+"]"].Time; lifted > verifyWarn && !strings.Contains(strings.Join(c.Warnings, "\n"), corner+" tyre off the road") {
			t.Errorf("%s off the road %.2g of the time, no warning: %q", corner, lifted, c.Warnings)
		}
	}
	if len(c.Warnings) == 0 || c.Peaks.TyreLoadMin[0] != 0 {
		t.Errorf("no tyre left the road: warnings %q, lowest FL load %g N", c.Warnings, c.Peaks.TyreLoadMin[0])
	}
}

// verify JOB --all checks every solution of a small seeded job's front:
// the table has one row per solution in front order (as "front --format
// json" lists them), each row's worst deviation, time fractions and
// verdict agree with the rows of the JSON report, and the JSON holds one
// report per solution equal to what verify JOB --solution N gives for
// the same seed and duration, byte for byte the same with one goroutine
// as with two.
func TestVerifyAllFront(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "verify-all.db"), nil)
	// A few seconds of CPU on 2 cores for a front of some ten solutions.
	spec := writeSpec(t, "population_size: 36", "population_size: 12", "generations: 30", "generations: 6")
	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec, "--watch", "--quiet")...).stdout)
	front := parseFrontJSON(t, mustRun(t, exitOK, nil, s.client("front", id, "--format", "json")...).stdout)
	if len(front.Solutions) < 2 {
		t.Fatalf("the front of the small job has %d solutions; the test needs at least 2", len(front.Solutions))
	}
	var indices []int
	for _, sol := range front.Solutions {
		indices = append(indices, int(sol["index"].(float64)))
	}

	all := func(args ...string) (string, []verifyPointJSON) {
		t.Helper()
		r := mustRun(t, exitOK, nil, s.client(append([]string{"verify", id, "--all", "--format", "json", "--duration", testDuration, "--seed", "3"}, args...)...)...)
		var v []verifyPointJSON
		if err := json.Unmarshal([]byte(r.stdout), &v); err != nil {
			t.Fatalf("verify --all --format json: %v\n%s", err, r.stdout)
		}
		return r.stdout, v
	}
	one, points := all("--parallel", "1")
	if two, _ := all("--parallel", "2"); two != one {
		t.Error("verify --all gave another report with --parallel 2 than with --parallel 1")
	}
	if len(points) != len(indices) {
		t.Fatalf("verify --all reported %d solutions, the front has %d", len(points), len(indices))
	}
	for k, p := range points {
		if p.Index != indices[k] || p.Source != fmt.Sprintf("solution %d of jobs/%s", p.Index, id) || p.Seed != 3 || len(p.Cases) != 3 || p.Caution == "" {
			t.Errorf("entry %d: index %d (front has %d), source %q, seed %d, %d cases, caution %q", k, p.Index, indices[k], p.Source, p.Seed, len(p.Cases), p.Caution)
		}
	}
	for _, k := range []int{0, len(points) - 1} {
		single, _ := verifyOf(t, s.client(id, "--solution", fmt.Sprint(indices[k]), "--seed", "3")...)
		// The two are printed at different depths of indentation; the
		// compact JSON of both is compared.
		got, err := json.Marshal(points[k].verifyJSON)
		if err != nil {
			t.Fatal(err)
		}
		want, err := json.Marshal(single)
		if err != nil {
			t.Fatal(err)
		}
		if string(got) != string(want) {
			t.Errorf("solution %d: --all reports\n%s\n--solution reports\n%s", indices[k], got, want)
		}
	}

	r := mustRun(t, exitOK, nil, s.client("verify", id, "--all", "--duration", testDuration, "--seed", "3")...)
	// The progress bar on stderr ends at every solution checked.
	if n := len(points); !strings.Contains(r.stderr, "time-domain checks") || !strings.Contains(r.stderr, fmt.Sprintf("(%d/%d", n, n)) {
		t.Errorf("verify --all stderr has no progress bar ending at %d of %d:\n%q", n, n, r.stderr)
	}
	if q := mustRun(t, exitOK, nil, s.client("verify", id, "--all", "--quiet", "--format", "json", "--duration", testDuration, "--seed", "3")...); q.stderr != "" {
		t.Errorf("verify --all --quiet wrote to stderr: %q", q.stderr)
	}
	rowRE := regexp.MustCompile(`(?m)^ *\*? +(\d+)( +-?[0-9.]+){6} +(-|[0-9]+\.[0-9]) +(.+?) +(-|\d) +([0-9.]+) +([0-9.]+) +(holds|differs) *$`)
	rows := rowRE.FindAllStringSubmatch(r.stdout, -1)
	if len(rows) != len(points) {
		t.Fatalf("the table has %d solution rows, the front %d solutions:\n%s", len(rows), len(points), r.stdout)
	}
	held := 0
	for k, row := range rows {
		p := points[k]
		if row[1] != fmt.Sprint(p.Index) {
			t.Errorf("table row %d is solution %s, the front's is %d", k, row[1], p.Index)
		}
		// The row's figures from the JSON rows: judged are the rows with
		// a statistical error, fractions are shown in % with 3 decimals.
		worst, holds := -1.0, true
		var liftOff, bumpStop float64
		for _, c := range p.Cases {
			holds = holds && c.Holds
			for _, cr := range c.Rows {
				if cr.StatError > 0 {
					worst = math.Max(worst, math.Abs(cr.Diff)/cr.StatError)
				}
				switch {
				case strings.HasPrefix(cr.Metric, "lift_off_fraction["):
					liftOff = math.Max(liftOff, cr.Time)
				case strings.HasPrefix(cr.Metric, "bump_stop_fraction["):
					bumpStop = math.Max(bumpStop, cr.Time)
				}
			}
		}
		want := []string{fmt.Sprintf("%.1f", worst), fmt.Sprintf("%.3f", 100*liftOff), fmt.Sprintf("%.3f", 100*bumpStop), map[bool]string{true: "holds", false: "differs"}[holds]}
		if got := []string{row[3], row[6], row[7], row[8]}; strings.Join(got, " ") != strings.Join(want, " ") {
			t.Errorf("solution %d: table shows worst, off road, bump stop, verdict %q; its JSON report gives %q", p.Index, got, want)
		}
		if holds {
			held++
		}
	}
	for _, want := range []string{
		fmt.Sprintf("Time-domain check of every solution of the front of jobs/%s ", id),
		"Road seed 3, 20 s of road per case after settling",
		"  2  Tolvane Hill, rough slow section at 20 m/s",
		fmt.Sprintf("The linear answer holds on every road case for %d of %d solutions.", held, len(points)),
		cautionText,
	} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("verify --all output lacks %q:\n%s", want, r.stdout)
		}
	}

	help := mustRun(t, exitOK, nil, "verify", "--help")
	for _, want := range []string{"JOB --all checks every solution", "-parallel N", "The exit code is 0 whatever the verdicts."} {
		if !strings.Contains(help.stdout, want) {
			t.Errorf("verify --help lacks %q:\n%s", want, help.stdout)
		}
	}
}
