package main

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"strconv"
	"time"

	"dampfront/api"
	"dampfront/jobs"
)

// The worker's metrics endpoint: Prometheus /metrics over plain HTTP with
// what this worker process did (its slices, generations and evaluations,
// and the Go runtime's and process's series), so that each host of a farm
// can be scraped for its own throughput. The job counts of the database
// are left to the API server's /metrics (serve --http-addr): every worker
// would report the same numbers.

// metricsFlags are worker's --metrics-addr.
type metricsFlags struct {
	cmd     string
	addr    string
	metrics *api.Metrics // made by configure when the flag is set
}

// addMetricsFlags declares --metrics-addr, off by default.
func addMetricsFlags(fs *flagSet, e *env) *metricsFlags {
	m := &metricsFlags{cmd: fs.name}
	fs.StringVar(&m.addr, "metrics-addr", envOr(e, "DAMPFRONT_METRICS_ADDR", ""),
		"serve Prometheus /metrics of this worker's slices on this `host:port`, plain HTTP without tokens (counts and timings only, no job data); empty serves none ($DAMPFRONT_METRICS_ADDR)")
	return m
}

// check refuses an address that is not host:port with a numeric port.
func (m *metricsFlags) check() error {
	return checkListenAddr(m.cmd, "metrics-addr", m.addr)
}

// checkListenAddr refuses a non-empty flag value that is not host:port
// with a port from 0 to 65535; a port that is taken or a host that is not
// this machine's is found by the listen.
func checkListenAddr(cmd, flag, addr string) error {
	if addr == "" {
		return nil
	}
	_, port, err := net.SplitHostPort(addr)
	if err != nil {
		return usagef(cmd, "--%s %q is not host:port: %v", flag, addr, err)
	}
	if n, err := strconv.Atoi(port); err != nil || n < 0 || n > 65535 {
		return usagef(cmd, "--%s %q: port %q is not a number from 0 to 65535", flag, addr, port)
	}
	return nil
}

// configure makes the metrics and hooks them to the engine's slices when
// the flag is set; call it before the engine opens.
func (m *metricsFlags) configure(cfg *jobs.Config, log *slog.Logger) {
	if m.addr == "" {
		return
	}
	m.metrics = api.NewMetrics(api.MetricsOptions{Logger: log})
	cfg.OnSlice = m.metrics.ObserveSlice
}

// metricsEndpoint is the running /metrics server; the nil
// *metricsEndpoint (no --metrics-addr) does nothing.
type metricsEndpoint struct {
	lis  net.Listener
	srv  *http.Server
	done chan error
}

// listen binds --metrics-addr and serves /metrics on it; nil, nil
// without the flag. Like --health-addr it is bound before the database
// is opened.
func (m *metricsFlags) listen(log *slog.Logger) (*metricsEndpoint, error) {
	lis, err := listenFlag("--metrics-addr", m.addr)
	if lis == nil {
		return nil, err
	}
	mux := http.NewServeMux()
	mux.Handle("GET /metrics", m.metrics.Handler())
	ep := &metricsEndpoint{lis: lis, done: make(chan error, 1), srv: &http.Server{Handler: mux,
		ReadHeaderTimeout: pageHeaderTimeout, IdleTimeout: pageIdleTimeout,
		ErrorLog: slog.NewLogLogger(log.Handler(), slog.LevelWarn)}}
	go func() { ep.done <- ep.srv.Serve(lis) }()
	return ep, nil
}

// addr is the address listened on, or "" without an endpoint.
func (ep *metricsEndpoint) addr() string {
	if ep == nil {
		return ""
	}
	return ep.lis.Addr().String()
}

// close stops serving: a scrape in flight gets up to a second.
func (ep *metricsEndpoint) close() error {
	if ep == nil {
		return nil
	}
	ctx, cancel := context.WithTimeout(context.Background(), time.Second)
	defer cancel()
	err := ep.srv.Shutdown(ctx)
	if serr := <-ep.done; serr != nil && !errors.Is(serr, http.ErrServerClosed) {
		err = errors.Join(err, serr)
	}
	if err != nil {
		return fmt.Errorf("metrics on %s: %w", ep.addr(), err)
	}
	return nil
}
