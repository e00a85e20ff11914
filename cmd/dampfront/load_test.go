package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/status"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// Load on one API server over 127.0.0.1, with the generated client:
// many synchronous evaluations and job submissions at once. The figures
// (throughput, latency percentiles, the server's memory) are logged, not
// asserted; what is asserted is that nothing fails but the documented
// ResourceExhausted of a busy server, that every submitted job is stored
// once, and that the server's peak memory stays under a bound.

// Size of the load. After a busy server's ResourceExhausted a caller
// waits as its RetryInfo asks plus a seeded jitter of up to as much again,
// so that the retries spread out, and tries again, up to loadMaxAttempts
// times.
const (
	loadEvalCalls     = 200 // concurrent EvaluateSetups callers
	loadSetupsPerCall = 2   // setups of each call, × 3 road cases of the demo spec
	loadSubmits       = 50  // concurrent SubmitJob callers
	loadConns         = 8   // client connections the callers share
	loadTimeout       = 90 * time.Second
	loadMaxAttempts   = 100 // per caller, retries after ResourceExhausted included
)

// maxServerPeakRSS bounds the server process's peak resident memory
// (VmHWM) under the load. Common practice, not a published figure: the
// idle server measured 28 MiB here and 49 to 81 MiB at the peak of this
// load (200 requests and full responses of about 10 kB each at once), so
// 512 MiB is far above normal variation and catches what grows with the
// load without a limit (a buffer per waiting call, an unbounded queue).
const maxServerPeakRSS = 512 << 20

// TestLoadEvaluateAndSubmit runs 200 concurrent EvaluateSetups callers
// and 50 concurrent SubmitJob callers against one server on a SQLite
// file without workers (the jobs stay queued), twice: with the default
// limit of concurrent evaluations (one per CPU; callers retry after
// ResourceExhausted as its RetryInfo asks) and with the limit raised to
// 200, so that all the evaluations run at once.
func TestLoadEvaluateAndSubmit(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name  string
		limit int // --max-concurrent-evaluations; 0 is the default
	}{
		{"default limit", 0},
		{"limit 200", loadEvalCalls},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := startServer(t, filepath.Join(t.TempDir(), "load.db"), nil,
				"--workers", "0", "--max-concurrent-evaluations", strconv.Itoa(tc.limit))
			runLoad(t, s, tc.limit != 0)
		})
	}
}

// loadStats are the outcomes of one kind of call under load.
type loadStats struct {
	mu        sync.Mutex
	ok        int
	busy      int             // ResourceExhausted SERVER_BUSY answers, retried
	service   []time.Duration // attempts that succeeded: request to response
	endToEnd  []time.Duration // first attempt to success, waits included
	failures  []string
	firstSent time.Time
	lastDone  time.Time
}

func (s *loadStats) fail(format string, args ...any) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if len(s.failures) < 10 {
		s.failures = append(s.failures, fmt.Sprintf(format, args...))
	}
}

// call runs one caller's request until it succeeds, retrying a busy
// server after its RetryInfo delay and a jitter from rng; any other error
// is a failure.
func (s *loadStats) call(ctx context.Context, rng *rand.Rand, do func(context.Context) error) {
	start := time.Now()
	for attempt := 1; ; attempt++ {
		t0 := time.Now()
		err := do(ctx)
		if err == nil {
			end := time.Now()
			s.mu.Lock()
			s.ok++
			s.service = append(s.service, end.Sub(t0))
			s.endToEnd = append(s.endToEnd, end.Sub(start))
			if s.firstSent.IsZero() || start.Before(s.firstSent) {
				s.firstSent = start
			}
			if end.After(s.lastDone) {
				s.lastDone = end
			}
			s.mu.Unlock()
			return
		}
		delay, busy := retryAfterBusy(err)
		if !busy {
			s.fail("attempt %d: %v", attempt, err)
			return
		}
		if delay <= 0 {
			s.fail("attempt %d: busy without a RetryInfo delay: %v", attempt, err)
			return
		}
		s.mu.Lock()
		s.busy++
		s.mu.Unlock()
		if attempt == loadMaxAttempts {
			s.fail("still busy after %d attempts", attempt)
			return
		}
		wait := delay + time.Duration(rng.Int64N(int64(delay)+1))
		select {
		case <-ctx.Done():
			s.fail("gave up after %d attempts: %v", attempt, ctx.Err())
			return
		case <-time.After(wait):
		}
	}
}

// retryAfterBusy reports whether err is the documented ResourceExhausted
// of a busy server (ErrorInfo reason SERVER_BUSY) and its RetryInfo delay.
func retryAfterBusy(err error) (time.Duration, bool) {
	st, ok := status.FromError(err)
	if !ok || st.Code() != codes.ResourceExhausted {
		return 0, false
	}
	busy := false
	var delay time.Duration
	for _, d := range st.Details() {
		switch d := d.(type) {
		case *errdetails.ErrorInfo:
			busy = d.GetReason() == api.ReasonServerBusy && d.GetDomain() == api.ErrorDomain
		case *errdetails.RetryInfo:
			delay = d.GetRetryDelay().AsDuration()
		}
	}
	return delay, busy
}

// summary formats the figures of s.
func (s *loadStats) summary(what string, perCall int) string {
	wall := s.lastDone.Sub(s.firstSent)
	pct := func(ds []time.Duration, p float64) time.Duration {
		if len(ds) == 0 {
			return 0
		}
		c := slices.Clone(ds)
		slices.Sort(c)
		return c[min(len(c)-1, int(p*float64(len(c))))].Round(100 * time.Microsecond)
	}
	return fmt.Sprintf("%s: %d calls in %v, %.1f calls/s (%.0f per s of %d each); %d ResourceExhausted (busy) retried; "+
		"latency of the answered attempt p50 %v p99 %v; first attempt to answer p50 %v p99 %v",
		what, s.ok, wall.Round(time.Millisecond), float64(s.ok)/wall.Seconds(), float64(s.ok*perCall)/wall.Seconds(), perCall,
		s.busy, pct(s.service, 0.50), pct(s.service, 0.99), pct(s.endToEnd, 0.50), pct(s.endToEnd, 0.99))
}

// runLoad sends the evaluations and the submissions at once and checks
// their outcomes; noBusy says the limit admits every evaluation at once.
func runLoad(t *testing.T, s *server, noBusy bool) {
	spec := &pb.JobSpec{}
	if err := readMessage(&env{}, testdataPath("demo-job.yaml"), spec); err != nil {
		t.Fatal(err)
	}
	conns := make([]pb.DampfrontServiceClient, loadConns)
	for i := range conns {
		c, err := grpc.NewClient(s.addr, grpc.WithTransportCredentials(insecure.NewCredentials()))
		if err != nil {
			t.Fatal(err)
		}
		defer c.Close()
		conns[i] = pb.NewDampfrontServiceClient(c)
	}
	rssBefore := procMemory(t, s.cmd.Process.Pid)
	ctx, cancel := context.WithTimeout(context.Background(), loadTimeout)
	defer cancel()

	var evals, submits loadStats
	var wg sync.WaitGroup
	var ids sync.Map
	start := make(chan struct{})
	for i := range loadEvalCalls {
		rng := rand.New(rand.NewPCG(uint64(i), 8608)) // seeded per caller: setups and jitter
		req := &pb.EvaluateSetupsRequest{
			Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec},
			Setups: randomSetups(rng, loadSetupsPerCall),
			View:   pb.SolutionView_SOLUTION_VIEW_FULL,
		}
		c := conns[i%loadConns]
		wg.Add(1)
		go func() {
			defer wg.Done()
			<-start
			evals.call(ctx, rng, func(ctx context.Context) error {
				resp, err := c.EvaluateSetups(ctx, req)
				if err == nil && len(resp.GetEvaluations()) != loadSetupsPerCall {
					return fmt.Errorf("%d evaluations for %d setups", len(resp.GetEvaluations()), loadSetupsPerCall)
				}
				return err
			})
		}()
	}
	for i := range loadSubmits {
		rng := rand.New(rand.NewPCG(uint64(i), 50))
		seed := uint64(1000 + i)
		js := seeded(spec, seed)
		c := conns[i%loadConns]
		wg.Add(1)
		go func() {
			defer wg.Done()
			<-start
			submits.call(ctx, rng, func(ctx context.Context) error {
				resp, err := c.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: js})
				if err == nil {
					if _, dup := ids.LoadOrStore(resp.GetJob().GetJobId(), seed); dup {
						return fmt.Errorf("job ID %s given twice", resp.GetJob().GetJobId())
					}
				}
				return err
			})
		}()
	}
	var peak procMem
	stopSampling := make(chan struct{})
	sampled := make(chan struct{})
	go func() { // the server's resident memory while the load runs
		defer close(sampled)
		for {
			if m, ok := readProcMemory(s.cmd.Process.Pid); ok && m.rss > peak.rss {
				peak = m
			}
			select {
			case <-stopSampling:
				return
			case <-time.After(50 * time.Millisecond):
			}
		}
	}()
	close(start)
	wg.Wait()
	close(stopSampling)
	<-sampled
	after := procMemory(t, s.cmd.Process.Pid)

	for _, f := range append(evals.failures, submits.failures...) {
		t.Errorf("a call failed otherwise than with the documented ResourceExhausted: %s", f)
	}
	if evals.ok != loadEvalCalls || submits.ok != loadSubmits {
		t.Fatalf("%d of %d evaluations and %d of %d submits answered", evals.ok, loadEvalCalls, submits.ok, loadSubmits)
	}
	if noBusy && evals.busy+submits.busy > 0 {
		t.Errorf("%d ResourceExhausted with a limit that admits all %d evaluations at once", evals.busy+submits.busy, loadEvalCalls)
	}
	if submits.busy > 0 {
		t.Errorf("%d submits were answered ResourceExhausted; the limit is on synchronous evaluations only", submits.busy)
	}
	// Every submitted job stored once, queued.
	listed := listAllJobs(t, conns[0])
	if len(listed) != loadSubmits {
		t.Errorf("the server lists %d jobs, %d were submitted", len(listed), loadSubmits)
	}
	for _, j := range listed {
		if _, ok := ids.Load(j.GetJobId()); !ok || j.GetState() != pb.JobState_JOB_STATE_QUEUED {
			t.Errorf("listed job %s (%v) is not one of the submitted, queued", j.GetJobId(), j.GetState())
		}
	}
	if after.hwm > maxServerPeakRSS {
		t.Errorf("server peak resident memory %d MiB, bound %d MiB", after.hwm>>20, maxServerPeakRSS>>20)
	}
	t.Log(evals.summary("EvaluateSetups", loadSetupsPerCall))
	t.Log(submits.summary("SubmitJob", 1))
	t.Logf("server memory: resident %d MiB before, %d MiB at the highest sample, peak (VmHWM) %d MiB, %d MiB after",
		rssBefore.rss>>20, peak.rss>>20, after.hwm>>20, after.rss>>20)
}

// randomSetups draws n setups with damping ratios uniform in the demo
// spec's design space, [0.2, 1.4], and its base knees and factors.
func randomSetups(rng *rand.Rand, n int) []*pb.Setup {
	axle := func() *pb.AxleDamping {
		return &pb.AxleDamping{
			BumpRatio: 0.2 + 1.2*rng.Float64(), ReboundRatio: 0.2 + 1.2*rng.Float64(),
			KneeBumpMPerS: 0.05, KneeReboundMPerS: 0.05, HighSpeedBumpFactor: 0.5, HighSpeedReboundFactor: 0.5,
		}
	}
	out := make([]*pb.Setup, n)
	for i := range out {
		out[i] = &pb.Setup{Front: axle(), Rear: axle()}
	}
	return out
}

// listAllJobs pages through ListJobs.
func listAllJobs(t *testing.T, c pb.DampfrontServiceClient) []*pb.Job {
	t.Helper()
	var out []*pb.Job
	tok := ""
	for {
		ctx, cancel := context.WithTimeout(context.Background(), commandTimeout)
		resp, err := c.ListJobs(ctx, &pb.ListJobsRequest{PageSize: 20, PageToken: tok})
		cancel()
		if err != nil {
			t.Fatalf("list jobs: %v", err)
		}
		out = append(out, resp.GetJobs()...)
		if tok = resp.GetNextPageToken(); tok == "" {
			return out
		}
	}
}

// procMem is a process's resident memory from /proc/PID/status, bytes.
type procMem struct {
	rss, hwm int64 // VmRSS now, VmHWM the peak so far
}

func readProcMemory(pid int) (procMem, bool) {
	f, err := os.Open(fmt.Sprintf("/proc/%d/status", pid))
	if err != nil {
		return procMem{}, false
	}
	defer f.Close()
	var m procMem
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		k, v, ok := strings.Cut(sc.Text(), ":")
		if !ok {
			continue
		}
		var dst *int64
		switch k {
		case "VmRSS":
			dst = &m.rss
		case "VmHWM":
			dst = &m.hwm
		default:
			continue
		}
		kb, err := strconv.ParseInt(strings.TrimSuffix(strings.TrimSpace(v), " kB"), 10, 64)
		if err != nil {
			return procMem{}, false
		}
		*dst = kb << 10
	}
	return m, m.rss > 0 && m.hwm > 0
}

// procMemory is readProcMemory that skips the test where /proc is not.
func procMemory(t *testing.T, pid int) procMem {
	t.Helper()
	m, ok := readProcMemory(pid)
	if !ok {
		if _, err := os.Stat("/proc/self/status"); errors.Is(err, os.ErrNotExist) {
			t.Skip("no /proc to read the server's memory from")
		}
		t.Fatalf("cannot read the memory of process %d from /proc", pid)
	}
	return m
}

// loadEnv enables TestLoadJobsPerHour, which runs for minutes.
const loadEnv = "DAMPFRONT_LOAD"

// Jobs per hour of the demo job (population 36, 30 generations, three
// road cases) with one and with two worker processes, each working one
// job at a time with its evaluations spread over the CPUs, beside an API
// server without workers: 8 jobs of distinct seeds are submitted at once
// and timed from the first submit until the last has succeeded. On
// PostgreSQL when DAMPFRONT_TEST_DATABASE_URL is set, else on a SQLite
// file shared by the processes. Set DAMPFRONT_LOAD=1 to run it.
func TestLoadJobsPerHour(t *testing.T) {
	t.Parallel()
	if os.Getenv(loadEnv) == "" {
		t.Skipf("runs for minutes; set %s=1 to measure", loadEnv)
	}
	const nJobs = 8
	for _, nWorkers := range []int{1, 2} {
		t.Run(fmt.Sprintf("%d workers", nWorkers), func(t *testing.T) {
			db := filepath.Join(t.TempDir(), "jobs.db")
			backend := "SQLite"
			if os.Getenv(testDatabaseURLEnv) != "" {
				db, backend = testPostgresURL(t), "PostgreSQL"
			}
			mustRun(t, exitOK, nil, "migrate", "--database", db)
			s := startServer(t, db, nil, "--workers", "0")
			for i := range nWorkers {
				startWorker(t, db, fmt.Sprintf("load-%d", i+1), nil, "--eval-workers", "0")
			}
			began := time.Now()
			ids := submitJobs(t, s, testdataPath("demo-job.yaml"), nJobs, 500)
			for _, id := range ids {
				r := mustRun(t, exitOK, nil, s.client("watch", id, "--quiet")...)
				if !strings.Contains(r.stdout, "succeeded") {
					t.Fatalf("job %s: %s", id, r.stdout)
				}
			}
			elapsed := time.Since(began)
			t.Logf("%s, %d worker processes: %d demo jobs in %v, %.0f jobs per hour",
				backend, nWorkers, nJobs, elapsed.Round(time.Millisecond), nJobs/elapsed.Hours())
		})
	}
}
