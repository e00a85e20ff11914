package jobs

import (
	"crypto/rand"
	"encoding/binary"
	"fmt"
	"log/slog"
	"os"
	"time"
)

// Config configures an Engine. Zero values take the defaults named.
type Config struct {
	// DatabaseURL is a SQLite file path (or sqlite:PATH), the embedded
	// default, or a postgres:// URL for the multi-machine mode.
	DatabaseURL string
	// SkipMigrate (PostgreSQL only) leaves the schema alone at Open and
	// fails if it is not current: for processes whose database role may
	// not change it, after `dampfront migrate` has run. A SQLite file is
	// always migrated.
	SkipMigrate bool

	// Workers is the number of slices this process runs at once. 0 makes
	// a submit-and-read-only engine (an API server with workers elsewhere).
	Workers int

	// SliceDuration is the wall time after which a slice stops stepping,
	// checkpoints and hands the job to its next slice. Default 2 min.
	SliceDuration time.Duration
	// SliceGrace is the time allowed past SliceDuration for the last
	// generation and the checkpoint; River's per-kind timeout is
	// SliceDuration + SliceGrace. Default 1 min.
	SliceGrace time.Duration
	// RescueMargin is how far past that timeout River's rescuer treats a
	// slice as stuck (its worker is presumed dead) and runs it again, from
	// the last checkpoint. Default 30 s.
	RescueMargin time.Duration
	// CheckpointInterval is the wall time between checkpoints inside a
	// slice, so a crash loses at most this much work. Default 30 s;
	// negative checkpoints at slice ends only.
	CheckpointInterval time.Duration
	// ProgressInterval is the wall time between progress writes between
	// checkpoints. Default 1 s.
	ProgressInterval time.Duration
	// CancelPollInterval is how often a running slice reads its job's
	// cancel flag, which is how a cancel from another process reaches it.
	// Default 500 ms.
	CancelPollInterval time.Duration
	// WatchInterval is how often Watch polls the store. Default 250 ms.
	WatchInterval time.Duration
	// StepGenerations is the maxGenerations passed to Run.Step; the
	// engine checks the clock and the flags between calls. Default 1.
	StepGenerations int

	// StopTimeout bounds Stop's graceful part (running slices checkpoint
	// and hand over); then their contexts are cancelled. Default 30 s.
	StopTimeout time.Duration
	// FinalizeTimeout bounds the database writes at the end of a slice.
	// Default 30 s.
	FinalizeTimeout time.Duration
	// RetryDelay is the wait before a slice that failed runs again.
	// Default 5 s.
	RetryDelay time.Duration
	// MaxAttempts is the number of attempts per slice (River's); a slice
	// that fails on its last attempt fails the job. A failure because the
	// database is unreachable or full (IsUnavailable) spends no attempt:
	// the slice waits RetryDelay and runs again, as often as it takes.
	// Default 10.
	MaxAttempts int
	// MaxRequeues is how often a job whose slice ran out of its
	// MaxAttempts (its workers killed mid-slice again and again, or
	// failing) goes on with a fresh slice from its last checkpoint; the
	// next time, the job fails with the reason, keeping the front of its
	// last checkpoint. Default 2.
	MaxRequeues int
	// ReapInterval is how often a working engine looks for stranded jobs:
	// queued or running with no slice left in River's queue (a slice
	// River discarded, e.g. after a worker died on its last attempt).
	// Each is given a fresh slice, failed or, when a cancel was requested,
	// cancelled (see MaxRequeues). Default 30 s, River's rescue interval.
	ReapInterval time.Duration
	// FetchPollInterval is how often idle workers look for queued slices
	// (River's; SQLite has no LISTEN/NOTIFY). Default 1 s.
	FetchPollInterval time.Duration

	// MaxSpecBytes limits a submitted spec. Default 1 MiB.
	MaxSpecBytes int

	// NodeID names this machine (default: the host name). Start makes
	// slices that a dead process with the same NodeID left running
	// available again; it must therefore be unique per host or container.
	NodeID string

	// Logger receives the engine's and River's logs. Default slog.Default().
	Logger *slog.Logger
	// Now is the clock for stored times. Default time.Now.
	Now func() time.Time
	// NewID returns a new job ID. Default: 24 hexadecimal digits, the
	// first 12 the creation time in milliseconds, so IDs sort by age.
	NewID func() string

	// OnSlice, when set, is called at the end of every slice this process
	// drives (from the opened run to the slice's last transaction), on
	// the worker's goroutine, for metrics; it must return quickly.
	OnSlice func(SliceStats)

	// testOnly shortens River's start-up jitter in this package's tests.
	testOnly bool
}

// SliceStats describe one slice that a worker drove, for Config.OnSlice.
type SliceStats struct {
	JobID string
	// Duration is the wall time from the opened run to the end of the
	// slice's last transaction.
	Duration time.Duration
	// Generations and Evaluations are those the slice completed: the
	// run's progress at the end less that at its opening (from the
	// last checkpoint, so work redone after a crash counts again).
	Generations int
	Evaluations int64
	// Outcome is how the slice ended: one of the Slice* outcomes.
	Outcome string
}

// Outcomes of a slice, in SliceStats.
const (
	SliceSucceeded  = "succeeded"   // the run reached its end; the job succeeded
	SliceFailed     = "failed"      // the run failed; so did the job
	SliceCancelled  = "cancelled"   // a cancel was seen; the job is cancelled
	SliceHandedOver = "handed_over" // time up or engine stopping: checkpointed, next slice queued
	SliceError      = "error"       // a database error; River retries the slice
)

// Defaults, see Config.
const (
	DefaultSliceDuration      = 2 * time.Minute
	DefaultSliceGrace         = time.Minute
	DefaultRescueMargin       = 30 * time.Second
	DefaultCheckpointInterval = 30 * time.Second
	DefaultProgressInterval   = time.Second
	DefaultCancelPollInterval = 500 * time.Millisecond
	DefaultWatchInterval      = 250 * time.Millisecond
	DefaultStopTimeout        = 30 * time.Second
	DefaultFinalizeTimeout    = 30 * time.Second
	DefaultRetryDelay         = 5 * time.Second
	DefaultMaxAttempts        = 10
	DefaultMaxRequeues        = 2
	DefaultReapInterval       = 30 * time.Second
	DefaultFetchPollInterval  = time.Second
	DefaultMaxSpecBytes       = 1 << 20
)

// withDefaults checks c and fills in defaults; errors name the field.
func (c Config) withDefaults() (Config, error) {
	var v violations
	defaultsOf(&v, []defaulted[time.Duration]{
		{"slice_duration", &c.SliceDuration, DefaultSliceDuration},
		{"slice_grace", &c.SliceGrace, DefaultSliceGrace},
		{"rescue_margin", &c.RescueMargin, DefaultRescueMargin},
		{"progress_interval", &c.ProgressInterval, DefaultProgressInterval},
		{"cancel_poll_interval", &c.CancelPollInterval, DefaultCancelPollInterval},
		{"watch_interval", &c.WatchInterval, DefaultWatchInterval},
		{"stop_timeout", &c.StopTimeout, DefaultStopTimeout},
		{"finalize_timeout", &c.FinalizeTimeout, DefaultFinalizeTimeout},
		{"retry_delay", &c.RetryDelay, DefaultRetryDelay},
		{"fetch_poll_interval", &c.FetchPollInterval, DefaultFetchPollInterval},
		{"reap_interval", &c.ReapInterval, DefaultReapInterval},
	})
	if c.CheckpointInterval == 0 {
		c.CheckpointInterval = DefaultCheckpointInterval
	}
	if c.FetchPollInterval < time.Millisecond {
		v.add("config.fetch_poll_interval", "must be at least 1ms, got %v", c.FetchPollInterval)
	}
	defaultsOf(&v, []defaulted[int]{
		{"workers", &c.Workers, 0},
		{"step_generations", &c.StepGenerations, 1},
		{"max_attempts", &c.MaxAttempts, DefaultMaxAttempts},
		{"max_requeues", &c.MaxRequeues, DefaultMaxRequeues},
		{"max_spec_bytes", &c.MaxSpecBytes, DefaultMaxSpecBytes},
	})
	if c.NodeID == "" {
		host, err := os.Hostname()
		if err != nil || host == "" {
			host = "localhost"
		}
		c.NodeID = host
	}
	if len(c.NodeID) > 60 {
		c.NodeID = c.NodeID[:60]
	}
	if c.Logger == nil {
		c.Logger = slog.Default()
	}
	if c.Now == nil {
		c.Now = time.Now
	}
	if c.NewID == nil {
		c.NewID = newJobID
	}
	return c, v.err()
}

// sliceTimeout is River's timeout of one slice attempt.
func (c Config) sliceTimeout() time.Duration { return c.SliceDuration + c.SliceGrace }

// rescueAfter is River's RescueStuckJobsAfter: just above the timeout,
// never -1 (a job with an infinite timeout would never be rescued).
func (c Config) rescueAfter() time.Duration { return c.sliceTimeout() + c.RescueMargin }

func newJobID() string {
	var b [8]byte
	if _, err := rand.Read(b[:]); err != nil {
		panic("jobs: crypto/rand failed: " + err.Error())
	}
	return fmt.Sprintf("%012x%012x", time.Now().UnixMilli(), binary.BigEndian.Uint64(b[:])>>16)
}

// defaulted is a setting of Config that must not be negative and whose
// zero means def.
type defaulted[T int | time.Duration] struct {
	field string
	p     *T
	def   T
}

// defaultsOf checks the settings and fills in their defaults.
func defaultsOf[T int | time.Duration](v *violations, settings []defaulted[T]) {
	for _, s := range settings {
		switch {
		case *s.p < 0:
			v.add("config."+s.field, "must not be negative, got %v", *s.p)
		case *s.p == 0:
			*s.p = s.def
		}
	}
}
