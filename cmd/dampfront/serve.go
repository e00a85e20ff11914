package main

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"os"
	"os/signal"
	"syscall"
	"time"

	"dampfront/api"
)

var serveCommand = &command{name: "serve", synopsis: "[flags]",
	summary: "run the gRPC server with an embedded worker (SQLite file by default)", about: serveAbout, flags: bindServe}

// serveAbout is the help text of serve.
const serveAbout = `
Runs the DampfrontService (gRPC, with the standard health service and
server reflection) and, unless --workers is 0, works jobs in the same
process. The database is a SQLite file by default, created and migrated
on first use; with a postgres:// URL any number of serve and worker
processes on any number of hosts share it. Jobs left running by a process
of this node that died are resumed from their last checkpoint at start.
SIGINT or SIGTERM stops it: running jobs checkpoint and are handed back
within --stop-timeout.

With --tokens every call but health and reflection needs a bearer token
of the file (make them with 'dampfront token new'), whose role decides
what it may do; without, the server listens on a loopback address only,
unless --insecure-no-auth. --tls-cert and --tls-key serve TLS. SIGHUP
reads the tokens file and the certificate again and swaps them in if they
all read, for new calls and connections (a bad file is logged and the
ones in use stay).

--http-addr also serves a read-only job page (jobs, progress, fronts,
damper curves; the same tokens, as a bearer header or a login form's
cookie) and Prometheus metrics at /metrics (job counts, slice and call
times; no token needed), off by default.`

func bindServe(fs *flagSet, e *env) (runFunc, error) {
	addr := fs.String("addr", envOr(e, "DAMPFRONT_ADDR", defaultAddr), "listen address host:port; port 0 picks a free one ($DAMPFRONT_ADDR)")
	addrFile := fs.String("addr-file", "", "write the address actually listened on to this `file`")
	ef, err := addEngineFlags(fs, e, true)
	if err != nil {
		return nil, err
	}
	lf, err := addLimitFlags(fs, e)
	if err != nil {
		return nil, err
	}
	sf := addServerSecurityFlags(fs, e)
	wf := addWebFlags(fs, e)
	return func(ctx context.Context, e *env, in *parsed) error {
		if err := ef.check("serve"); err != nil {
			return err
		}
		if err := lf.check("serve"); err != nil {
			return err
		}
		sec, err := sf.load("serve", *addr)
		if err != nil {
			return err
		}
		if err := wf.check(sec, sf.insecureNoAuth); err != nil {
			return err
		}
		ef.applyGC()
		log := ef.logger(e.stderr)
		cfg := ef.jobsConfig(log)
		wf.configure(&cfg, log)
		eng, err := openEngine(ctx, cfg, ef.evalWorkers)
		if err != nil {
			return err
		}
		lis, err := net.Listen("tcp", *addr)
		if err != nil {
			_ = eng.Close()
			return fmt.Errorf("listen on %s: %w", *addr, err)
		}
		opt := lf.options()
		opt.Logger = log
		opt.MaxSpecBytes = cfg.MaxSpecBytes // one spec limit for the engine and every call carrying a spec
		sec.apply(&opt)
		svc, err := startService(ctx, eng, lis, opt, ef.stopTimeout, log, wf.grpcOptions()...)
		if err != nil {
			_ = lis.Close()
			_ = eng.Close()
			return err
		}
		bound := lis.Addr().String()
		if *addrFile != "" {
			if err := writeAddrFile(*addrFile, bound); err != nil {
				_ = svc.shutdown()
				return fmt.Errorf("write --addr-file: %w", err)
			}
		}
		log.Info("serving", "address", bound, "database", redactURL(ef.database), "backend", eng.Backend(), "workers", ef.workers)
		sec.logStart(log, bound)
		pg, err := wf.start(eng, opt, sec.tls, log)
		if err != nil {
			_ = svc.shutdown()
			return err
		}
		waitServing(ctx, svc, func() { sf.reload(sec, log) }, log, ef.stopTimeout)
		if err := errors.Join(pg.shutdown(pageStopTimeout), svc.shutdown()); err != nil {
			return err
		}
		log.Info("stopped")
		return nil
	}, nil
}

// waitServing waits until ctx ends or the service stops serving; each
// SIGHUP meanwhile calls reload (the tokens file and the certificate).
func waitServing(ctx context.Context, svc *service, reload func(), log *slog.Logger, stopTimeout time.Duration) {
	hup := make(chan os.Signal, 1)
	signal.Notify(hup, syscall.SIGHUP)
	defer signal.Stop(hup)
	for {
		select {
		case <-hup:
			reload()
		case <-ctx.Done():
			log.Info("stopping: running jobs checkpoint and are handed back", "timeout", stopTimeout)
			return
		case err := <-svc.served:
			svc.served <- err // shutdown reads it again
			log.Error("serving ended", "error", err)
			return
		}
	}
}

// limitFlags are the API server's limits.
type limitFlags struct {
	maxJobWork     int64
	maxGridPoints  int
	maxSyncWork    int
	maxEvaluations int
	maxMessage     int
	rpcTimeout     time.Duration
}

func addLimitFlags(fs *flagSet, e *env) (*limitFlags, error) {
	l := &limitFlags{}
	d := &envDefaults{e: e, cmd: fs.name}
	fs.Int64Var(&l.maxJobWork, "max-job-work", int64(d.int("DAMPFRONT_MAX_JOB_WORK", api.DefaultMaxJobWork)), "largest job accepted, in case evaluations: population x islands x generations x cases, plus the polish and the refinement (README) ($DAMPFRONT_MAX_JOB_WORK)")
	fs.IntVar(&l.maxGridPoints, "max-grid-points", d.int("DAMPFRONT_MAX_GRID_POINTS", api.DefaultMaxGridPoints), "finest frequency grid of a spec, in points ($DAMPFRONT_MAX_GRID_POINTS)")
	fs.IntVar(&l.maxSyncWork, "max-sync-work", d.int("DAMPFRONT_MAX_SYNC_WORK", api.DefaultMaxSyncWork), "largest eval call, as setups x road cases ($DAMPFRONT_MAX_SYNC_WORK)")
	fs.IntVar(&l.maxEvaluations, "max-concurrent-evaluations", d.int("DAMPFRONT_MAX_CONCURRENT_EVALUATIONS", 0), "EvaluateSetups, CompareSetup and VerifySetup calls served at once; 0 means one per CPU ($DAMPFRONT_MAX_CONCURRENT_EVALUATIONS)")
	fs.IntVar(&l.maxMessage, "max-message-bytes", d.int("DAMPFRONT_MAX_MESSAGE_BYTES", api.DefaultMaxMessageBytes), "largest gRPC request or response ($DAMPFRONT_MAX_MESSAGE_BYTES)")
	fs.DurationVar(&l.rpcTimeout, "rpc-timeout", d.duration("DAMPFRONT_RPC_TIMEOUT", api.DefaultRPCTimeout), "longest a call other than watch may run on the server, whatever the client's deadline; 0 for no limit ($DAMPFRONT_RPC_TIMEOUT)")
	if d.err != nil {
		return nil, d.err
	}
	return l, nil
}

func (l *limitFlags) check(cmd string) error {
	if l.maxJobWork <= 0 || l.maxGridPoints <= 0 || l.maxSyncWork <= 0 || l.maxMessage <= 0 || l.maxEvaluations < 0 || l.rpcTimeout < 0 {
		return usagef(cmd, "--max-job-work, --max-grid-points, --max-sync-work and --max-message-bytes must be positive, --max-concurrent-evaluations and --rpc-timeout not negative")
	}
	return nil
}

func (l *limitFlags) options() api.Options {
	o := api.Options{
		MaxJobWork:               l.maxJobWork,
		MaxGridPoints:            l.maxGridPoints,
		MaxSyncWork:              l.maxSyncWork,
		MaxConcurrentEvaluations: l.maxEvaluations,
		MaxMessageBytes:          l.maxMessage,
		RPCTimeout:               l.rpcTimeout,
	}
	if l.rpcTimeout == 0 {
		o.RPCTimeout = -1 // api.Options: negative is no limit
	}
	return o
}
