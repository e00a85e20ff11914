package main

import (
	"path/filepath"
	"strings"
	"testing"

	"dampfront/api/plot"
)

// The time-history chart of a stored job's solution on its manoeuvre and
// kerb cases: a short run of the demo job with manoeuvres and a kerb.
func TestPlotHistory(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "history.db"), nil)
	spec := writeSpecOf(t, "demo-manoeuvre-job.yaml", "population_size: 36", "population_size: 12", "generations: 30", "generations: 2")
	r := mustRun(t, exitOK, nil, s.client("submit", spec, "--watch", "--quiet")...)
	id := firstLine(r.stdout)
	dir := t.TempDir()
	at := func(name string) string { return filepath.Join(dir, name) }

	// The balanced point on the first case (the default): braking, no
	// lateral input.
	mustRun(t, exitOK, nil, s.client("plot", "history", id, "--svg", at("brake.svg"), "--png", at("brake.png"))...)
	checkSVG(t, at("brake.svg"), "Time history, Ashgrove hairpin, braking from top speed: balanced point, solution",
		"Roll (deg)", "Pitch (deg)", "LLTD front share: no lateral input", "Tyre load (N)", "steady value (quasi-static end)",
		"Setup: front bump", "Job jobs/"+id+", seed 7.")
	checkPNG(t, at("brake.png"), 170, 150, plot.DefaultDPI) // the chart's default page, 17 cm × 15 cm

	mustRun(t, exitOK, nil, s.client("plot", "history", id, "--solution", "0", "--case", "Ashgrove sweeper, turn-in", "--svg", at("turn.svg"))...)
	checkSVG(t, at("turn.svg"), "Time history, Ashgrove sweeper, turn-in: solution 0", "Lateral load transfer, front share", "LLTD front share (%)")
	mustRun(t, exitOK, nil, s.client("plot", "history", id, "--case", "Port Vellan chicane, left kerb", "--svg", at("kerb.svg"))...)
	checkSVG(t, at("kerb.svg"), `Case "Port Vellan chicane, left kerb" (kerb)`)

	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"no job", []string{"plot", "history", "--svg", at("x.svg")}, "the history chart needs a JOB"},
		{"no such case", []string{"plot", "history", id, "--case", "no such case", "--svg", at("x.svg")}, `no manoeuvre or kerb case named "no such case"`},
		{"no such solution", []string{"plot", "history", id, "--solution", "9999", "--svg", at("x.svg")}, "has no solution 9999"},
		{"spec flag", []string{"plot", "history", id, "--spec", spec, "--svg", at("x.svg")}, "--spec: not a flag of the history chart"},
		{"spectra case by name", []string{"plot", "spectra", id, "--case", "Ashgrove", "--svg", at("x.svg")}, "--case must be a road case index >= 0"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := mustRun(t, exitUsage, nil, s.client(tc.args...)...)
			if !strings.Contains(r.stderr, tc.want) {
				t.Errorf("stderr lacks %q:\n%s", tc.want, r.stderr)
			}
		})
	}
}
