package api

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"strings"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/prometheus/client_golang/prometheus/collectors"
	"github.com/prometheus/client_golang/prometheus/promhttp"
	"google.golang.org/grpc"
	"google.golang.org/grpc/status"

	"dampfront/jobs"
)

// Metrics are the Prometheus metrics of a dampfront process, on a
// registry of their own with the Go runtime's and the process's:
//
//	dampfront_jobs{state}                         gauge    jobs in the store by state, read at each scrape
//	dampfront_store_up                            gauge    1 when the scrape could read the store, else 0
//	dampfront_checkpoint_age_seconds              gauge    oldest last checkpoint of a running job, s
//	dampfront_evaluations_total                   counter  setup evaluations made by this process's slices
//	dampfront_generations_total                   counter  generations completed by this process's slices
//	dampfront_slice_duration_seconds{outcome}     histogram wall time of each slice, s
//	dampfront_rpc_requests_total{service,method,code}     counter  gRPC calls handled
//	dampfront_rpc_duration_seconds{service,method,type}   histogram gRPC call time, s
//	dampfront_http_requests_total{handler,code}   counter  requests of the job page
//	dampfront_http_request_duration_seconds{handler}      histogram page request time, s
//
// Evaluations per second are rate(dampfront_evaluations_total[5m]); the
// counter advances when a slice ends (every slice duration, default
// 2 min, on a long job), so take the rate over at least twice that.
// One evaluation is one setup evaluated on every road case of its job.
//
// A process wires them in four places: ObserveSlice as the engine's
// jobs.Config.OnSlice, CollectStore with the opened engine's store,
// ServerOptions on the gRPC server and Handler on the HTTP port.
type Metrics struct {
	reg    *prometheus.Registry
	logger *slog.Logger

	evaluations prometheus.Counter
	generations prometheus.Counter
	slices      *prometheus.HistogramVec
	rpcs        *prometheus.CounterVec
	rpcSeconds  *prometheus.HistogramVec
	httpReqs    *prometheus.CounterVec
	httpSeconds *prometheus.HistogramVec
}

// MetricsOptions configure Metrics. Zero values take the defaults named.
type MetricsOptions struct {
	// ScrapeTimeout bounds the store queries of one scrape. Default 10 s,
	// Prometheus's default scrape timeout.
	ScrapeTimeout time.Duration
	// Logger receives scrape errors. Default slog.Default().
	Logger *slog.Logger
}

// DefaultScrapeTimeout is the default of MetricsOptions.ScrapeTimeout.
const DefaultScrapeTimeout = 10 * time.Second

// Histogram buckets, in seconds. RPCs run from a millisecond (GetJob) to
// minutes (a large EvaluateSetups), so the buckets grow by 4 from 1 ms to
// 262 s; slices run from tens of milliseconds (tests) to SliceDuration +
// SliceGrace (3 min by default), so they grow by 3 from 10 ms to 197 s.
var (
	rpcBuckets   = prometheus.ExponentialBuckets(0.001, 4, 10)
	sliceBuckets = prometheus.ExponentialBuckets(0.01, 3, 10)
	httpBuckets  = prometheus.ExponentialBuckets(0.001, 4, 8)
)

// NewMetrics returns the metrics with nothing observed yet; the store's
// gauges appear once CollectStore has been called.
func NewMetrics(opt MetricsOptions) *Metrics {
	if opt.Logger == nil {
		opt.Logger = slog.Default()
	}
	m := &Metrics{
		reg:    prometheus.NewRegistry(),
		logger: opt.Logger,
		evaluations: prometheus.NewCounter(prometheus.CounterOpts{
			Name: "dampfront_evaluations_total",
			Help: "Setup evaluations (one setup on every road case of its job) made by the slices this process ran, counted when each slice ends.",
		}),
		generations: prometheus.NewCounter(prometheus.CounterOpts{
			Name: "dampfront_generations_total",
			Help: "Optimiser generations completed by the slices this process ran, counted when each slice ends.",
		}),
		slices: prometheus.NewHistogramVec(prometheus.HistogramOpts{
			Name:    "dampfront_slice_duration_seconds",
			Help:    "Wall time of each slice this process ran, from the opened study to its last transaction, by how it ended.",
			Buckets: sliceBuckets,
		}, []string{"outcome"}),
		rpcs: prometheus.NewCounterVec(prometheus.CounterOpts{
			Name: "dampfront_rpc_requests_total",
			Help: "gRPC calls handled, by service, method and status code; refused and timed-out calls included.",
		}, []string{"service", "method", "code"}),
		rpcSeconds: prometheus.NewHistogramVec(prometheus.HistogramOpts{
			Name:    "dampfront_rpc_duration_seconds",
			Help:    "Time from a gRPC call's arrival to its end, by service, method and type (unary or stream).",
			Buckets: rpcBuckets,
		}, []string{"service", "method", "type"}),
		httpReqs: prometheus.NewCounterVec(prometheus.CounterOpts{
			Name: "dampfront_http_requests_total",
			Help: "Requests of the job page, by handler and HTTP status code.",
		}, []string{"handler", "code"}),
		httpSeconds: prometheus.NewHistogramVec(prometheus.HistogramOpts{
			Name:    "dampfront_http_request_duration_seconds",
			Help:    "Time to serve a request of the job page, by handler.",
			Buckets: httpBuckets,
		}, []string{"handler"}),
	}
	for _, o := range []string{jobs.SliceSucceeded, jobs.SliceFailed, jobs.SliceCancelled, jobs.SliceHandedOver, jobs.SliceError} {
		m.slices.WithLabelValues(o) // every outcome has a series from the start
	}
	m.reg.MustRegister(
		collectors.NewGoCollector(),
		collectors.NewProcessCollector(collectors.ProcessCollectorOpts{}),
		m.evaluations, m.generations, m.slices, m.rpcs, m.rpcSeconds, m.httpReqs, m.httpSeconds,
	)
	return m
}

// ObserveSlice records a finished slice; it is a jobs.Config.OnSlice.
func (m *Metrics) ObserveSlice(s jobs.SliceStats) {
	m.slices.WithLabelValues(s.Outcome).Observe(s.Duration.Seconds())
	if s.Evaluations > 0 {
		m.evaluations.Add(float64(s.Evaluations))
	}
	if s.Generations > 0 {
		m.generations.Add(float64(s.Generations))
	}
}

// CollectStore adds the gauges read from store at each scrape: jobs by
// state, and the age of the oldest last checkpoint among running jobs.
// Call it once. Each scrape makes one jobs.Store.JobCounts (two
// aggregate queries, whose cost does not grow with the jobs' specs or
// fronts), within MetricsOptions.ScrapeTimeout.
func (m *Metrics) CollectStore(store jobs.Store, opt MetricsOptions) error {
	if store == nil {
		return errors.New("api: CollectStore needs a store")
	}
	if opt.ScrapeTimeout <= 0 {
		opt.ScrapeTimeout = DefaultScrapeTimeout
	}
	return m.reg.Register(&storeCollector{store: store, timeout: opt.ScrapeTimeout, now: time.Now, logger: m.logger})
}

// Handler serves the metrics in the Prometheus text (or OpenMetrics)
// format. A failed store read is logged and reported as
// dampfront_store_up 0; the other metrics are still served.
func (m *Metrics) Handler() http.Handler {
	return promhttp.HandlerFor(m.reg, promhttp.HandlerOpts{
		ErrorLog:      slogPrinter{m.logger},
		ErrorHandling: promhttp.ContinueOnError,
		Registry:      m.reg,
	})
}

// InstrumentHandler counts and times the requests h serves under the
// name handler (a fixed name, such as "job", never a request path).
func (m *Metrics) InstrumentHandler(handler string, h http.Handler) http.Handler {
	labels := prometheus.Labels{"handler": handler}
	return promhttp.InstrumentHandlerCounter(m.httpReqs.MustCurryWith(labels),
		promhttp.InstrumentHandlerDuration(m.httpSeconds.MustCurryWith(labels), h))
}

// ServerOptions are the gRPC options that count and time every call.
// They take the server's single UnaryInterceptor and StreamInterceptor
// slots, which gRPC runs before any chained interceptor, so that calls
// refused by authentication or cut by the call deadline are counted
// too. Pass them to Server.Serve or NewGRPCServer.
func (m *Metrics) ServerOptions() []grpc.ServerOption {
	return []grpc.ServerOption{grpc.UnaryInterceptor(m.unary), grpc.StreamInterceptor(m.stream)}
}

func (m *Metrics) unary(ctx context.Context, req any, info *grpc.UnaryServerInfo, handler grpc.UnaryHandler) (any, error) {
	start := time.Now()
	resp, err := handler(ctx, req)
	m.observeRPC(info.FullMethod, "unary", start, err)
	return resp, err
}

func (m *Metrics) stream(srv any, ss grpc.ServerStream, info *grpc.StreamServerInfo, handler grpc.StreamHandler) error {
	start := time.Now()
	err := handler(srv, ss)
	m.observeRPC(info.FullMethod, "stream", start, err)
	return err
}

func (m *Metrics) observeRPC(fullMethod, kind string, start time.Time, err error) {
	service, method := splitMethod(fullMethod)
	m.rpcSeconds.WithLabelValues(service, method, kind).Observe(time.Since(start).Seconds())
	m.rpcs.WithLabelValues(service, method, status.Code(err).String()).Inc()
}

// splitMethod splits "/package.Service/Method".
func splitMethod(fullMethod string) (service, method string) {
	service, method, ok := strings.Cut(strings.TrimPrefix(fullMethod, "/"), "/")
	if !ok {
		return "unknown", fullMethod
	}
	return service, method
}

// storeCollector reads the store's gauges at each scrape.
type storeCollector struct {
	store   jobs.Store
	timeout time.Duration
	now     func() time.Time
	logger  *slog.Logger
}

var (
	jobsDesc = prometheus.NewDesc("dampfront_jobs",
		"Jobs in the store by state, read at each scrape (all processes sharing the database).", []string{"state"}, nil)
	storeUpDesc = prometheus.NewDesc("dampfront_store_up",
		"1 when the last scrape could read the job store, 0 when it could not.", nil, nil)
	checkpointAgeDesc = prometheus.NewDesc("dampfront_checkpoint_age_seconds",
		"Age of the oldest last checkpoint among running jobs (from its start for a job with none yet); 0 when no job runs. A crash loses at most this much work.", nil, nil)
)

func (c *storeCollector) Describe(ch chan<- *prometheus.Desc) {
	ch <- jobsDesc
	ch <- storeUpDesc
	ch <- checkpointAgeDesc
}

func (c *storeCollector) Collect(ch chan<- prometheus.Metric) {
	ctx, cancel := context.WithTimeout(context.Background(), c.timeout)
	defer cancel()
	counts, age, err := c.read(ctx)
	if err != nil {
		c.logger.Warn("api: metrics could not read the job store", "error", err)
		ch <- prometheus.MustNewConstMetric(storeUpDesc, prometheus.GaugeValue, 0)
		return
	}
	ch <- prometheus.MustNewConstMetric(storeUpDesc, prometheus.GaugeValue, 1)
	for _, st := range jobs.States {
		ch <- prometheus.MustNewConstMetric(jobsDesc, prometheus.GaugeValue, float64(counts[st]), string(st))
	}
	ch <- prometheus.MustNewConstMetric(checkpointAgeDesc, prometheus.GaugeValue, age.Seconds())
}

// read counts the jobs by state and finds the age of the oldest last
// checkpoint of the running ones (from its start for a job with none).
func (c *storeCollector) read(ctx context.Context) (map[jobs.State]int, time.Duration, error) {
	res, err := c.store.JobCounts(ctx, &jobs.JobCountsParams{})
	if err != nil {
		return nil, 0, fmt.Errorf("count jobs: %w", err)
	}
	var age time.Duration
	if !res.OldestRunningSince.IsZero() {
		// The time was written by whichever process ran the slice; a clock
		// ahead of this one would give a negative age.
		age = max(0, c.now().Sub(res.OldestRunningSince))
	}
	return res.ByState, age, nil
}

// slogPrinter is promhttp's error log on a slog.Logger.
type slogPrinter struct{ l *slog.Logger }

func (p slogPrinter) Println(v ...any) { p.l.Warn("api: serving metrics: " + fmt.Sprint(v...)) }
