package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The demo runs end to end: an embedded server on a temporary SQLite file
// and a loopback port, the demo job with its manoeuvres and kerb, its
// front check in decision space (no point beaten: the bar), the
// front, the balanced point and the two of largest split beside their
// bump = rebound twins, the damper curves of the balanced point and the
// caution, and it leaves no file behind.
func TestDemo(t *testing.T) {
	t.Parallel()
	tmp := t.TempDir()
	r := dampfrontWithin(t, demoTimeout, []string{"TMPDIR=" + tmp}, "demo", "--quiet")
	if r.code != exitOK {
		t.Fatalf("demo: exit code %d\nstdout:\n%s\nstderr:\n%s", r.code, r.stdout, r.stderr)
	}
	for _, want := range []string{
		"dampfront demo: server on 127.0.0.1:",
		`submitting "Quillon GT, demo tracks with manoeuvres and a kerb"`,
		"succeeded: 30 of 30 generations",
		"Pareto front of jobs/",
		"grip", "platform", "driver response", "% static", "N s/mm",
		"* balanced point: solution ",
		"What sets the split: the balanced point and the two of largest split",
		"twin minus solution, in % of the front's extent: grip ",
		"Damper curves of the balanced point",
		"Front left = front right damper, at the component",
		"Rear left = rear right damper, at the component",
		"softest  stiffest  rebound  softest  stiffest",
		cautionText,
	} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("demo output lacks %q:\n%s", want, r.stdout)
		}
	}
	if m := regexp.MustCompile(`Decision space: (\d+) of (\d+) points beaten`).FindStringSubmatch(r.stdout); m == nil || m[1] != "0" {
		t.Errorf("the demo's front check does not say 0 points beaten: %v\n%s", m, r.stdout)
	}
	if n := strings.Count(r.stdout, "  solution "); n != 3 {
		t.Errorf("want 3 solutions beside their twins, found %d:\n%s", n, r.stdout)
	}
	if strings.Contains(r.stdout, "heave damper") {
		t.Errorf("the road car's demo prints heave damper tables:\n%s", r.stdout)
	}
	if !strings.HasSuffix(strings.TrimSpace(r.stdout), cautionText) {
		t.Errorf("demo output does not end with the caution:\n%s", r.stdout)
	}
	// The curve tables run from 0 to 250 mm/s in steps of 25 (the demo
	// spec's curves: 21 points over +-0.25 m/s), with the balanced
	// point's force rising in bump and falling in rebound.
	rows := regexp.MustCompile(`(?m)^\s+250\s+(\d+)\s+\d+\s+\d+\s+(-\d+)\s+-\d+\s+-\d+\s*$`).FindAllStringSubmatch(r.stdout, -1)
	if len(rows) != 2 {
		t.Errorf("want a 250 mm/s row in each of the two curve tables, found %d:\n%s", len(rows), r.stdout)
	}
	entries, err := os.ReadDir(tmp)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != 0 {
		t.Errorf("demo left %d entries in its temporary directory, e.g. %s", len(entries), entries[0].Name())
	}
}

// demo --keep keeps the database and says where it is; --road-only runs
// the road cases alone (testdata/demo-job.yaml), which has no twins to
// print; --road-only with --prototype is a usage error.
func TestDemoKeep(t *testing.T) {
	t.Parallel()
	tmp := t.TempDir()
	r := mustRun(t, exitOK, []string{"TMPDIR=" + tmp}, "demo", "--quiet", "--keep", "--road-only")
	if !strings.Contains(r.stdout, `submitting "Quillon GT, demo tracks"`) || strings.Contains(r.stdout, "driver response") {
		t.Errorf("demo --road-only does not run the road-only job:\n%s", r.stdout)
	}
	mustRun(t, exitUsage, nil, "demo", "--road-only", "--prototype")
	m := regexp.MustCompile(`Kept (\S+); serve it with: dampfront serve --database (\S+)`).FindStringSubmatch(r.stdout)
	if m == nil {
		t.Fatalf("demo --keep does not say what it kept:\n%s", r.stdout)
	}
	if filepath.Dir(m[1]) != tmp {
		t.Errorf("kept directory %s is not under TMPDIR %s", m[1], tmp)
	}
	if st, err := os.Stat(m[2]); err != nil || st.Size() == 0 {
		t.Errorf("kept database %s: %v", m[2], err)
	}
}

// BenchmarkDemo is the wall time of "dampfront demo" as a process, start
// to exit: server start on a fresh SQLite file, the demo job (36 x 30
// generations on three road cases, two manoeuvres and a kerb, then its
// polish and front check), the front, the twins and curves, shutdown. Run
// it with -benchtime 3x; the figure belongs in the notes, no test
// asserts on it.
func BenchmarkDemo(b *testing.B) {
	tmp := b.TempDir()
	for i := 0; i < b.N; i++ {
		cmd := exec.Command(binary, "demo", "--quiet")
		cmd.Env = append(cleanEnv(), "TMPDIR="+tmp)
		if out, err := cmd.CombinedOutput(); err != nil {
			b.Fatalf("demo: %v\n%s", err, out)
		}
	}
}
