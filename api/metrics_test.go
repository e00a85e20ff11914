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

// fakeStore answers the two queries of the metrics' store collector.
type fakeStore struct {
	jobs.Store
	list        []*jobs.Job
	checkpoints map[string]time.Time
	err         error
}

func (f *fakeStore) JobList(ctx context.Context, p *jobs.JobListParams) (*jobs.JobListResult, error) {
	if f.err != nil {
		return nil, f.err
	}
	return &jobs.JobListResult{Jobs: f.list}, nil
}

func (f *fakeStore) CheckpointGet(ctx context.Context, p *jobs.CheckpointGetParams) (*jobs.Checkpoint, error) {
	at, ok := f.checkpoints[p.JobID]
	if !ok {
		return nil, &jobs.NotFoundError{Resource: "checkpoint", ID: p.JobID}
	}
	return &jobs.Checkpoint{JobID: p.JobID, SavedAt: at}, nil
}

// TestStoreCollector checks the checkpoint age and the job counts on a
// store whose answers are fixed; the expected values are the arithmetic
// of the times given.
func TestStoreCollector(t *testing.T) {
	t.Parallel()
	now := time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)
	ago := func(s int) time.Time { return now.Add(-time.Duration(s) * time.Second) }
	cases := []struct {
		name    string
		store   *fakeStore
		up      float64
		age     float64
		running float64
	}{
		{"none running", &fakeStore{list: []*jobs.Job{{ID: "a", State: jobs.StateSucceeded}}}, 1, 0, 0},
		{"oldest checkpoint wins", &fakeStore{
			list: []*jobs.Job{
				{ID: "a", State: jobs.StateRunning, StartedAt: ago(600)},
				{ID: "b", State: jobs.StateRunning, StartedAt: ago(900)},
				{ID: "c", State: jobs.StateQueued},
			},
			checkpoints: map[string]time.Time{"a": ago(30), "b": ago(12)},
		}, 1, 30, 2},
		{"a job without checkpoint counts from its start", &fakeStore{
			list: []*jobs.Job{
				{ID: "a", State: jobs.StateRunning, StartedAt: ago(600)},
				{ID: "b", State: jobs.StateRunning, StartedAt: ago(50)},
			},
			checkpoints: map[string]time.Time{"a": ago(30)},
		}, 1, 50, 2},
		{"store down", &fakeStore{err: errors.New("database is locked")}, 0, -1, -1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			m := NewMetrics(MetricsOptions{Logger: slog.New(slog.DiscardHandler)})
			if err := m.reg.Register(&storeCollector{store: tc.store, timeout: time.Second, now: func() time.Time { return now }, logger: m.logger}); err != nil {
				t.Fatal(err)
			}
			web := httptest.NewServer(m.Handler())
			defer web.Close()
			fams := scrape(t, web.URL)
			if got := value(t, fams, "dampfront_store_up", nil); got != tc.up {
				t.Errorf("dampfront_store_up = %v, want %v", got, tc.up)
			}
			if tc.up == 0 {
				if fams["dampfront_jobs"] != nil || fams["dampfront_checkpoint_age_seconds"] != nil {
					t.Error("job gauges served although the store could not be read")
				}
				return
			}
			if got := value(t, fams, "dampfront_checkpoint_age_seconds", nil); got != tc.age {
				t.Errorf("dampfront_checkpoint_age_seconds = %v, want %v", got, tc.age)
			}
			if got := value(t, fams, "dampfront_jobs", map[string]string{"state": "running"}); got != tc.running {
				t.Errorf("dampfront_jobs{state=running} = %v, want %v", got, tc.running)
			}
		})
	}
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
