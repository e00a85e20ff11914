package main

import (
	"context"
	"errors"

	"dampfront/api"
)

var workerCommand = &command{name: "worker", synopsis: "[flags]",
	summary: "work jobs from the database without serving the API", about: workerAbout, flags: bindWorker}

// workerAbout is the help text of worker.
const workerAbout = `
Works jobs queued in the database, without the API: start any number of
workers on any number of hosts against one postgres:// database (each with
its own --node-id), or beside a serve --workers 0 on the same SQLite file.
A job whose worker dies is picked up by another from its last checkpoint.
SIGINT or SIGTERM stops it: running jobs checkpoint and are handed back
within --stop-timeout.

--health-addr serves the standard gRPC health service alone, for a
liveness probe: SERVING while the worker works, NOT_SERVING from the
signal on. It says the process is alive, not that the database is.
--metrics-addr serves Prometheus /metrics of this worker's slices
(generations, evaluations, slice times by outcome).`

func bindWorker(fs *flagSet, e *env) (runFunc, error) {
	ef, err := addEngineFlags(fs, e, true)
	if err != nil {
		return nil, err
	}
	hf := addHealthFlags(fs, e)
	mf := addMetricsFlags(fs, e)
	return func(ctx context.Context, e *env, in *parsed) error {
		if err := ef.check("worker"); err != nil {
			return err
		}
		if ef.workers < 1 {
			return usagef("worker", "--workers must be at least 1")
		}
		if err := hf.check(); err != nil {
			return err
		}
		if err := mf.check(); err != nil {
			return err
		}
		ef.applyGC()
		log := ef.logger(e.stderr)
		cfg := ef.jobsConfig(log)
		mf.configure(&cfg, log)
		hp, err := hf.listen()
		if err != nil {
			return err
		}
		mp, err := mf.listen(log)
		if err != nil {
			return errors.Join(err, hp.close())
		}
		eng, err := openEngine(ctx, cfg, ef.evalWorkers)
		if err != nil {
			return errors.Join(err, mp.close(), hp.close())
		}
		svc, err := startService(ctx, eng, nil, api.Options{}, ef.stopTimeout, log)
		if err != nil {
			_ = eng.Close()
			return errors.Join(err, mp.close(), hp.close())
		}
		hp.working()
		attrs := []any{"database", redactURL(ef.database), "backend", eng.Backend(), "workers", ef.workers}
		if hp != nil {
			attrs = append(attrs, "health", hp.addr())
		}
		if mp != nil {
			attrs = append(attrs, "metrics", "http://"+mp.addr()+"/metrics")
		}
		log.Info("working", attrs...)
		select {
		case <-ctx.Done():
		case <-hp.ended():
			// Without its health service the worker would be restarted by
			// its liveness probe; stopping here hands its jobs back first.
			log.Error("health service ended; stopping", "error", hp.err)
		}
		// NOT_SERVING before the running jobs checkpoint, so that a probe
		// sees the worker going away for the whole of its stop.
		hp.stopping()
		log.Info("stopping: running jobs checkpoint and are handed back", "timeout", ef.stopTimeout)
		if err := errors.Join(svc.shutdown(), mp.close(), hp.close()); err != nil {
			return err
		}
		log.Info("stopped")
		return nil
	}, nil
}
