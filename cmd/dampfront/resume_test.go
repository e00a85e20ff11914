package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// kill -9 of the serving process mid-job, then a restart on the same
// database: the job resumes from its last checkpoint, not from the start,
// and its front is bit for bit the front of the same spec run without
// interruption (compared as the JSON of "front --format json", whose
// floats are written in their shortest round-trip form).
func TestKillAndResume(t *testing.T) {
	t.Parallel()
	db := filepath.Join(t.TempDir(), "resume.db")
	// Checkpoints every 200 ms, so that one exists when the process dies.
	env := []string{"DAMPFRONT_CHECKPOINT_INTERVAL=200ms"}
	spec := writeSpec(t, "generations: 30", "generations: 60")

	s1 := startServer(t, db, env)
	id := firstLine(mustRun(t, exitOK, nil, s1.client("submit", spec)...).stdout)
	waitGeneration(t, s1, id, 25)
	s1.kill()

	// The dead process's last checkpoint, read from the database itself.
	ckpt := readCheckpoint(t, db, id)
	if ckpt.Generation < 1 {
		t.Fatalf("no checkpoint past the initial population when the process died: generation %d", ckpt.Generation)
	}

	restartAt := time.Now()
	s2 := startServer(t, db, env)
	r := mustRun(t, exitOK, nil, s2.client("watch", id, "--json")...)
	var gens []int32
	var resumedAt time.Time
	for i, line := range strings.Split(strings.TrimSpace(r.stdout), "\n") {
		var ev pb.WatchJobResponse
		if err := protojson.Unmarshal([]byte(line), &ev); err != nil {
			t.Fatalf("watch --json line %d: %v: %s", i, err, line)
		}
		p := ev.GetProgress()
		if p == nil {
			p = ev.GetJob().GetProgress()
		}
		gens = append(gens, p.GetGeneration())
		if resumedAt.IsZero() && p.GetGeneration() > int32(ckpt.Generation) && p.GetUpdateTime().AsTime().After(restartAt) {
			resumedAt = p.GetUpdateTime().AsTime()
		}
	}
	// A run that started over would show generations below the
	// checkpoint's while it caught up (the watch samples every 250 ms, a
	// generation takes about 100 ms); a resumed one never does.
	for _, g := range gens {
		if g < int32(ckpt.Generation) {
			t.Fatalf("after the restart the job reported generation %d, below its checkpoint's %d: it started over (generations seen: %v)", g, ckpt.Generation, gens)
		}
	}
	if last := gens[len(gens)-1]; last != 60 {
		t.Fatalf("the resumed job ended at generation %d, want 60", last)
	}
	if !resumedAt.IsZero() {
		t.Logf("killed at generation >= 25 with a checkpoint at generation %d; first new generation stored %v after the restart began",
			ckpt.Generation, resumedAt.Sub(restartAt).Round(time.Millisecond))
	}

	// The same spec run in one go on the restarted server.
	ref := firstLine(mustRun(t, exitOK, nil, s2.client("submit", spec, "--watch", "--quiet")...).stdout)
	got := frontFields(t, mustRun(t, exitOK, nil, s2.client("front", id, "--format", "json")...).stdout)
	want := frontFields(t, mustRun(t, exitOK, nil, s2.client("front", ref, "--format", "json")...).stdout)
	for k, w := range want {
		if !bytes.Equal(got[k], w) {
			t.Errorf("front field %q differs between the killed-and-resumed run and the uninterrupted one:\n%.400s\n%.400s", k, got[k], w)
		}
	}
}

// frontFields splits front JSON into its fields, without the job's own
// name, which differs between two jobs of the same spec.
func frontFields(t *testing.T, s string) map[string]json.RawMessage {
	t.Helper()
	var m map[string]json.RawMessage
	if err := json.Unmarshal([]byte(s), &m); err != nil {
		t.Fatal(err)
	}
	delete(m, "job")
	if len(m["solutions"]) < 10 {
		t.Fatalf("front has no solutions: %s", s)
	}
	return m
}

// readCheckpoint opens the database in process, without working or
// releasing anything, and returns the job's last checkpoint.
func readCheckpoint(t *testing.T, db, id string) *jobs.Checkpoint {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), serverStart)
	defer cancel()
	eng, err := jobs.Open(ctx, jobs.Config{DatabaseURL: db}, api.NewOpener(0))
	if err != nil {
		t.Fatal(err)
	}
	defer eng.Close()
	c, err := eng.Store().CheckpointGet(ctx, &jobs.CheckpointGetParams{JobID: id})
	if err != nil {
		t.Fatalf("checkpoint of %s: %v", id, err)
	}
	return c
}

// kill -9 of the serving process while the job refines its front on the
// nonlinear car, then a restart on the same database: the refinement
// resumes from the points of its last checkpoint (the count of points
// checked never falls below it), and the front with its refined figures
// and the job's refinement summary are bit for bit those of the same
// spec run without interruption.
func TestKillAndResumeRefining(t *testing.T) {
	t.Parallel()
	db := filepath.Join(t.TempDir(), "refine.db")
	env := []string{"DAMPFRONT_CHECKPOINT_INTERVAL=200ms"}
	// A short record (10 s a road case) keeps each point's check to some
	// tens of milliseconds; the comparisons are exact, not statistical.
	spec := writeSpec(t, "generations: 30", "generations: 6",
		"\nsearch:\n", "\nrefinement: {enabled: true, duration_s: 10}\nsearch:\n")

	s1 := startServer(t, db, env)
	id := firstLine(mustRun(t, exitOK, nil, s1.client("submit", spec)...).stdout)
	killedAt, points := waitRefined(t, s1, id, 10)
	s1.kill()
	if killedAt >= points {
		t.Fatalf("all %d points were refined before the kill: nothing left to resume", points)
	}

	ck := readCheckpoint(t, db, id)
	if !bytes.HasPrefix(ck.Data, []byte("dfrefine")) {
		t.Fatalf("the last checkpoint before the kill holds no refined point (%d bytes)", len(ck.Data))
	}

	s2 := startServer(t, db, env)
	r := mustRun(t, exitOK, nil, s2.client("watch", id, "--json")...)
	var counts []int32
	for i, line := range strings.Split(strings.TrimSpace(r.stdout), "\n") {
		var ev pb.WatchJobResponse
		if err := protojson.Unmarshal([]byte(line), &ev); err != nil {
			t.Fatalf("watch --json line %d: %v: %s", i, err, line)
		}
		if rs := ev.GetRefinement(); rs != nil {
			counts = append(counts, rs.GetPointsChecked())
		}
		if j := ev.GetJob(); j != nil && j.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
			t.Fatalf("the resumed job ended %v", j.GetState())
		}
	}
	for _, c := range counts {
		if c < killedAt {
			t.Fatalf("after the restart the refinement reported %d points checked, below the %d stored before the kill: it started over (counts seen: %v)", c, killedAt, counts)
		}
	}

	t.Logf("killed with %d of %d points refined as of the last checkpoint; counts seen after the restart: %v", killedAt, points, counts)

	ref := firstLine(mustRun(t, exitOK, nil, s2.client("submit", spec, "--watch", "--quiet")...).stdout)
	got := frontFields(t, mustRun(t, exitOK, nil, s2.client("front", id, "--format", "json")...).stdout)
	want := frontFields(t, mustRun(t, exitOK, nil, s2.client("front", ref, "--format", "json")...).stdout)
	if !bytes.Contains(want["solutions"], []byte("refined")) {
		t.Fatalf("the uninterrupted run's front has no refined figures: %.300s", want["solutions"])
	}
	for k, w := range want {
		if !bytes.Equal(got[k], w) {
			t.Errorf("front field %q differs between the killed-and-resumed run and the uninterrupted one:\n%.400s\n%.400s", k, got[k], w)
		}
	}
	summary := func(id string) *pb.RefinementSummary {
		var j pb.Job
		if err := protojson.Unmarshal([]byte(mustRun(t, exitOK, nil, s2.client("get", id, "--format", "json")...).stdout), &j); err != nil {
			t.Fatal(err)
		}
		return j.GetRefinementSummary()
	}
	if a, b := summary(id), summary(ref); a == nil || a.GetInProgress() || !proto.Equal(a, b) {
		t.Errorf("refinement summary after the kill and resume %v, uninterrupted %v", a, b)
	}
}

// waitRefined waits until the job's stored summary says at least n of its
// front's points are refined (stored with a checkpoint) and returns the
// count it read and the front's points.
func waitRefined(t *testing.T, s *server, id string, n int32) (int32, int32) {
	t.Helper()
	j := waitJob(t, s, id, fmt.Sprintf("%d points refined", n), func(j *pb.Job) bool {
		rs := j.GetRefinementSummary()
		return rs.GetInProgress() && rs.GetPointsChecked() >= n
	})
	return j.GetRefinementSummary().GetPointsChecked(), j.GetRefinementSummary().GetPoints()
}
