package main

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/jackc/pgx/v5/pgxpool"

	"dampfront/api"
	"dampfront/jobs"
)

// Fault tests of the multi-machine mode: worker processes of the real
// binary on one PostgreSQL database, killed with SIGKILL, stopped with
// SIGTERM, or left without their database. Each is bounded in the number
// of faults and in time, and listens on 127.0.0.1 only. What must hold
// afterwards is the engine's contract (jobs package doc): no job lost or
// duplicated, each finished exactly once, and each front bit for bit the
// front of the same stored spec run without interruption.

// Bounds of the fault tests (generous for a loaded 2-core machine; they
// bound hangs, they do not measure speed).
const (
	faultJobsTimeout = 180 * time.Second // until every job of a test has ended
	pollInterval     = 25 * time.Millisecond
)

// faultSpec writes the demo spec resized to population × generations: a
// job of a second or a few of CPU.
func faultSpec(t *testing.T, population, generations int) string {
	t.Helper()
	return writeSpec(t,
		"population_size: 36", "population_size: "+strconv.Itoa(population),
		"generations: 30", "generations: "+strconv.Itoa(generations))
}

// proc is a worker process of the binary that a test may kill and start
// again with the same arguments; its logs accumulate across restarts.
type proc struct {
	t    *testing.T
	name string
	args []string
	env  []string
	logs *syncBuffer

	mu   sync.Mutex
	cmd  *exec.Cmd
	done chan struct{}
}

// startWorker runs "dampfront worker" on database db as node node with one
// slice at a time and one evaluation goroutine (the front does not depend
// on it), and waits until it works. The cleanup stops it with SIGTERM.
func startWorker(t *testing.T, db, node string, env []string, args ...string) *proc {
	t.Helper()
	p := &proc{
		t: t, name: node, env: env, logs: &syncBuffer{},
		args: append([]string{"worker", "--database", db, "--node-id", node, "--workers", "1", "--eval-workers", "1"}, args...),
	}
	p.start()
	t.Cleanup(func() {
		p.stop()
		if t.Failed() {
			t.Logf("worker %s logs:\n%s", p.name, p.logs.String())
		}
	})
	return p
}

// start runs the process and waits until it logs that it works, within
// serverStart.
func (p *proc) start() {
	p.t.Helper()
	mark := len(p.logs.String())
	cmd := exec.Command(binary, p.args...)
	cmd.Env = append(cleanEnv(), p.env...)
	cmd.Stdout, cmd.Stderr = p.logs, p.logs
	if err := cmd.Start(); err != nil {
		p.t.Fatal(err)
	}
	done := make(chan struct{})
	go func() { _ = cmd.Wait(); close(done) }()
	p.mu.Lock()
	p.cmd, p.done = cmd, done
	p.mu.Unlock()
	deadline := time.Now().Add(serverStart)
	for time.Now().Before(deadline) {
		if strings.Contains(p.logs.String()[mark:], "msg=working") {
			return
		}
		select {
		case <-done:
			p.t.Fatalf("worker %s exited at start:\n%s", p.name, p.logs.String()[mark:])
		case <-time.After(20 * time.Millisecond):
		}
	}
	p.t.Fatalf("worker %s did not start working within %v:\n%s", p.name, serverStart, p.logs.String()[mark:])
}

// pid is the process ID of the running process.
func (p *proc) pid() int {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.cmd.Process.Pid
}

// kill ends the process with SIGKILL and reaps it, so that its PID is
// gone (a zombie would still look alive to the next process's release of
// its dead slices).
func (p *proc) kill() {
	p.mu.Lock()
	cmd, done := p.cmd, p.done
	p.mu.Unlock()
	_ = cmd.Process.Kill()
	<-done
}

// signal sends sig to the running process and returns the channel closed
// when it has exited.
func (p *proc) signal(sig syscall.Signal) <-chan struct{} {
	p.mu.Lock()
	defer p.mu.Unlock()
	_ = p.cmd.Process.Signal(sig)
	return p.done
}

// exited reports whether the process has exited.
func (p *proc) exited() bool {
	p.mu.Lock()
	defer p.mu.Unlock()
	select {
	case <-p.done:
		return true
	default:
		return false
	}
}

// exitCode is the exit code of the process, which has exited.
func (p *proc) exitCode() int {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.cmd.ProcessState.ExitCode()
}

// stop sends SIGTERM and waits up to serverStop, then kills; it returns
// the exit code, or -1 after a kill.
func (p *proc) stop() int {
	p.mu.Lock()
	cmd, done := p.cmd, p.done
	p.mu.Unlock()
	select {
	case <-done:
		return cmd.ProcessState.ExitCode()
	default:
	}
	_ = cmd.Process.Signal(syscall.SIGTERM)
	select {
	case <-done:
		return cmd.ProcessState.ExitCode()
	case <-time.After(serverStop):
		p.t.Errorf("worker %s did not stop within %v of SIGTERM", p.name, serverStop)
		_ = cmd.Process.Kill()
		<-done
		return -1
	}
}

// submitJobs submits spec n times through the server, with seeds seed0,
// seed0+1, ..., and returns the job IDs.
func submitJobs(t *testing.T, s *server, spec string, n int, seed0 uint64) []string {
	t.Helper()
	ids := make([]string, n)
	for i := range ids {
		r := mustRun(t, exitOK, nil, s.client("submit", spec, "--seed", strconv.FormatUint(seed0+uint64(i), 10))...)
		ids[i] = firstLine(r.stdout)
	}
	return ids
}

// referenceRun submits spec once per seed to a server of the binary under
// test on a SQLite file of its own, with two jobs at a time, each in one
// slice (an hour long) and without checkpoints inside it: one clean,
// uninterrupted run of each job of a fault test. The same binary runs
// both, so the comparison holds even while the source tree changes
// under a developer's test run. The returned function waits for the run
// and gives each front by the stored spec bytes, which the server makes
// the same for the same spec and seed (api.MarshalSpec is
// deterministic).
func referenceRun(t *testing.T, spec string, seeds []uint64) func() map[string][]jobs.Solution {
	t.Helper()
	db := filepath.Join(t.TempDir(), "reference.db")
	s := startServer(t, db, []string{"DAMPFRONT_SLICE=1h", "DAMPFRONT_CHECKPOINT_INTERVAL=-1s"},
		"--workers", "2", "--eval-workers", "1")
	var ids []string
	for _, seed := range seeds {
		ids = append(ids, submitJobs(t, s, spec, 1, seed)...)
	}
	return func() map[string][]jobs.Solution {
		t.Helper()
		for _, id := range ids {
			mustRun(t, exitOK, nil, s.client("watch", id, "--quiet")...)
		}
		st := openStore(t, db)
		out := map[string][]jobs.Solution{}
		for _, id := range ids {
			j, err := st.JobGetByID(context.Background(), &jobs.JobGetByIDParams{ID: id})
			if err != nil {
				t.Fatal(err)
			}
			if j.State != jobs.StateSucceeded || j.Slices != 1 {
				t.Fatalf("reference job %s: %s in %d slices; want succeeded in one", id, j.State, j.Slices)
			}
			out[string(j.Spec)] = readFront(t, st, id)
		}
		return out
	}
}

// seedRange is seed0, seed0+1, ..., n seeds.
func seedRange(seed0 uint64, n int) []uint64 {
	out := make([]uint64, n)
	for i := range out {
		out[i] = seed0 + uint64(i)
	}
	return out
}

// openStore opens the database at url in this process, neither working
// nor releasing anything, for reading fronts and checkpoints.
func openStore(t *testing.T, url string) jobs.Store {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), serverStart)
	defer cancel()
	eng, err := jobs.Open(ctx, jobs.Config{DatabaseURL: url}, api.NewOpener(0))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = eng.Close() })
	return eng.Store()
}

// readFront reads every page of a job's stored front.
func readFront(t *testing.T, st jobs.Store, id string) []jobs.Solution {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	defer cancel()
	var out []jobs.Solution
	tok := ""
	for {
		page, err := st.FrontGet(ctx, &jobs.FrontGetParams{JobID: id, PageSize: jobs.MaxPageSize, PageToken: tok})
		if err != nil {
			t.Fatalf("front of %s: %v", id, err)
		}
		out = append(out, page.Solutions...)
		if tok = page.NextPageToken; tok == "" {
			return out
		}
	}
}

// checkFronts compares each job's stored front with the uninterrupted
// front of its stored spec (want, by spec bytes), bit for bit: genes,
// objectives and violations as IEEE 754 bits, feasibility and the encoded
// details. The engine stores floats as their bits (jobs package doc), so
// equality is exact, not within a tolerance; the API's fronts are derived
// from these rows alone.
func checkFronts(t *testing.T, st jobs.Store, pool *pgxpool.Pool, ids []string, want map[string][]jobs.Solution) {
	t.Helper()
	rows := readJobs(t, pool)
	for _, id := range ids {
		ref, ok := want[string(rows[id].spec)]
		if !ok {
			t.Errorf("job %s: no reference job has its stored spec", id)
			continue
		}
		if msg := diffSolutions(readFront(t, st, id), ref); msg != "" {
			t.Errorf("job %s: the stored front is not the uninterrupted one: %s", id, msg)
		}
	}
}

// diffSolutions describes the first difference of two fronts, or "".
func diffSolutions(got, want []jobs.Solution) string {
	if len(want) == 0 {
		return "no reference front"
	}
	if len(got) != len(want) {
		return fmt.Sprintf("%d solutions, want %d", len(got), len(want))
	}
	for i := range want {
		g, w := got[i], want[i]
		switch {
		case g.Index != w.Index:
			return fmt.Sprintf("solution %d has index %d", i, g.Index)
		case !sameBits(g.Genes, w.Genes):
			return fmt.Sprintf("solution %d genes %v, want %v", i, g.Genes, w.Genes)
		case !sameBits(g.Objectives, w.Objectives):
			return fmt.Sprintf("solution %d objectives %v, want %v", i, g.Objectives, w.Objectives)
		case !sameBits(g.Violations, w.Violations):
			return fmt.Sprintf("solution %d violations %v, want %v", i, g.Violations, w.Violations)
		case g.Feasible != w.Feasible:
			return fmt.Sprintf("solution %d feasible %v, want %v", i, g.Feasible, w.Feasible)
		case string(g.Detail) != string(w.Detail):
			return fmt.Sprintf("solution %d details differ (%d and %d bytes)", i, len(g.Detail), len(w.Detail))
		}
	}
	return ""
}

func sameBits(a, b []float64) bool {
	return slices.EqualFunc(a, b, func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) })
}

// durationSummary formats min, median and max of ds.
func durationSummary(ds []time.Duration) string {
	if len(ds) == 0 {
		return "none"
	}
	s := slices.Clone(ds)
	slices.Sort(s)
	r := func(d time.Duration) time.Duration { return d.Round(time.Millisecond) }
	return fmt.Sprintf("min %v, median %v, max %v", r(s[0]), r(s[len(s)/2]), r(s[len(s)-1]))
}

// Three worker processes and an API server without workers on one
// PostgreSQL database work 12 seeded jobs in 1 s slices, checkpointing
// every 150 ms, while a random worker holding a running slice is killed
// with SIGKILL every 1 to 2 s, at most 10 times, and started again at
// once with the same --node-id, so that its start releases the dead
// process's slice (River's rescuer would wait SliceDuration + 1 min grace
// + 30 s margin, and it runs only every 30 s). In the end every job has
// succeeded exactly once, with one chain of completed slices, and its
// front is bit for bit the uninterrupted front of its stored spec.
func TestFaultKillWorkers(t *testing.T) {
	t.Parallel()
	const (
		nJobs    = 12
		maxKills = 10
		nWorkers = 3
	)
	db := testPostgresURL(t)
	mustRun(t, exitOK, nil, "migrate", "--database", db)
	pool := pgPool(t, db)
	env := []string{"DAMPFRONT_SLICE=1s", "DAMPFRONT_CHECKPOINT_INTERVAL=150ms"}
	s := startServer(t, db, env, "--workers", "0")
	workers := make([]*proc, nWorkers)
	for i := range workers {
		workers[i] = startWorker(t, db, fmt.Sprintf("fault-kill-%d", i+1), env)
	}
	began := time.Now()
	spec := faultSpec(t, 12, 40)
	reference := referenceRun(t, spec, seedRange(100, nJobs)) // while the workers run
	ids := submitJobs(t, s, spec, nJobs, 100)

	rng := rand.New(rand.NewPCG(6, 1)) // seeded: which worker, and when
	var (
		kills       int
		restarts    []time.Duration // kill to the new process working
		mu          sync.Mutex
		wg          sync.WaitGroup
		resumed     []time.Duration // kill to the killed job's next slice run
		notTaken    []string
		startedOver []string
	)
	for kills < maxKills {
		time.Sleep(time.Second + time.Duration(rng.Int64N(int64(time.Second))))
		// A worker that holds a running slice, tried in random order.
		var victim *proc
		var job string
		for _, k := range rng.Perm(nWorkers) {
			if job = runningSliceOf(pool, workers[k].name, workers[k].pid()); job != "" {
				victim = workers[k]
				break
			}
		}
		if victim == nil {
			if len(readSlicesOpen(t, pool)) == 0 {
				break // every job has ended
			}
			continue
		}
		victim.kill()
		killedAt := time.Now()
		kills++
		at, _ := readJob(pool, job) // the lease of the last run that started
		ckpt := checkpointGeneration(pool, job)
		victim.start()
		restarts = append(restarts, time.Since(killedAt))
		wg.Add(1)
		go func() {
			defer wg.Done()
			when, ok := waitTakenOver(pool, job, at.lease, faultJobsTimeout)
			// The next run's first progress: a run that started over
			// instead of resuming would store a generation below the
			// checkpoint (it checkpoints every 150 ms, a few
			// generations).
			first := nextGeneration(pool, job, at.generation, faultJobsTimeout)
			mu.Lock()
			defer mu.Unlock()
			if !ok {
				notTaken = append(notTaken, job)
				return
			}
			resumed = append(resumed, when.Sub(killedAt))
			if first < ckpt {
				startedOver = append(startedOver, fmt.Sprintf("%s (checkpoint at generation %d, next stored %d)", job, ckpt, first))
			}
		}()
	}
	final := waitJobsEnded(t, pool, ids)
	elapsed := time.Since(began)
	wg.Wait()
	if len(notTaken) > 0 {
		t.Errorf("no slice run took over jobs %v within %v of their worker's kill", notTaken, faultJobsTimeout)
	}
	if len(startedOver) > 0 {
		t.Errorf("jobs started over after their worker's kill instead of resuming from the checkpoint: %v", startedOver)
	}
	if kills == 0 {
		t.Fatalf("no worker held a running slice at any of the kill times; the jobs are too short for the test")
	}
	slicesRun, reruns := checkSucceededOnce(t, pool, ids)
	checkFronts(t, openStore(t, db), pool, ids, reference())
	runs, released := 0, 0
	for _, id := range ids {
		runs += final[id].slices
	}
	for _, w := range workers {
		released += releasedAtStart(w.logs.String())
	}
	t.Logf("%d jobs on %d workers, %d kills -9, each worker started again at once; all done %v after the first submit; "+
		"%d slices, %d slice runs, %d slices released by the restarted worker, %d slice attempts again",
		nJobs, nWorkers, kills, elapsed.Round(time.Millisecond), slicesRun, runs, released, reruns)
	t.Logf("kill to the new worker working: %s; kill to the killed job's next slice run (it queues again behind the waiting jobs' slices): %s",
		durationSummary(restarts), durationSummary(resumed))
}

// releasedAtStart sums the slices a worker's starts released, from its
// logs.
func releasedAtStart(logs string) int {
	n := 0
	for _, line := range strings.Split(logs, "\n") {
		if !strings.Contains(line, `msg="resuming jobs of a previous process"`) {
			continue
		}
		if _, v, ok := strings.Cut(line, "slices="); ok {
			k, _ := strconv.Atoi(strings.Fields(v)[0])
			n += k
		}
	}
	return n
}

// SIGTERM to a worker in the middle of a long slice: it stops after its
// current generation, checkpoints, queues the job's next slice and exits
// with code 0 within --stop-timeout; a worker on another node continues
// the job from that checkpoint, and its front is bit for bit the
// uninterrupted one. No checkpoint is written before the SIGTERM (the
// interval is longer than the job), so the one found afterwards is the
// stopping worker's.
func TestFaultSigtermWorker(t *testing.T) {
	t.Parallel()
	const stopTimeout = 10 * time.Second
	db := testPostgresURL(t)
	mustRun(t, exitOK, nil, "migrate", "--database", db)
	pool := pgPool(t, db)
	env := []string{"DAMPFRONT_SLICE=1m", "DAMPFRONT_CHECKPOINT_INTERVAL=1m"}
	s := startServer(t, db, env, "--workers", "0")
	a := startWorker(t, db, "fault-term-a", env, "--stop-timeout", stopTimeout.String())
	spec := faultSpec(t, 12, 100)
	reference := referenceRun(t, spec, seedRange(11, 1))
	ids := submitJobs(t, s, spec, 1, 11)
	id := ids[0]

	// Past generation 30, so that a run started over would show lower
	// generations than the checkpoint's for a while (progress is written
	// every second, about 20 generations here).
	var atTerm jobRow
	deadline := time.Now().Add(faultJobsTimeout)
	for {
		j, _ := readJob(pool, id)
		if j.generation >= 30 {
			atTerm = j
			break
		}
		if j.state != "queued" && j.state != "running" || time.Now().After(deadline) {
			t.Fatalf("job %s did not run to generation 30 on worker a: %+v", id, j)
		}
		time.Sleep(pollInterval)
	}
	if g := checkpointGeneration(pool, id); g != 0 {
		t.Fatalf("job %s has a checkpoint at generation %d before the SIGTERM; the test needs none", id, g)
	}
	if runningSliceOf(pool, a.name, a.pid()) != id {
		t.Fatalf("worker a does not hold the running slice of job %s", id)
	}
	termAt := time.Now()
	select {
	case <-a.signal(syscall.SIGTERM):
	case <-time.After(stopTimeout + 5*time.Second): // + closing the database and exiting
		t.Fatalf("worker a did not exit within --stop-timeout %v (+5 s) of SIGTERM:\n%s", stopTimeout, a.logs.String())
	}
	exitAfter := time.Since(termAt)
	if code := a.exitCode(); code != 0 {
		t.Fatalf("worker a exited with code %d after SIGTERM:\n%s", code, a.logs.String())
	}

	// Handed back: a checkpoint at or past the generation seen before the
	// signal, the job not ended, its first slice completed and the second
	// queued for any worker.
	handed, _ := readJob(pool, id)
	ckpt := checkpointGeneration(pool, id)
	if ckpt < atTerm.generation || handed.generation != ckpt || handed.state != "running" {
		t.Fatalf("after the SIGTERM: checkpoint at generation %d, job %+v; want a checkpoint at its progress, at least generation %d, and the job still running",
			ckpt, handed, atTerm.generation)
	}
	if ss := readSlices(t, pool)[id]; len(ss) != 2 || ss[0].state != "completed" || ss[1].slice != 2 || ss[1].state != "available" {
		t.Fatalf("slices after the SIGTERM: %+v; want slice 1 completed and slice 2 available", ss)
	}

	b := startWorker(t, db, "fault-term-b", env)
	startB := time.Now()
	var seenB []int // generations stored under b's lease
	for {
		j, ok := readJob(pool, id)
		if ok && j.lease != handed.lease && j.state == "running" {
			seenB = append(seenB, j.generation)
		}
		if ok && j.state != "queued" && j.state != "running" {
			break
		}
		if time.Since(startB) > faultJobsTimeout {
			t.Fatalf("job %s did not end on worker b within %v: %+v", id, faultJobsTimeout, j)
		}
		time.Sleep(pollInterval)
	}
	for _, g := range seenB {
		if g < ckpt {
			t.Fatalf("on worker b the job reported generation %d, below the SIGTERM's checkpoint at %d: it started over (seen %v)", g, ckpt, seenB)
		}
	}
	checkSucceededOnce(t, pool, ids)
	checkFronts(t, openStore(t, db), pool, ids, reference())
	if !strings.Contains(b.logs.String(), "msg=working") {
		t.Errorf("worker b logged no start")
	}
	t.Logf("SIGTERM at generation %d; worker a checkpointed at generation %d and exited %v after the signal (bound %v); worker b finished the job",
		atTerm.generation, ckpt, exitAfter.Round(time.Millisecond), stopTimeout)
}

// PostgreSQL restarted (pg_ctl restart -m fast, which ends every session)
// under two running workers and an API server: the workers stay up,
// reconnect and carry on; every job succeeds exactly once with the
// uninterrupted front. The cluster is the test's own.
func TestFaultPostgresRestart(t *testing.T) {
	t.Parallel()
	c := startCluster(t)
	db := createDatabase(t, c.adminURL())
	mustRun(t, exitOK, nil, "migrate", "--database", db)
	pool := pgPool(t, db)
	env := []string{"DAMPFRONT_SLICE=2s", "DAMPFRONT_CHECKPOINT_INTERVAL=150ms"}
	s := startServer(t, db, env, "--workers", "0")
	workers := []*proc{startWorker(t, db, "fault-pg-a", env), startWorker(t, db, "fault-pg-b", env)}
	spec := faultSpec(t, 12, 60)
	reference := referenceRun(t, spec, seedRange(21, 4))
	ids := submitJobs(t, s, spec, 4, 21)

	// Both workers in the middle of a job.
	deadline := time.Now().Add(faultJobsTimeout)
	for {
		busy := 0
		for _, w := range workers {
			if id := runningSliceOf(pool, w.name, w.pid()); id != "" {
				if j, _ := readJob(pool, id); j.generation >= 5 {
					busy++
				}
			}
		}
		if busy == len(workers) {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("the two workers were not both past generation 5 of a job within %v", faultJobsTimeout)
		}
		time.Sleep(pollInterval)
	}
	before := readJobs(t, pool)
	restartAt := time.Now()
	c.mustCtl("restart", "-m", "fast")
	outage := time.Since(restartAt)

	// Progress after the restart: some job's generation moves on.
	var movedAfter time.Duration
	for movedAfter == 0 {
		for _, id := range ids {
			if j, ok := readJob(pool, id); ok && (j.generation > before[id].generation || j.state == "succeeded") {
				movedAfter = time.Since(restartAt)
				break
			}
		}
		if time.Since(restartAt) > faultJobsTimeout {
			t.Fatalf("no job moved on within %v of the database restart", faultJobsTimeout)
		}
		time.Sleep(pollInterval)
	}
	waitJobsEnded(t, pool, ids)
	for _, w := range workers {
		if w.exited() {
			t.Errorf("worker %s exited after the database restart:\n%s", w.name, w.logs.String())
		}
	}
	select {
	case <-s.done:
		t.Errorf("the API server exited after the database restart:\n%s", s.logs.String())
	default:
	}
	// The server reconnects too: a job submitted now is stored and run.
	ids = append(ids, submitJobs(t, s, faultSpec(t, 12, 10), 1, 25)...)
	waitJobsEnded(t, pool, ids)
	_, reruns := checkSucceededOnce(t, pool, ids)
	checkFronts(t, openStore(t, db), pool, ids[:4], reference())
	t.Logf("database restarted under 2 workers running 4 jobs: pg_ctl restart took %v; a job moved on %v after the restart began; %d slice attempts again",
		outage.Round(time.Millisecond), movedAfter.Round(time.Millisecond), reruns)
}
