package jobs

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"strings"
	"testing"
	"time"
)

// TestCrashUntilAttemptsRunOut kills worker processes with SIGKILL in
// the middle of a slice, each time after it has made progress, until the
// job's slices have run out of their attempts (MaxAttempts 2) twice
// (MaxRequeues 1): two runs on node a, each restarted at once under the
// same node ID, which releases the dead process's slice; then a worker on
// node b, which cannot release node a's slice, so River's rescuer
// discards it (its attempts are spent) and node b's reaper queues a fresh
// slice from the checkpoint; that run and the next on node b are killed
// too. The fifth worker's start discards the slice of the fourth (its
// attempts spent) and fails the job at once, with the reason and the
// front of its last checkpoint, bit for bit; Watch returns.
func TestCrashUntilAttemptsRunOut(t *testing.T) {
	t.Parallel()
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			testCrashUntilAttemptsRunOut(t, be.url(t))
		})
	}
}

func testCrashUntilAttemptsRunOut(t *testing.T, url string) {
	const attempts, requeues = 2, 1
	ctx := context.Background()
	// A job of some 15 minutes: it cannot end by itself in the test.
	spec := toySpec{Generations: 1_000_000, Size: 7, Seed: 13, StepDelay: time.Millisecond}
	cfg := testConfig(url)
	cfg.MaxAttempts = attempts // of the first slice, which the client queues
	client, j := crashClient(t, cfg, spec)
	wctx, cancel := context.WithTimeout(ctx, 5*time.Minute)
	defer cancel()
	watch, err := client.Watch(wctx, j.ID)
	if err != nil {
		t.Fatal(err)
	}

	var out bytes.Buffer
	var children []*exec.Cmd
	defer func() {
		for _, c := range children {
			if c.ProcessState == nil {
				_ = c.Process.Kill()
				_ = c.Wait()
			}
		}
		if t.Failed() {
			t.Logf("workers' output:\n%s", out.String())
		}
	}()
	startWorker := func(node string) *exec.Cmd {
		c := exec.Command(os.Args[0], "-test.run=^TestCrashWorkerProcess$", "-test.count=1")
		c.Env = append(os.Environ(), crashChildEnv+"="+url, crashChildNodeEnv+"="+node,
			crashChildLimitsEnv+"="+fmt.Sprintf("%d/%d", attempts, requeues))
		c.Stdout, c.Stderr = &out, &out
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
		children = append(children, c)
		return c
	}

	// Each run must start a slice (JobStart counts it) and progress past
	// the last run's generation before its kill.
	nodes := []string{"node-a", "node-a", "node-b", "node-b"}
	var (
		slices, gen int
		ckGen       = -1          // generation of the last checkpoint seen
		rescue      time.Duration // node b's start to its first slice run
		lastKill    time.Time
	)
	for i, node := range nodes {
		started := time.Now()
		c := startWorker(node)
		limit := testTimeout
		if i == 2 {
			// River's rescuer, on node b once it leads (the dead
			// process's leadership must expire first), discards node
			// a's slice after RescueStuckJobsAfter (about 11 s here).
			limit = 3 * time.Minute
		}
		waitForWithin(t, client, j.ID, fmt.Sprintf("running slice %d on %s", slices+1, node), limit, func(j *Job) bool {
			return j.State == StateRunning && j.Slices > slices && j.Progress.Generation > gen
		})
		if i == 2 {
			rescue = time.Since(started)
		}
		// A checkpoint of this run must be stored before the kill: the
		// failed job's front is its last checkpoint's, and progress is
		// stored twice as often as checkpoints, so a run killed on its
		// first progress may have written none.
		ckGen = waitCheckpointPast(t, client, j.ID, ckGen, limit)
		if err := c.Process.Kill(); err != nil {
			t.Fatal(err)
		}
		_ = c.Wait() // reaped, so its PID is gone
		lastKill = time.Now()
		at, err := client.Get(ctx, j.ID)
		if err != nil {
			t.Fatal(err)
		}
		if at.Slices != slices+1 {
			t.Fatalf("run %d on %s started %d slices, want 1: a slice handed over before the kill, so the kill spent no attempt of it", i+1, node, at.Slices-slices)
		}
		slices, gen = at.Slices, at.Progress.Generation
	}

	final := startWorker("node-b")
	endStart := time.Now()
	var last *Job
	for s := range watch {
		last = s
	}
	ended := time.Since(endStart)
	if wctx.Err() != nil || last == nil {
		t.Fatalf("Watch did not return within its bound; the job is stranded")
	}
	if last.State != StateFailed || !last.Partial || !strings.Contains(last.Error, fmt.Sprintf("ran out of their %d attempts %d times", attempts, requeues+1)) {
		t.Fatalf("job ended %+v; want failed, partial, with the reason", last)
	}
	if last.Slices != len(nodes) || last.Requeues != requeues {
		t.Errorf("job ran %d slices with %d requeues; want %d runs (one per killed worker) and %d requeue", last.Slices, last.Requeues, len(nodes), requeues)
	}
	c, err := client.Store().CheckpointGet(ctx, &CheckpointGetParams{JobID: j.ID})
	if err != nil {
		t.Fatal(err)
	}
	f := frontOf(t, client, j.ID)
	if !f.Partial {
		t.Error("front of the failed job not marked partial")
	}
	sameFront(t, f.Solutions, toyFrontAt(spec, c.Generation))
	if _, err := client.Cancel(ctx, j.ID); !errors.Is(err, ErrFailedPrecondition) {
		t.Errorf("Cancel of the failed job: err = %v, want ErrFailedPrecondition", err)
	}
	if final.ProcessState != nil {
		t.Errorf("the last worker exited early")
	}
	t.Logf("%d kills -9 (%v), %d requeue; node b's first slice run %v after its start (River's rescue); "+
		"job failed %v after the last worker's start, %v after the last kill; front of the checkpoint at generation %d; error: %s",
		len(nodes), nodes, last.Requeues, rescue.Round(time.Millisecond), ended.Round(time.Millisecond),
		time.Since(lastKill).Round(time.Millisecond), c.Generation, last.Error)
}

// waitCheckpointPast waits until the job's stored checkpoint is of a
// generation above after, within limit, and returns that generation.
func waitCheckpointPast(t *testing.T, client *Engine, id string, after int, limit time.Duration) int {
	t.Helper()
	deadline := time.Now().Add(limit)
	for time.Now().Before(deadline) {
		c, err := client.Store().CheckpointGet(context.Background(), &CheckpointGetParams{JobID: id})
		if err == nil && c.Generation > after {
			return c.Generation
		}
		time.Sleep(10 * time.Millisecond)
	}
	t.Fatalf("no checkpoint of job %s past generation %d within %v", id, after, limit)
	return 0
}
