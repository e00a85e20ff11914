package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"runtime/debug"
	"strings"
	"sync"
	"time"

	"google.golang.org/grpc"

	"dampfront/api"
	"dampfront/jobs"
)

// engineFlags configure the job engine of serve, worker and migrate; each
// flag's default comes from its environment variable when that is set.
type engineFlags struct {
	database        string
	workers         int
	evalWorkers     int
	slice           time.Duration
	checkpointEvery time.Duration
	stopTimeout     time.Duration
	nodeID          string
	maxSpecBytes    int
	logLevel        string
	logFormat       string
	migrate         bool
	gcPercent       int
}

// defaultDatabase is the embedded SQLite file of serve and worker.
const defaultDatabase = "dampfront.db"

// addEngineFlags declares the engine's flags; withWorkers adds those that
// matter only to a process that works jobs.
func addEngineFlags(fs *flagSet, e *env, withWorkers bool) (*engineFlags, error) {
	f := &engineFlags{}
	fs.StringVar(&f.database, "database", envOr(e, "DAMPFRONT_DATABASE", defaultDatabase),
		"SQLite file `path` (or sqlite:PATH), or a postgres:// URL shared by several hosts ($DAMPFRONT_DATABASE)")
	fs.StringVar(&f.logLevel, "log-level", envOr(e, "DAMPFRONT_LOG_LEVEL", "info"), "log `level`: debug, info, warn or error ($DAMPFRONT_LOG_LEVEL)")
	fs.StringVar(&f.logFormat, "log-format", envOr(e, "DAMPFRONT_LOG_FORMAT", "text"), "log `format` on standard error: text or json ($DAMPFRONT_LOG_FORMAT)")
	f.migrate = true
	if !withWorkers {
		return f, nil
	}
	d := &envDefaults{e: e, cmd: fs.name}
	fs.BoolVar(&f.migrate, "migrate", d.bool("DAMPFRONT_MIGRATE", true), "create or upgrade the tables at start; false (PostgreSQL only) checks that dampfront migrate has run, for a database role without DDL rights ($DAMPFRONT_MIGRATE)")
	fs.IntVar(&f.workers, "workers", d.int("DAMPFRONT_WORKERS", 1), "jobs this process works at once; 0 serves the API only ($DAMPFRONT_WORKERS)")
	fs.IntVar(&f.evalWorkers, "eval-workers", d.int("DAMPFRONT_EVAL_WORKERS", 0), "evaluations each job runs at once; 0 means one per CPU ($DAMPFRONT_EVAL_WORKERS)")
	fs.DurationVar(&f.slice, "slice", d.duration("DAMPFRONT_SLICE", jobs.DefaultSliceDuration), "wall time of one slice of a job before it checkpoints and requeues ($DAMPFRONT_SLICE)")
	fs.DurationVar(&f.checkpointEvery, "checkpoint-interval", d.duration("DAMPFRONT_CHECKPOINT_INTERVAL", jobs.DefaultCheckpointInterval), "wall time between checkpoints inside a slice: the most work a crash loses ($DAMPFRONT_CHECKPOINT_INTERVAL)")
	fs.DurationVar(&f.stopTimeout, "stop-timeout", d.duration("DAMPFRONT_STOP_TIMEOUT", jobs.DefaultStopTimeout), "on SIGTERM, time allowed to checkpoint and hand running jobs back ($DAMPFRONT_STOP_TIMEOUT)")
	fs.IntVar(&f.gcPercent, "gc-percent", d.int("DAMPFRONT_GC_PERCENT", gcPercentDefault(e)), "the Go collector runs when the heap has grown by this `percent` of its live data (as GOGC); 0 leaves the runtime's setting ($DAMPFRONT_GC_PERCENT; 0 by default when GOGC is set)")
	fs.StringVar(&f.nodeID, "node-id", envOr(e, "DAMPFRONT_NODE_ID", ""), "`name` of this host or container, unique among the workers; default the host name ($DAMPFRONT_NODE_ID)")
	fs.IntVar(&f.maxSpecBytes, "max-spec-bytes", d.int("DAMPFRONT_MAX_SPEC_BYTES", jobs.DefaultMaxSpecBytes), "largest job spec accepted ($DAMPFRONT_MAX_SPEC_BYTES)")
	if d.err != nil {
		return nil, d.err
	}
	return f, nil
}

func (f *engineFlags) check(cmd string) error {
	if f.workers < 0 || f.evalWorkers < 0 || f.maxSpecBytes < 0 {
		return usagef(cmd, "--workers, --eval-workers and --max-spec-bytes must not be negative")
	}
	if f.gcPercent < 0 {
		return usagef(cmd, "--gc-percent must not be negative (0 leaves the Go runtime's setting)")
	}
	if f.slice < 0 || f.stopTimeout < 0 {
		return usagef(cmd, "--slice and --stop-timeout must not be negative")
	}
	if f.logFormat != "text" && f.logFormat != "json" {
		return usagef(cmd, "--log-format %q is not text or json", f.logFormat)
	}
	if _, err := parseLevel(f.logLevel); err != nil {
		return usagef(cmd, "%v", err)
	}
	return nil
}

func parseLevel(s string) (slog.Level, error) {
	var l slog.Level
	if err := l.UnmarshalText([]byte(s)); err != nil {
		return 0, fmt.Errorf("--log-level %q is not debug, info, warn or error", s)
	}
	return l, nil
}

// logger builds the process logger on w.
func (f *engineFlags) logger(w io.Writer) *slog.Logger {
	level, _ := parseLevel(f.logLevel)
	opts := &slog.HandlerOptions{Level: level}
	if f.logFormat == "json" {
		return slog.New(slog.NewJSONHandler(w, opts))
	}
	return slog.New(slog.NewTextHandler(w, opts))
}

// jobsConfig is the engine configuration of the flags.
func (f *engineFlags) jobsConfig(log *slog.Logger) jobs.Config {
	return jobs.Config{
		DatabaseURL:        f.database,
		Workers:            f.workers,
		SliceDuration:      f.slice,
		CheckpointInterval: f.checkpointEvery,
		StopTimeout:        f.stopTimeout,
		MaxSpecBytes:       f.maxSpecBytes,
		NodeID:             f.nodeID,
		Logger:             log,
		SkipMigrate:        !f.migrate,
	}
}

// defaultGCPercent is the collector's heap growth for a process that
// works jobs, against the runtime's 100. What such a process keeps is
// mostly long-lived (a refinement's road inputs, some 15 MB a road case,
// and the front) and it allocates little while it works (about 5 MB/s
// refining on two cores), so collecting at half the growth costs little
// CPU and keeps the heap nearer its live data: refining a 586-point front
// (README, "Refinement on the nonlinear car") the peak resident memory
// fell by some 30 MB. A project choice from that measurement.
const defaultGCPercent = 50

// gcPercentDefault is --gc-percent's default: defaultGCPercent, or 0
// (leave it to the runtime) when the environment sets GOGC.
func gcPercentDefault(e *env) int {
	if e.getenv("GOGC") != "" {
		return 0
	}
	return defaultGCPercent
}

// applyGC sets the collector's heap growth when --gc-percent is not 0.
func (f *engineFlags) applyGC() { setGCPercent(f.gcPercent) }

// setGCPercent sets the collector's heap growth to percent, or leaves the
// runtime's when percent is 0.
func setGCPercent(percent int) {
	if percent > 0 {
		debug.SetGCPercent(percent)
	}
}

// openEngine opens (and migrates) the database and returns the engine,
// not yet started.
func openEngine(ctx context.Context, cfg jobs.Config, evalWorkers int) (*jobs.Engine, error) {
	eng, err := jobs.Open(ctx, cfg, api.NewOpener(evalWorkers))
	if err != nil {
		return nil, fmt.Errorf("open database %s: %w", redactURL(cfg.DatabaseURL), err)
	}
	return eng, nil
}

// redactURL hides a password in a postgres:// URL for logs and errors.
func redactURL(u string) string {
	if !strings.Contains(u, "://") {
		return u
	}
	scheme, rest, _ := strings.Cut(u, "://")
	at := strings.LastIndexByte(rest, '@')
	if at < 0 {
		return u
	}
	user, _, _ := strings.Cut(rest[:at], ":")
	return scheme + "://" + user + ":***@" + rest[at+1:]
}

// service is a running engine and, unless it is a worker alone, the gRPC
// server over it.
type service struct {
	eng    *jobs.Engine
	log    *slog.Logger
	lis    net.Listener
	cancel context.CancelFunc // ends serving
	served chan error         // Serve's result
	stop   time.Duration      // bound of the engine's graceful stop
}

// startService starts eng (releasing slices left by dead processes of
// this node) and, with lis, serves the API on it, with the gRPC options
// grpcOpts, until stop.
func startService(ctx context.Context, eng *jobs.Engine, lis net.Listener, opt api.Options, stopTimeout time.Duration, log *slog.Logger, grpcOpts ...grpc.ServerOption) (*service, error) {
	released, err := eng.Start(ctx)
	if err != nil {
		return nil, err
	}
	if released > 0 {
		log.Info("resuming jobs of a previous process", "slices", released)
	}
	s := &service{eng: eng, log: log, lis: lis, stop: stopTimeout}
	if lis == nil {
		return s, nil
	}
	srv, err := api.NewServer(eng, opt)
	if err != nil {
		return nil, err
	}
	sctx, cancel := context.WithCancel(context.WithoutCancel(ctx))
	s.cancel = cancel
	s.served = make(chan error, 1)
	go func() { s.served <- srv.Serve(sctx, lis, grpcOpts...) }()
	return s, nil
}

// shutdown stops serving and working at the same time: the gRPC server
// drains its calls while running slices checkpoint and hand their jobs
// back; then the database is closed.
func (s *service) shutdown() error {
	var wg sync.WaitGroup
	var serveErr, stopErr error
	if s.cancel != nil {
		wg.Add(1)
		go func() {
			defer wg.Done()
			s.cancel()
			serveErr = <-s.served
		}()
	}
	wg.Add(1)
	go func() {
		defer wg.Done()
		ctx, cancel := context.WithTimeout(context.Background(), s.stop+5*time.Second)
		defer cancel()
		stopErr = s.eng.Stop(ctx)
	}()
	wg.Wait()
	closeErr := s.eng.Close()
	return errors.Join(serveErr, stopErr, closeErr)
}

// writeAddrFile writes the listening address to path atomically, for
// scripts and tests that let the system choose the port.
func writeAddrFile(path, addr string) error {
	tmp := path + ".tmp"
	if err := os.WriteFile(tmp, []byte(addr+"\n"), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp, path)
}
