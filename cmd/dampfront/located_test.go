package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The server names a bad field by its path in the request
// ("spec.vehicle.sprung_mass_kg"); the CLI puts before it the file, line
// and column where the user wrote it (counted by hand in the files
// below), taking a field of a --roads file from that file and not from
// the spec.
func TestSubmitShowsWhereBadFieldsWereWritten(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "dampfront.db"), nil, "--workers", "0")
	spec := testdataPath("bad/five-bad-fields.yaml")
	r := mustRun(t, exitUsage, nil, s.client("submit", spec)...)
	for _, want := range []string{
		spec + ":13:19: spec.vehicle.sprung_mass_kg: ",               // "  sprung_mass_kg: -1150"
		spec + ":36:26: spec.vehicle.corners[3].tyre_rate_n_per_m: ", // through the alias *rear, at the anchored value
		spec + ":58:20: spec.road_cases[1].speed_m_per_s: ",          // "    speed_m_per_s: 0"
		spec + ":71:36: spec.design_space.ratios.rear_rebound.max: ", // "    rear_rebound:  {min: 1.4, max: 0.2}"
	} {
		if !strings.Contains(r.stderr, "\n  "+want) {
			t.Errorf("submit does not print %q:\n%s", want, r.stderr)
		}
	}

	// A road list given with --roads: its two bad fields are at its own
	// lines; the spec's own road cases are replaced.
	roads := writeRoads(t, "# two bad road cases\n"+
		"- name: slow\n"+
		"  speed_m_per_s: 0\n"+
		"  weight: 1\n"+
		"  power_law: {gd0_m3: 2.0e-6, waviness: 2}\n"+
		"- name: light\n"+
		"  speed_m_per_s: 30\n"+
		"  weight: -2\n"+
		"  power_law: {gd0_m3: 2.0e-6, waviness: 2}\n")
	r = mustRun(t, exitUsage, nil, s.client("submit", "--roads", roads, testdataPath("demo-job.yaml"))...)
	for _, want := range []string{
		roads + ":3:18: spec.road_cases[0].speed_m_per_s: ",
		roads + ":8:11: spec.road_cases[1].weight: ",
	} {
		if !strings.Contains(r.stderr, "\n  "+want) {
			t.Errorf("submit --roads does not print %q:\n%s", want, r.stderr)
		}
	}
}

// A road list file goes through the same checks as a spec: every problem
// at once, each at its line and column.
func TestReadRoadCasesReportsEveryProblemWithItsPosition(t *testing.T) {
	p := writeRoads(t, "- name: a\n"+
		"  speed_m_per_s: .nan\n"+
		"  weight: 1\n"+
		"  weight: 2\n"+
		"- name: b\n"+
		"  sped_m_per_s: 20\n")
	_, err := readRoadCases(&env{}, p)
	if err == nil {
		t.Fatal("a road list with three problems is accepted")
	}
	for _, want := range []string{
		"line 2, column 18: [0].speed_m_per_s: ",
		"line 4, column 3: [0].weight: given twice (first at line 3, column 3)",
		"line 6, column 3: [1].sped_m_per_s: unknown field",
	} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("the error does not hold %q:\n%v", want, err)
		}
	}
	p = writeRoads(t, "name: a\nspeed_m_per_s: 20\n")
	if _, err := readRoadCases(&env{}, p); err == nil || !strings.Contains(err.Error(), "line 1, column 1: must be a list of RoadCase") {
		t.Errorf("a single road case, not a list: %v", err)
	}
}

// writeRoads writes text to a temporary road list file and returns its path.
func writeRoads(t *testing.T, text string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "roads.yaml")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
