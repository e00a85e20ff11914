package api

import (
	"context"
	"errors"
	"log/slog"
	"net"
	"net/http"
	"net/http/httptest"
	"testing"
	"time"

	dto "github.com/prometheus/client_model/go"
	"github.com/prometheus/common/expfmt"
	"github.com/prometheus/common/model"
	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/test/bufconn"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// scrape reads url as Prometheus does and parses the text exposition
// format with Prometheus's own parser (github.com/prometheus/common), so
// that a malformed exposition fails here as it would fail a scrape.
func scrape(t *testing.T, url string) map[string]*dto.MetricFamily {
	t.Helper()
	req, err := http.NewRequestWithContext(testContext(t), http.MethodGet, url, nil)
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Accept", "text/plain;version=0.0.4")
	res, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	if res.StatusCode != http.StatusOK {
		t.Fatalf("GET %s: %s", url, res.Status)
	}
	p := expfmt.NewTextParser(model.UTF8Validation)
	fams, err := p.TextToMetricFamilies(res.Body)
	if err != nil {
		t.Fatalf("the exposition does not parse: %v", err)
	}
	return fams
}

// sample finds the metric of family name whose labels include want; nil
// when there is none.
func sample(fams map[string]*dto.MetricFamily, name string, want map[string]string) *dto.Metric {
	f := fams[name]
	if f == nil {
		return nil
	}
next:
	for _, m := range f.GetMetric() {
		have := map[string]string{}
		for _, l := range m.GetLabel() {
			have[l.GetName()] = l.GetValue()
		}
		for k, v := range want {
			if have[k] != v {
				continue next
			}
		}
		return m
	}
	return nil
}

// value is the value of a counter or gauge sample, failing the test when
// the sample is missing.
func value(t *testing.T, fams map[string]*dto.MetricFamily, name string, labels map[string]string) float64 {
	t.Helper()
	m := sample(fams, name, labels)
	if m == nil {
		t.Fatalf("no sample %s%v", name, labels)
	}
	switch {
	case m.GetCounter() != nil:
		return m.GetCounter().GetValue()
	case m.GetGauge() != nil:
		return m.GetGauge().GetValue()
	}
	t.Fatalf("%s%v is neither a counter nor a gauge", name, labels)
	return 0
}

// histogramCount is the sample count of a histogram, failing the test
// when it is missing.
func histogramCount(t *testing.T, fams map[string]*dto.MetricFamily, name string, labels map[string]string) uint64 {
	t.Helper()
	m := sample(fams, name, labels)
	if m == nil || m.GetHistogram() == nil {
		t.Fatalf("no histogram %s%v", name, labels)
	}
	return m.GetHistogram().GetSampleCount()
}

// TestMetricsAfterJob runs a small job across several slices on a server
// with metrics and checks the scraped series against the job's own
// figures, which the store kept through a separate path.
func TestMetricsAfterJob(t *testing.T) {
	t.Parallel()
	m := NewMetrics(MetricsOptions{Logger: slog.New(slog.DiscardHandler)})
	e := startEngine(t, shortSlices, func(c *jobs.Config) { c.OnSlice = m.ObserveSlice })
	if err := m.CollectStore(e.Store(), MetricsOptions{}); err != nil {
		t.Fatal(err)
	}
	srv, err := NewServer(e, Options{Logger: slog.New(slog.DiscardHandler)})
	if err != nil {
		t.Fatal(err)
	}
	lis := bufconn.Listen(1 << 20)
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- srv.Serve(ctx, lis, m.ServerOptions()...) }()
	conn, err := grpc.NewClient("passthrough:///bufconn", grpc.WithTransportCredentials(insecure.NewCredentials()),
		grpc.WithContextDialer(func(ctx context.Context, _ string) (net.Conn, error) { return lis.DialContext(ctx) }))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		_ = conn.Close()
		cancel()
		if err := <-done; err != nil {
			t.Errorf("Serve: %v", err)
		}
	})
	b := &testBundle{engine: e, server: srv, client: pb.NewDampfrontServiceClient(conn), conn: conn}
	web := httptest.NewServer(m.Handler()) // 127.0.0.1
	t.Cleanup(web.Close)

	const generations = 6
	job := b.submit(t, testSpec(generations))
	_, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("job ended %v: %s", final.GetState(), final.GetErrorMessage())
	}
	if _, err := b.client.GetFront(testContext(t), &pb.GetFrontRequest{Job: job.GetName()}); err != nil {
		t.Fatal(err)
	}
	_, err = b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: "jobs/"})
	wantCode(t, "GetJob of an empty id", err, codes.InvalidArgument, ReasonInvalidArgument)

	fams := scrape(t, web.URL)
	svc := pb.DampfrontService_ServiceDesc.ServiceName

	// Jobs by state: the one job, succeeded.
	for _, st := range jobs.States {
		want := 0.0
		if st == jobs.StateSucceeded {
			want = 1
		}
		if got := value(t, fams, "dampfront_jobs", map[string]string{"state": string(st)}); got != want {
			t.Errorf("dampfront_jobs{state=%q} = %v, want %v", st, got, want)
		}
	}
	if got := value(t, fams, "dampfront_store_up", nil); got != 1 {
		t.Errorf("dampfront_store_up = %v, want 1", got)
	}
	if got := value(t, fams, "dampfront_checkpoint_age_seconds", nil); got != 0 {
		t.Errorf("dampfront_checkpoint_age_seconds = %v with no job running, want 0", got)
	}

	// The slices' counts add up to the job's own progress: each slice
	// adds what it did since the checkpoint it opened, and the next one
	// opens the checkpoint the last one saved.
	if final.GetProgress().GetEvaluations() <= 0 {
		t.Fatalf("the job reports %d evaluations", final.GetProgress().GetEvaluations())
	}
	if got, want := value(t, fams, "dampfront_evaluations_total", nil), float64(final.GetProgress().GetEvaluations()); got != want {
		t.Errorf("dampfront_evaluations_total = %v, want the job's %v", got, want)
	}
	if got := value(t, fams, "dampfront_generations_total", nil); got != generations {
		t.Errorf("dampfront_generations_total = %v, want %d", got, generations)
	}
	if n := histogramCount(t, fams, "dampfront_slice_duration_seconds", map[string]string{"outcome": jobs.SliceSucceeded}); n != 1 {
		t.Errorf("%d slices succeeded, want 1", n)
	}
	if n := histogramCount(t, fams, "dampfront_slice_duration_seconds", map[string]string{"outcome": jobs.SliceError}); n != 0 {
		t.Errorf("%d slices ended with an error, want 0", n)
	}
	if s := sample(fams, "dampfront_slice_duration_seconds", map[string]string{"outcome": jobs.SliceSucceeded}); s.GetHistogram().GetSampleSum() <= 0 {
		t.Errorf("slice durations sum to %v s, want > 0", s.GetHistogram().GetSampleSum())
	}

	// Calls by method and code, and their times.
	for _, c := range []struct {
		method, code string
		want         float64
	}{
		{"SubmitJob", "OK", 1},
		{"WatchJob", "OK", 1},
		{"GetFront", "OK", 1},
		{"GetJob", "InvalidArgument", 1},
	} {
		if got := value(t, fams, "dampfront_rpc_requests_total", map[string]string{"service": svc, "method": c.method, "code": c.code}); got != c.want {
			t.Errorf("dampfront_rpc_requests_total{method=%q,code=%q} = %v, want %v", c.method, c.code, got, c.want)
		}
	}
	if n := histogramCount(t, fams, "dampfront_rpc_duration_seconds", map[string]string{"service": svc, "method": "WatchJob", "type": "stream"}); n != 1 {
		t.Errorf("WatchJob timed %d times, want 1", n)
	}
	if n := histogramCount(t, fams, "dampfront_rpc_duration_seconds", map[string]string{"service": svc, "method": "GetFront", "type": "unary"}); n != 1 {
		t.Errorf("GetFront timed %d times, want 1", n)
	}
	if fams["go_goroutines"] == nil || fams["process_cpu_seconds_total"] == nil {
		t.Error("the Go runtime's and the process's metrics are missing")
	}
}

// fakeStore answers the one query of the metrics' store collector.
type fakeStore struct {
	jobs.Store
	counts *jobs.JobCountsResult
	err    error
}

func (f *fakeStore) JobCounts(ctx context.Context, p *jobs.JobCountsParams) (*jobs.JobCountsResult, error) {
	if f.err != nil {
		return nil, f.err
	}
	return f.counts, nil
}

// scrapeCollector serves a storeCollector on store whose clock reads now,
// and scrapes it once.
func scrapeCollector(t *testing.T, store jobs.Store, now time.Time) map[string]*dto.MetricFamily {
	t.Helper()
	m := NewMetrics(MetricsOptions{Logger: slog.New(slog.DiscardHandler)})
	if err := m.reg.Register(&storeCollector{store: store, timeout: time.Second, now: func() time.Time { return now }, logger: m.logger}); err != nil {
		t.Fatal(err)
	}
	web := httptest.NewServer(m.Handler()) // 127.0.0.1
	t.Cleanup(web.Close)
	return scrape(t, web.URL)
}

// checkStoreGauges compares the store's gauges of a scrape with the
// counts and the checkpoint age wanted.
func checkStoreGauges(t *testing.T, fams map[string]*dto.MetricFamily, counts map[jobs.State]int, age float64) {
	t.Helper()
	if got := value(t, fams, "dampfront_store_up", nil); got != 1 {
		t.Errorf("dampfront_store_up = %v, want 1", got)
	}
	for _, st := range jobs.States {
		if got := value(t, fams, "dampfront_jobs", map[string]string{"state": string(st)}); got != float64(counts[st]) {
			t.Errorf("dampfront_jobs{state=%q} = %v, want %d", st, got, counts[st])
		}
	}
	if got := value(t, fams, "dampfront_checkpoint_age_seconds", nil); got != age {
		t.Errorf("dampfront_checkpoint_age_seconds = %v, want %v", got, age)
	}
}

// TestStoreCollector checks the gauges made from fixed store answers; the
// expected ages are the arithmetic of the times given.
func TestStoreCollector(t *testing.T) {
	t.Parallel()
	now := time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)
	byState := func(q, r, s, f, c int) map[jobs.State]int {
		return map[jobs.State]int{jobs.StateQueued: q, jobs.StateRunning: r, jobs.StateSucceeded: s, jobs.StateFailed: f, jobs.StateCancelled: c}
	}
	cases := []struct {
		name  string
		store *fakeStore
		age   float64 // -1: the store is down
	}{
		{"none running", &fakeStore{counts: &jobs.JobCountsResult{ByState: byState(1, 0, 40, 2, 3)}}, 0},
		{"age of the oldest checkpoint", &fakeStore{counts: &jobs.JobCountsResult{ByState: byState(0, 2, 5, 0, 0),
			OldestRunningSince: now.Add(-90 * time.Second)}}, 90},
		// A checkpoint written by a process whose clock runs ahead.
		{"a time ahead of the clock is no age", &fakeStore{counts: &jobs.JobCountsResult{ByState: byState(0, 1, 0, 0, 0),
			OldestRunningSince: now.Add(5 * time.Second)}}, 0},
		{"store down", &fakeStore{err: errors.New("database is locked")}, -1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			fams := scrapeCollector(t, tc.store, now)
			if tc.age < 0 {
				if got := value(t, fams, "dampfront_store_up", nil); got != 0 {
					t.Errorf("dampfront_store_up = %v with the store down, want 0", got)
				}
				if fams["dampfront_jobs"] != nil || fams["dampfront_checkpoint_age_seconds"] != nil {
					t.Error("job gauges served although the store could not be read")
				}
				return
			}
			checkStoreGauges(t, fams, tc.store.counts.ByState, tc.age)
		})
	}
}

// TestStoreCollectorOnStore scrapes the collector on a real SQLite store
// holding jobs brought to known states by the store's own transitions;
// the expected gauges are those of the construction.
func TestStoreCollectorOnStore(t *testing.T) {
	t.Parallel()
	ctx := testContext(t)
	e, err := jobs.Open(ctx, engineConfig(t.TempDir()), NewOpener(1)) // never started: no slice runs
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = e.Close() })
	st := e.Store()
	now := time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)
	ago := func(s int) time.Time { return now.Add(-time.Duration(s) * time.Second) }
	insert := func(id string) {
		t.Helper()
		if _, err := st.JobInsert(ctx, &jobs.JobInsertParams{ID: id, Spec: []byte("spec of " + id), Now: ago(3600)}); err != nil {
			t.Fatal(err)
		}
	}
	startJob := func(id string, at time.Time) {
		t.Helper()
		if _, err := st.JobStart(ctx, &jobs.JobStartParams{ID: id, Lease: "lease-" + id, Now: at}); err != nil {
			t.Fatal(err)
		}
	}
	for _, id := range []string{"queued-1", "queued-2", "running-1", "running-2", "succeeded", "failed", "cancelled"} {
		insert(id)
	}
	// running-1 started 10 min ago and checkpointed 90 s ago; running-2
	// started 40 s ago with no checkpoint: the oldest work is 90 s old.
	startJob("running-1", ago(600))
	if err := st.CheckpointSave(ctx, &jobs.CheckpointSaveParams{JobID: "running-1", Lease: "lease-running-1", Data: []byte{1}, Now: ago(90)}); err != nil {
		t.Fatal(err)
	}
	startJob("running-2", ago(40))
	for id, end := range map[string]jobs.State{"succeeded": jobs.StateSucceeded, "failed": jobs.StateFailed} {
		startJob(id, ago(1800))
		if _, err := st.JobFinish(ctx, &jobs.JobFinishParams{ID: id, Lease: "lease-" + id, State: end, Now: ago(1200)}); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := st.JobCancelRequest(ctx, &jobs.JobCancelRequestParams{ID: "cancelled", Now: ago(60)}); err != nil {
		t.Fatal(err)
	}
	want := map[jobs.State]int{jobs.StateQueued: 2, jobs.StateRunning: 2, jobs.StateSucceeded: 1, jobs.StateFailed: 1, jobs.StateCancelled: 1}
	checkStoreGauges(t, scrapeCollector(t, st, now), want, 90)
}

func TestSplitMethod(t *testing.T) {
	t.Parallel()
	// gRPC's full method names are "/package.Service/Method" (gRPC over
	// HTTP/2, the :path of a call).
	cases := []struct{ in, service, method string }{
		{"/dampfront.v1.DampfrontService/GetJob", "dampfront.v1.DampfrontService", "GetJob"},
		{"/grpc.health.v1.Health/Check", "grpc.health.v1.Health", "Check"},
		{"odd", "unknown", "odd"},
	}
	for _, c := range cases {
		if s, m := splitMethod(c.in); s != c.service || m != c.method {
			t.Errorf("splitMethod(%q) = %q, %q, want %q, %q", c.in, s, m, c.service, c.method)
		}
	}
}
