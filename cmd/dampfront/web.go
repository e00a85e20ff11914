package main

import (
	"context"
	"crypto/tls"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"time"

	"google.golang.org/grpc"

	"dampfront/api"
	"dampfront/api/web"
	"dampfront/jobs"
)

// The read-only job page and the Prometheus metrics, on an HTTP port of
// their own: off in serve unless --http-addr is given, on in the demo.

// webFlags are the page's flags of serve and demo.
type webFlags struct {
	cmd       string
	addr      string
	addrFile  string
	servePage bool // demo: keep serving the page after the demo, until interrupted

	metrics *api.Metrics // made by configure when the page is on
}

// addWebFlags declares serve's --http-addr (default off) and
// --http-addr-file.
func addWebFlags(fs *flagSet, e *env) *webFlags {
	w := &webFlags{cmd: fs.name}
	fs.StringVar(&w.addr, "http-addr", envOr(e, "DAMPFRONT_HTTP_ADDR", ""),
		"serve the read-only job page and Prometheus /metrics on this host:port; empty serves none ($DAMPFRONT_HTTP_ADDR)")
	fs.StringVar(&w.addrFile, "http-addr-file", "", "write the address the page actually listens on to this `file`")
	return w
}

// addDemoWebFlags declares the demo's --http-addr (a free port of
// 127.0.0.1 by default) and --serve-page.
func addDemoWebFlags(fs *flagSet) *webFlags {
	w := &webFlags{cmd: fs.name}
	fs.StringVar(&w.addr, "http-addr", "127.0.0.1:0", "serve the job page and /metrics on this host:port while the demo runs; empty serves none")
	fs.BoolVar(&w.servePage, "serve-page", false, "keep serving the job page after the demo, until interrupted (Ctrl-C)")
	return w
}

// check refuses a page that would show every job to anyone who reaches
// it: without --tokens the page must listen on loopback, as the API must,
// unless --insecure-no-auth.
func (w *webFlags) check(sec *serverSecurity, insecureNoAuth bool) error {
	if w.addr == "" || sec.tokens != nil || insecureNoAuth || loopbackAddr(w.addr) {
		return nil
	}
	return usagef(w.cmd, "--http-addr %s is not a loopback address: give --tokens FILE so that the page asks for them, or --insecure-no-auth to show every job to anyone who reaches it", w.addr)
}

// configure makes the metrics and hooks them to the engine's slices when
// the page is on; call it before the engine opens.
func (w *webFlags) configure(cfg *jobs.Config, log *slog.Logger) {
	if w.addr == "" {
		return
	}
	w.metrics = api.NewMetrics(api.MetricsOptions{Logger: log})
	cfg.OnSlice = w.metrics.ObserveSlice
}

// grpcOptions count and time the API's calls when the page is on.
func (w *webFlags) grpcOptions() []grpc.ServerOption {
	if w.metrics == nil {
		return nil
	}
	return w.metrics.ServerOptions()
}

// page is the running job page; a nil *page is none.
type page struct {
	url   string // http://host:port/
	srv   *http.Server
	local *web.Local
	done  chan error
	log   *slog.Logger
}

// Time bounds of the page's connections: reading a request's headers,
// and keeping an idle connection open.
const (
	pageHeaderTimeout = 10 * time.Second
	pageIdleTimeout   = 2 * time.Minute
)

// start serves the page and /metrics on --http-addr over eng, reading
// through an in-process API server with opt (its tokens and limits; TLS
// is the page's own, from tlsConfig). It returns nil without --http-addr.
func (w *webFlags) start(eng *jobs.Engine, opt api.Options, tlsConfig *tls.Config, log *slog.Logger) (*page, error) {
	if w.addr == "" {
		return nil, nil
	}
	if err := w.metrics.CollectStore(eng.Store(), api.MetricsOptions{}); err != nil {
		return nil, err
	}
	opt.TLS = nil // the in-process connection never leaves the process
	srv, err := api.NewServer(eng, opt)
	if err != nil {
		return nil, err
	}
	local, err := web.NewLocal(srv)
	if err != nil {
		return nil, err
	}
	h, err := web.New(local.Client(), web.Options{Logger: log, Instrument: w.metrics.InstrumentHandler})
	if err != nil {
		_ = local.Close()
		return nil, err
	}
	mux := http.NewServeMux()
	mux.Handle("GET /metrics", w.metrics.Handler())
	mux.Handle("/", h)
	lis, err := net.Listen("tcp", w.addr)
	if err != nil {
		_ = local.Close()
		return nil, fmt.Errorf("listen on --http-addr %s: %w", w.addr, err)
	}
	p := &page{
		srv: &http.Server{Handler: mux, ReadHeaderTimeout: pageHeaderTimeout, IdleTimeout: pageIdleTimeout,
			TLSConfig: tlsConfig, ErrorLog: slog.NewLogLogger(log.Handler(), slog.LevelWarn)},
		local: local, done: make(chan error, 1), log: log,
	}
	scheme := "http"
	if tlsConfig != nil {
		scheme = "https"
	}
	p.url = scheme + "://" + lis.Addr().String() + "/"
	go func() {
		if tlsConfig != nil {
			p.done <- p.srv.ServeTLS(lis, "", "")
		} else {
			p.done <- p.srv.Serve(lis)
		}
	}()
	if w.addrFile != "" {
		if err := writeAddrFile(w.addrFile, lis.Addr().String()); err != nil {
			_ = p.shutdown(time.Second)
			return nil, fmt.Errorf("write --http-addr-file: %w", err)
		}
	}
	log.Info("serving the job page and /metrics", "url", p.url)
	return p, nil
}

// shutdown stops the page: open requests get up to timeout to finish.
func (p *page) shutdown(timeout time.Duration) error {
	if p == nil {
		return nil
	}
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	err := p.srv.Shutdown(ctx)
	if serr := <-p.done; serr != nil && !errors.Is(serr, http.ErrServerClosed) {
		err = errors.Join(err, serr)
	}
	return errors.Join(err, p.local.Close())
}

// pageStopTimeout bounds the page's graceful stop.
const pageStopTimeout = 5 * time.Second

// jobURL is the page of job id; "" without a page.
func (p *page) jobURL(id string) string {
	if p == nil {
		return ""
	}
	return p.url + "jobs/" + id
}

// linger ends the demo's page: with keep, it serves on until ctx ends
// (Ctrl-C); without, it says how to keep it.
func (p *page) linger(ctx context.Context, w io.Writer, keep bool) {
	if p == nil {
		return
	}
	if !keep {
		fmt.Fprintf(w, "\nThe job page closes with the demo; run with --serve-page to keep it open at %s\n", p.url)
		return
	}
	fmt.Fprintf(w, "\nServing the job page at %s until interrupted (Ctrl-C).\n", p.url)
	<-ctx.Done()
}
