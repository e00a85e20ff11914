package main

import (
	"context"
	"fmt"
	"net"

	"dampfront/api"
)

var serveCommand = &command{
	name:    "serve",
	summary: "run the gRPC server with an embedded worker (SQLite file by default)",
	run:     runServe,
}

func runServe(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, "serve", "[flags]", `
Runs the DampfrontService (gRPC, with the standard health service and
server reflection) and, unless --workers is 0, works jobs in the same
process. The database is a SQLite file by default, created and migrated
on first use; with a postgres:// URL any number of serve and worker
processes on any number of hosts share it. Jobs left running by a process
of this node that died are resumed from their last checkpoint at start.
SIGINT or SIGTERM stops it: running jobs checkpoint and are handed back
within --stop-timeout.

The server has no TLS or authentication of its own: keep it on loopback
or a trusted network, or put it behind a proxy that provides them.`)
	addr := fs.String("addr", envOr(e, "DAMPFRONT_ADDR", defaultAddr), "listen address host:port; port 0 picks a free one ($DAMPFRONT_ADDR)")
	addrFile := fs.String("addr-file", "", "write the address actually listened on to this `file`")
	ef, err := addEngineFlags(fs, e, true)
	if err != nil {
		return err
	}
	lf, err := addLimitFlags(fs, e)
	if err != nil {
		return err
	}
	if _, err := fs.parse(args, 0, 0); err != nil {
		return err
	}
	if err := ef.check("serve"); err != nil {
		return err
	}
	if err := lf.check("serve"); err != nil {
		return err
	}
	log := ef.logger(e.stderr)
	eng, err := openEngine(ctx, ef.jobsConfig(log), ef.evalWorkers)
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
	svc, err := startService(ctx, eng, lis, opt, ef.stopTimeout, log)
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
	select {
	case <-ctx.Done():
		log.Info("stopping: running jobs checkpoint and are handed back", "timeout", ef.stopTimeout)
	case err := <-svc.served:
		svc.served <- err // shutdown reads it again
		log.Error("serving ended", "error", err)
	}
	if err := svc.shutdown(); err != nil {
		return err
	}
	log.Info("stopped")
	return nil
}

// limitFlags are the API server's limits.
type limitFlags struct {
	maxJobWork     int64
	maxSyncWork    int
	maxEvaluations int
	maxMessage     int
}

func addLimitFlags(fs *flagSet, e *env) (*limitFlags, error) {
	l := &limitFlags{}
	jobWork, err := envInt(e, fs.name, "DAMPFRONT_MAX_JOB_WORK", api.DefaultMaxJobWork)
	if err != nil {
		return nil, err
	}
	syncWork, err := envInt(e, fs.name, "DAMPFRONT_MAX_SYNC_WORK", api.DefaultMaxSyncWork)
	if err != nil {
		return nil, err
	}
	evals, err := envInt(e, fs.name, "DAMPFRONT_MAX_CONCURRENT_EVALUATIONS", 0)
	if err != nil {
		return nil, err
	}
	msg, err := envInt(e, fs.name, "DAMPFRONT_MAX_MESSAGE_BYTES", api.DefaultMaxMessageBytes)
	if err != nil {
		return nil, err
	}
	fs.Int64Var(&l.maxJobWork, "max-job-work", int64(jobWork), "largest job accepted, as population x islands x generations x road cases ($DAMPFRONT_MAX_JOB_WORK)")
	fs.IntVar(&l.maxSyncWork, "max-sync-work", syncWork, "largest eval call, as setups x road cases ($DAMPFRONT_MAX_SYNC_WORK)")
	fs.IntVar(&l.maxEvaluations, "max-concurrent-evaluations", evals, "eval, check and compare calls served at once; 0 means one per CPU ($DAMPFRONT_MAX_CONCURRENT_EVALUATIONS)")
	fs.IntVar(&l.maxMessage, "max-message-bytes", msg, "largest gRPC request or response ($DAMPFRONT_MAX_MESSAGE_BYTES)")
	return l, nil
}

func (l *limitFlags) check(cmd string) error {
	if l.maxJobWork <= 0 || l.maxSyncWork <= 0 || l.maxMessage <= 0 || l.maxEvaluations < 0 {
		return usagef(cmd, "--max-job-work, --max-sync-work and --max-message-bytes must be positive, --max-concurrent-evaluations not negative")
	}
	return nil
}

func (l *limitFlags) options() api.Options {
	return api.Options{
		MaxJobWork:               l.maxJobWork,
		MaxSyncWork:              l.maxSyncWork,
		MaxConcurrentEvaluations: l.maxEvaluations,
		MaxMessageBytes:          l.maxMessage,
	}
}
