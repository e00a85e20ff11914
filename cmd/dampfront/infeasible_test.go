package main

import (
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// A job whose travel limit (0.01 mm of travel SD) no setup can meet
// succeeds, and watch and get say it is infeasible, which constraint
// blocked it and by how much, on which road case.
func TestWatchAndGetSayInfeasible(t *testing.T) {
	t.Parallel()
	spec := writeSpec(t, "generations: 30", "generations: 2",
		"{kind: CONSTRAINT_KIND_JACKING, limit: 0.003}", "{kind: CONSTRAINT_KIND_TRAVEL, limit: 0.00001}")
	s := startServer(t, filepath.Join(t.TempDir(), "infeasible.db"), nil)
	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec)...).stdout)
	verdict := regexp.MustCompile(`Infeasible: no setup met travel sd ≤ 0\.01 mm; the closest was [0-9.]+ mm over the limit \([^)]+\)`)
	w := mustRun(t, exitOK, nil, s.client("watch", id, "--quiet")...)
	if !strings.Contains(w.stdout, "succeeded") || !verdict.MatchString(w.stdout) {
		t.Errorf("watch of an infeasible job:\n%s", w.stdout)
	}
	g := mustRun(t, exitOK, nil, s.client("get", id)...)
	if !strings.Contains(g.stdout, "succeeded, infeasible") || !verdict.MatchString(g.stdout) {
		t.Errorf("get of an infeasible job:\n%s", g.stdout)
	}
}
