package main

import (
	"context"

	"dampfront/api"
)

var workerCommand = &command{
	name:    "worker",
	summary: "work jobs from the database without serving the API",
	run:     runWorker,
}

func runWorker(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, "worker", "[flags]", `
Works jobs queued in the database, without the API: start any number of
workers on any number of hosts against one postgres:// database (each with
its own --node-id), or beside a serve --workers 0 on the same SQLite file.
A job whose worker dies is picked up by another from its last checkpoint.
SIGINT or SIGTERM stops it: running jobs checkpoint and are handed back
within --stop-timeout.`)
	ef, err := addEngineFlags(fs, e, true)
	if err != nil {
		return err
	}
	if _, err := fs.parse(args, 0, 0); err != nil {
		return err
	}
	if err := ef.check("worker"); err != nil {
		return err
	}
	if ef.workers < 1 {
		return usagef("worker", "--workers must be at least 1")
	}
	log := ef.logger(e.stderr)
	eng, err := openEngine(ctx, ef.jobsConfig(log), ef.evalWorkers)
	if err != nil {
		return err
	}
	svc, err := startService(ctx, eng, nil, api.Options{}, ef.stopTimeout, log)
	if err != nil {
		_ = eng.Close()
		return err
	}
	log.Info("working", "database", redactURL(ef.database), "backend", eng.Backend(), "workers", ef.workers)
	<-ctx.Done()
	log.Info("stopping: running jobs checkpoint and are handed back", "timeout", ef.stopTimeout)
	if err := svc.shutdown(); err != nil {
		return err
	}
	log.Info("stopped")
	return nil
}
