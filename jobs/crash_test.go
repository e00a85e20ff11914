package jobs

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"testing"
	"time"
)

// crashChildEnv, when set to a database URL, turns TestCrashWorkerProcess
// into the worker process that TestCrashResume kills.
const crashChildEnv = "DAMPFRONT_JOBS_CRASH_CHILD_DB"

// crashChildNodeEnv, when set, is the child's Config.NodeID.
const crashChildNodeEnv = "DAMPFRONT_JOBS_CRASH_CHILD_NODE"

// crashChildLimitsEnv, when set to "attempts/requeues", is the child's
// Config.MaxAttempts and MaxRequeues, and makes it reap every 100 ms in
// 5 s slices.
const crashChildLimitsEnv = "DAMPFRONT_JOBS_CRASH_CHILD_LIMITS"

// slowTestEnv enables the tests that wait for River's own rescuer, whose
// run interval (30 s) River does not let a client shorten.
const slowTestEnv = "DAMPFRONT_TEST_SLOW"

// TestCrashWorkerProcess is not a test of its own: run by TestCrashResume
// as a child process, it works the database named by crashChildEnv until
// it is killed (or, bounded, until crashChildLife passes).
func TestCrashWorkerProcess(t *testing.T) {
	url := os.Getenv(crashChildEnv)
	if url == "" {
		t.Skip("helper process for TestCrashResume")
	}
	cfg := testConfig(url)
	cfg.NodeID = os.Getenv(crashChildNodeEnv)
	cfg.Workers = 1
	cfg.SliceDuration = time.Minute // one long slice, so the kill lands inside it
	cfg.CheckpointInterval = 50 * time.Millisecond
	if limits := os.Getenv(crashChildLimitsEnv); limits != "" {
		if _, err := fmt.Sscanf(limits, "%d/%d", &cfg.MaxAttempts, &cfg.MaxRequeues); err != nil {
			t.Fatalf("%s=%q: %v", crashChildLimitsEnv, limits, err)
		}
		cfg.ReapInterval = 100 * time.Millisecond
		// River's rescuer takes a slice of a dead worker on another node
		// after SliceDuration + SliceGrace + RescueMargin: about 11 s,
		// while a kill lands well inside 5 s.
		cfg.SliceDuration = 5 * time.Second
	}
	e, err := Open(context.Background(), cfg, &toyOpener{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := e.Start(context.Background()); err != nil {
		t.Fatal(err)
	}
	time.Sleep(crashChildLife)
}

// crashChildLife bounds a worker process of the crash tests, which kill
// it long before: it outlasts the longest wait of a parent (River's
// rescue, up to 3 min).
const crashChildLife = 5 * time.Minute

// TestCrashResume kills a worker process with SIGKILL in the middle of a
// slice, after a checkpoint and with work done since, then starts a new
// engine on the same database. Start must release the dead process's
// slice; the job must resume from the last checkpoint (exactly the
// remaining generations run again, the lost ones included) and end with
// the front of an uninterrupted run, bit for bit.
func TestCrashResume(t *testing.T) {
	t.Parallel()
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			testCrashResume(t, be.url(t), "", 1)
		})
	}
}

// TestCrashRescueByRiver is TestCrashResume with the dead worker on
// another node: Start must leave its slice alone, and River's rescuer
// (on the leader, after RescueStuckJobsAfter) runs it again. It waits for
// River's leader election and 30 s rescuer interval, so it runs only when
// DAMPFRONT_TEST_SLOW is set.
func TestCrashRescueByRiver(t *testing.T) {
	t.Parallel()
	if os.Getenv(slowTestEnv) == "" {
		t.Skipf("waits for River's rescuer; set %s=1 to run", slowTestEnv)
	}
	for _, be := range backends {
		t.Run(be.name, func(t *testing.T) {
			t.Parallel()
			testCrashResume(t, be.url(t), "another-node", 0)
		})
	}
}

// testCrashResume runs the crash scenario on the database at path with
// the child on node childNode ("" for this node), and wants Start to
// release wantReleased slices.
func testCrashResume(t *testing.T, path, childNode string, wantReleased int) {
	ctx := context.Background()
	spec := toySpec{Generations: 300, Size: 11, Seed: 5, StepDelay: time.Millisecond}

	client, j := crashClient(t, testConfig(path), spec)

	var out bytes.Buffer
	child := exec.Command(os.Args[0], "-test.run=^TestCrashWorkerProcess$", "-test.count=1")
	child.Env = append(os.Environ(), crashChildEnv+"="+path, crashChildNodeEnv+"="+childNode)
	child.Stdout, child.Stderr = &out, &out
	if err := child.Start(); err != nil {
		t.Fatal(err)
	}
	killed := false
	defer func() {
		if !killed {
			_ = child.Process.Kill()
			_ = child.Wait()
		}
	}()
	checkpointGen := func() int {
		c, err := client.Store().CheckpointGet(ctx, &CheckpointGetParams{JobID: j.ID})
		if errors.Is(err, ErrNotFound) {
			return 0
		}
		if err != nil {
			t.Fatal(err)
		}
		return c.Generation
	}
	waitFor(t, client, j.ID, "checkpointed at least once and past its checkpoint", func(j *Job) bool {
		c := checkpointGen()
		return c >= 50 && j.Progress.Generation > c
	})
	if err := child.Process.Kill(); err != nil {
		t.Fatal(err)
	}
	_ = child.Wait() // reaped, so its PID is gone
	killed = true

	atKill, err := client.Get(ctx, j.ID)
	if err != nil {
		t.Fatal(err)
	}
	// The child may have stored a checkpoint between the wait above and
	// the kill, with its progress at that generation: running at or past
	// its checkpoint, then.
	resumeFrom := checkpointGen()
	if atKill.State != StateRunning || atKill.Progress.Generation < resumeFrom {
		t.Fatalf("at the kill: %+v with checkpoint at generation %d; want running at or past its checkpoint (child output: %s)", atKill, resumeFrom, out.String())
	}

	cfg := testConfig(path)
	opener := &toyOpener{}
	reopen := time.Now()
	e, err := Open(ctx, cfg, opener)
	if err != nil {
		t.Fatal(err)
	}
	defer func() {
		sctx, cancel := context.WithTimeout(ctx, testTimeout)
		defer cancel()
		_ = e.Stop(sctx)
		_ = e.Close()
	}()
	restart := time.Now()
	released, err := e.Start(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if released != wantReleased {
		t.Errorf("Start released %d slices, want %d", released, wantReleased)
	}
	resumeWait := testTimeout
	if wantReleased == 0 {
		// River's leader lease of the dead child must expire, then its
		// rescuer (every 30 s) finds the slice, then its scheduler
		// makes the retry available.
		resumeWait = 3 * time.Minute
	}
	waitForWithin(t, e, j.ID, "resumed", resumeWait, func(j *Job) bool { return j.Slices > atKill.Slices })
	resumeDelay, sinceOpen := time.Since(restart), time.Since(reopen)
	done := waitTerminal(t, e, j.ID)
	if done.State != StateSucceeded {
		t.Fatalf("job ended %+v", done)
	}
	if got, want := opener.executed.Load(), int64(spec.Generations-resumeFrom); got != want {
		t.Errorf("after the restart %d generations ran, want %d: resumed from generation %d", got, want, resumeFrom)
	}
	sameFront(t, frontOf(t, e, j.ID).Solutions, toyFrontAt(spec, spec.Generations))
	t.Logf("killed at generation %d, checkpoint at %d (%d generations lost); slice resumed %v after the new engine's Start, %v after its Open",
		atKill.Progress.Generation, resumeFrom, atKill.Progress.Generation-resumeFrom, resumeDelay, sinceOpen)
}

// crashClient opens an engine with cfg that submits and reads but works
// nothing (it is not started), and submits spec to it.
func crashClient(t *testing.T, cfg Config, spec toySpec) (*Engine, *Job) {
	t.Helper()
	client, err := Open(context.Background(), cfg, &toyOpener{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = client.Close() })
	j, err := client.Submit(context.Background(), &SubmitParams{Spec: spec.bytes()})
	if err != nil {
		t.Fatal(err)
	}
	return client, j
}
