package main

import (
	"encoding/csv"
	"math"
	"strings"
	"testing"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

// hand runs with no server (the address points nowhere) and its figures
// are the closed forms on the demo car's file: c_crit = 2 sqrt(k_w m_s)
// at the wheel (common practice) and /MR² at the damper, the ride
// frequency sqrt(k/m)/(2π) with k_w k_t/(k_w + k_t) in series (Gillespie
// 1992, Fundamentals of Vehicle Dynamics, ch. 6). Worked from
// testdata/quillon-gt.yaml: k_w = 160 kN/m x 0.8² = 102.4 kN/m, front
// sprung corner mass 1150 x 1.272/2.65/2 = 276.0 kg, k_t = 320 kN/m.
// Tolerance relative 1e-9: the figures are computed here in float64 too.
func TestHandCommandNoServer(t *testing.T) {
	t.Parallel()
	env := []string{"DAMPFRONT_ADDR=127.0.0.1:1"}
	r := mustRun(t, exitOK, env, "hand", "--vehicle", testdataPath("quillon-gt.yaml"), "--format", "json")
	resp := &pb.EstimateByHandResponse{}
	if err := protojson.Unmarshal([]byte(r.stdout), resp); err != nil {
		t.Fatalf("%v\n%s", err, r.stdout)
	}
	kw, kt, ms := 160e3*0.8*0.8, 320e3, 1150*1.272/2.65/2
	kr := kw * kt / (kw + kt)
	fl := resp.GetCorners()[0]
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"sprung mass", fl.GetSprungMassKg(), ms},
		{"critical damping at the wheel", fl.GetCriticalDampingWheelNSPerM(), 2 * math.Sqrt(kw*ms)},
		{"critical damping at the damper", fl.GetCriticalDampingDamperNSPerM(), 2 * math.Sqrt(kw*ms) / 0.64},
		{"ride frequency without the tyre", fl.GetRideFrequencyHz(), math.Sqrt(kw/ms) / (2 * math.Pi)},
		{"ride frequency with the tyre", fl.GetRideFrequencyWithTyreHz(), math.Sqrt(kr/ms) / (2 * math.Pi)},
		{"bump slope at 0.7 (common practice)", fl.GetBump().GetSlopeNSPerM(), 0.7 * 2 * math.Sqrt(kw*ms) / 0.64},
		{"rebound force at 50 mm/s", fl.GetRebound().GetKneeForceN(), 0.8 * 2 * math.Sqrt(kw*ms) / 0.64 * 0.05},
	} {
		if math.Abs(c.got-c.want) > 1e-9*c.want {
			t.Errorf("FL %s: %.12g, closed form %.12g", c.name, c.got, c.want)
		}
	}
	if len(resp.GetModes()) != 3 || resp.GetModes()[0].GetModal().GetUndampedFrequencyHz() <= 0 {
		t.Errorf("modes: %v", resp.GetModes())
	}

	table := mustRun(t, exitOK, env, "hand", "--vehicle", testdataPath("quillon-gt.yaml"), "--bump", "0.65", "--adjust", "0.4,1.1").stdout
	for _, want := range []string{"critical damping, damper", "ride frequency, tyre", "front bump 0.65", "common practice", "why they differ", "roll", "Caution"} {
		if !strings.Contains(table, want) {
			t.Errorf("table has no %q:\n%s", want, table)
		}
	}
	rows, err := csv.NewReader(strings.NewReader(mustRun(t, exitOK, env, "hand", "--vehicle", testdataPath("quillon-gt.yaml"), "--format", "csv").stdout)).ReadAll()
	if err != nil || len(rows) != 5 || rows[0][0] != "corner" || rows[0][8] != "critical_damping_wheel_n_s_per_m" {
		t.Errorf("csv: %v %v", err, rows)
	}
	mustRun(t, exitUsage, env, "hand")
	bad := mustRun(t, exitUsage, env, "hand", "--vehicle", testdataPath("quillon-gt.yaml"), "--rebound", "-1")
	if !strings.Contains(bad.stderr, "targets.front.rebound_ratio") {
		t.Errorf("a negative rebound ratio: stderr %q does not name the field", bad.stderr)
	}
}

// From a spec the knees, high-speed factors and adjuster range are the
// spec's (testdata/demo-job.yaml: knees 50 mm/s, factors 0.5, band bump
// 0.3-1.0, rebound 0.5-1.4); a flag overrides.
func TestHandCommandFromSpec(t *testing.T) {
	t.Parallel()
	r := mustRun(t, exitOK, nil, "hand", "--spec", testdataPath("demo-job.yaml"), "--high-speed", "0.4", "--format", "json")
	resp := &pb.EstimateByHandResponse{}
	if err := protojson.Unmarshal([]byte(r.stdout), resp); err != nil {
		t.Fatal(err)
	}
	f, a := resp.GetTargets().GetRear(), resp.GetAdjustment()
	if f.GetKneeBumpMPerS() != 0.05 || f.GetHighSpeedBumpFactor() != 0.4 || a.GetBumpStiffestRatio() != 1.0 || a.GetReboundStiffestRatio() != 1.4 {
		t.Errorf("targets %v, adjustment %v", f, a)
	}
}
