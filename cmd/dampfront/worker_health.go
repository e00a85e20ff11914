package main

import (
	"errors"
	"fmt"
	"net"

	"google.golang.org/grpc"
	"google.golang.org/grpc/health"
	healthpb "google.golang.org/grpc/health/grpc_health_v1"
)

// The worker's health endpoint: a gRPC server with the standard health
// service (grpc.health.v1) and nothing else, so that a process that
// serves no API can still be probed for liveness by Kubernetes' native
// gRPC probe or grpc-health-probe.
//
// What it reports, for the service name "" only:
//
//	NOT_SERVING  from the listen until the engine has started
//	SERVING      while the worker works
//	NOT_SERVING  from SIGTERM (or SIGINT) on, before the running jobs
//	             checkpoint and are handed back
//	(no answer)  once the worker has exited: the listener is closed
//
// It does not follow the database. A liveness probe that failed during a
// database outage would make Kubernetes restart every worker at once,
// which cures nothing (the new ones cannot reach the database either),
// throws away the work since the last checkpoint and turns one outage
// into a restart storm; a worker left running reconnects when the
// database is back (TestFaultPostgresRestart restarts PostgreSQL under
// running workers). So the answer means only "the process is alive and
// not stopping".
//
// It is plaintext and needs no token: it tells a caller nothing but that
// status. Kubernetes' native gRPC probes cannot speak TLS anyway (see
// deploy/k8s/api-deployment.yaml).

// healthFlags are worker's --health-addr.
type healthFlags struct {
	cmd  string
	addr string
}

// addHealthFlags declares --health-addr, off by default.
func addHealthFlags(fs *flagSet, e *env) *healthFlags {
	h := &healthFlags{cmd: fs.name}
	fs.StringVar(&h.addr, "health-addr", envOr(e, "DAMPFRONT_HEALTH_ADDR", ""),
		"serve only the standard gRPC health service on this `host:port`, plaintext and without tokens, for a liveness probe: "+
			`SERVING for "" while the worker works, NOT_SERVING once it stops; it does not follow the database, `+
			"so that an outage does not make every worker restart at once; empty serves none ($DAMPFRONT_HEALTH_ADDR)")
	return h
}

// check refuses an address that is not host:port with a numeric port;
// a port that is taken or a host that is not this machine's is found by
// the listen.
func (h *healthFlags) check() error {
	return checkListenAddr(h.cmd, "health-addr", h.addr)
}

// healthEndpoint is the running health server; the nil *healthEndpoint
// (no --health-addr) does nothing.
type healthEndpoint struct {
	lis    net.Listener
	srv    *grpc.Server
	health *health.Server
	done   chan struct{} // closed when Serve has returned
	err    error         // Serve's result, set before done is closed
}

// listen binds --health-addr and serves the health service on it,
// NOT_SERVING until working is called. It returns nil, nil when the
// flag is empty. It is called before the database is opened, so that a
// port already taken fails the worker before it touches the database.
func (h *healthFlags) listen() (*healthEndpoint, error) {
	lis, err := listenFlag("--health-addr", h.addr)
	if lis == nil {
		return nil, err
	}
	hs := health.NewServer()
	hs.SetServingStatus("", healthpb.HealthCheckResponse_NOT_SERVING)
	srv := grpc.NewServer()
	healthpb.RegisterHealthServer(srv, hs)
	ep := &healthEndpoint{lis: lis, srv: srv, health: hs, done: make(chan struct{})}
	go func() {
		ep.err = srv.Serve(lis)
		close(ep.done)
	}()
	return ep, nil
}

// addr is the address listened on, or "" without an endpoint.
func (ep *healthEndpoint) addr() string {
	if ep == nil {
		return ""
	}
	return ep.lis.Addr().String()
}

// ended is closed when serving has ended, before close only if it failed
// (close returns the error); without an endpoint it is never closed.
func (ep *healthEndpoint) ended() <-chan struct{} {
	if ep == nil {
		return nil
	}
	return ep.done
}

// working reports SERVING.
func (ep *healthEndpoint) working() {
	if ep != nil {
		ep.health.SetServingStatus("", healthpb.HealthCheckResponse_SERVING)
	}
}

// stopping reports NOT_SERVING from now on, to Check and to every open
// Watch, and ignores any later working.
func (ep *healthEndpoint) stopping() {
	if ep != nil {
		ep.health.Shutdown()
	}
}

// close reports NOT_SERVING and closes the listener and every
// connection at once. Not GracefulStop: a Watch stream never ends by
// itself, and a probe's Check cut short here is of a process that is
// going away.
func (ep *healthEndpoint) close() error {
	if ep == nil {
		return nil
	}
	ep.health.Shutdown()
	ep.srv.Stop()
	<-ep.done
	if ep.err != nil && !errors.Is(ep.err, grpc.ErrServerStopped) {
		return fmt.Errorf("health service on %s: %w", ep.addr(), ep.err)
	}
	return nil
}

// listenFlag binds the address given by flag; nil, nil when addr is
// empty.
func listenFlag(flag, addr string) (net.Listener, error) {
	if addr == "" {
		return nil, nil
	}
	lis, err := net.Listen("tcp", addr)
	if err != nil {
		return nil, fmt.Errorf("listen on %s %s: %w", flag, addr, err)
	}
	return lis, nil
}
