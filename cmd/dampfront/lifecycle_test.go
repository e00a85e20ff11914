package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

// migrate creates the database and can be run again.
func TestMigrate(t *testing.T) {
	t.Parallel()
	db := filepath.Join(t.TempDir(), "m.db")
	for i := 0; i < 2; i++ {
		r := mustRun(t, exitOK, nil, "migrate", "--database", db)
		if !strings.Contains(r.stdout, "(sqlite) is migrated") {
			t.Errorf("migrate run %d: %s", i, r.stdout)
		}
	}
	if st, err := os.Stat(db); err != nil || st.Size() == 0 {
		t.Errorf("migrate left no database at %s: %v", db, err)
	}
	mustRun(t, exitUsage, nil, "migrate", "--database", "sqlite:bad?name")
}

// The same binary as API server without workers and as a worker alone,
// on one SQLite file (the environment variable picks the database): the
// worker runs the job the server queued.
func TestServeWithSeparateWorker(t *testing.T) {
	t.Parallel()
	db := filepath.Join(t.TempDir(), "shared.db")
	s := startServer(t, db, []string{"DAMPFRONT_WORKERS=0"})
	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", testdataPath("demo-job.yaml"))...).stdout)

	worker := exec.Command(binary, "worker")
	worker.Env = append(cleanEnv(), "DAMPFRONT_DATABASE="+db)
	logs := &syncBuffer{}
	worker.Stdout, worker.Stderr = logs, logs
	if err := worker.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- worker.Wait() }()
	defer func() {
		_ = worker.Process.Signal(syscall.SIGTERM)
		select {
		case err := <-done:
			if err != nil {
				t.Errorf("worker after SIGTERM: %v\n%s", err, logs.String())
			}
		case <-time.After(serverStop):
			_ = worker.Process.Kill()
			t.Errorf("worker did not stop within %v of SIGTERM", serverStop)
		}
	}()
	r := mustRun(t, exitOK, nil, s.client("watch", id, "--quiet")...)
	if !strings.Contains(r.stdout, "succeeded: 30 of 30 generations") {
		t.Errorf("the job did not succeed on the separate worker: %s\nworker logs:\n%s", r.stdout, logs.String())
	}
}

// SIGTERM mid-job: serve exits with code 0 within its bound, having
// handed the job back, and a restarted server resumes it.
func TestSigtermHandsJobBack(t *testing.T) {
	t.Parallel()
	db := filepath.Join(t.TempDir(), "term.db")
	spec := writeSpec(t, "generations: 30", "generations: 2000")
	s := startServer(t, db, nil)
	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec)...).stdout)
	at := waitGeneration(t, s, id, 3).GetProgress().GetGeneration()
	s.stop(t)
	if code := s.cmd.ProcessState.ExitCode(); code != 0 {
		t.Fatalf("serve exited with code %d after SIGTERM:\n%s", code, s.logs.String())
	}
	if !strings.Contains(s.logs.String(), "stopped") {
		t.Errorf("serve did not log its stop:\n%s", s.logs.String())
	}
	s2 := startServer(t, db, nil)
	j := waitGeneration(t, s2, id, at+2)
	if j.GetState() != pb.JobState_JOB_STATE_RUNNING {
		t.Errorf("after the restart the job is %v, want running", j.GetState())
	}
	mustRun(t, exitOK, nil, s2.client("cancel", id)...)
	r := mustRun(t, exitFailure, nil, s2.client("watch", id, "--json")...)
	lines := strings.Split(strings.TrimSpace(r.stdout), "\n")
	var last pb.WatchJobResponse
	if err := protojson.Unmarshal([]byte(lines[len(lines)-1]), &last); err != nil {
		t.Fatal(err)
	}
	if last.GetJob().GetState() != pb.JobState_JOB_STATE_CANCELLED {
		t.Errorf("last watch event %v, want the cancelled job", &last)
	}
}
