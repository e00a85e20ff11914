package main

import (
	"strings"
	"testing"
)

// serve and worker with --migrate=false leave a PostgreSQL schema alone
// and refuse to start until `dampfront migrate` has brought it up to date.
func TestWorkerWithoutMigrating(t *testing.T) {
	t.Parallel()
	db := testPostgresURL(t)
	r := mustRun(t, exitFailure, nil, "worker", "--migrate=false", "--database", db)
	if !strings.Contains(r.stderr, "dampfront migrate") {
		t.Errorf("worker --migrate=false on an empty database: stderr %q, want the advice to run dampfront migrate", r.stderr)
	}
	mustRun(t, exitOK, nil, "migrate", "--database", db)
	r = mustRun(t, exitUsage, []string{"DAMPFRONT_MIGRATE=perhaps"}, "worker", "--database", db)
	if !strings.Contains(r.stderr, "DAMPFRONT_MIGRATE") {
		t.Errorf("a malformed $DAMPFRONT_MIGRATE: stderr %q", r.stderr)
	}
}
