package jobs

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"sync"

	"github.com/jackc/pgx/v5"
)

// Engine runs jobs: it stores them, queues their slices on River and, when
// Config.Workers > 0, works them. All methods are safe for concurrent use.
type Engine struct {
	cfg    Config
	opener RunOpener
	store  *sqlStore
	q      queue

	stopping chan struct{} // closed when Stop begins
	stopOnce sync.Once
}

// queue is the River side of the engine, generic over the driver's
// transaction type and hidden behind this interface.
type queue interface {
	backend() string
	clientID() string
	// insert stores a job and queues its first slice in one transaction.
	insert(ctx context.Context, p *JobInsertParams) (*Job, error)
	start(ctx context.Context) error
	stop(ctx context.Context) error
	// releaseOrphans makes slices that dead processes of this node left
	// running available again and returns how many.
	releaseOrphans(ctx context.Context) (int, error)
	// interrupt cancels this process's running slice of job id, if any.
	interrupt(id string, cause error)
	// reap ends or requeues the stranded jobs (strand.go) and returns how
	// many it found.
	reap(ctx context.Context) (int, error)
	// cancelIdle ends job id, whose cancel was requested, when no slice
	// of it is running, and returns the job.
	cancelIdle(ctx context.Context, id string) (*Job, error)
	close() error
}

// Open connects to cfg.DatabaseURL, migrates its tables (River's and the
// project's) and returns an engine that is not yet working; Start begins
// that. opener builds runs from stored specs and checkpoints.
func Open(ctx context.Context, cfg Config, opener RunOpener) (*Engine, error) {
	cfg, err := cfg.withDefaults()
	if err != nil {
		return nil, err
	}
	if opener == nil {
		return nil, &InvalidArgumentError{Violations: []FieldError{{Field: "opener", Reason: "is required"}}}
	}
	backend, target, err := parseDatabaseURL(cfg.DatabaseURL)
	if err != nil {
		return nil, err
	}
	e := &Engine{cfg: cfg, opener: opener, stopping: make(chan struct{})}
	switch backend {
	case backendSQLite:
		db, err := openSQLite(ctx, target)
		if err != nil {
			return nil, err
		}
		e.store = db.store
		e.q, err = newRiverQueue[*sql.Tx](e, db)
		if err != nil {
			_ = db.close()
			return nil, err
		}
	case backendPostgres:
		db, err := openPostgres(ctx, target, !cfg.SkipMigrate)
		if err != nil {
			return nil, err
		}
		e.store = db.store
		e.q, err = newRiverQueue[pgx.Tx](e, db)
		if err != nil {
			_ = db.close()
			return nil, err
		}
	}
	return e, nil
}

// Store returns the engine's store, for the API layer's read paths and
// for tests.
func (e *Engine) Store() Store { return e.store }

// Backend returns "sqlite" or "postgres".
func (e *Engine) Backend() string { return e.q.backend() }

// Start releases slices that dead processes of this node left running
// (so that a restarted single-process server resumes its jobs at once,
// without waiting for River's rescuer) and, with Workers > 0, settles the
// stranded jobs (see Config.ReapInterval) and starts working. It returns
// how many slices it released.
func (e *Engine) Start(ctx context.Context) (released int, err error) {
	released, err = e.q.releaseOrphans(ctx)
	if err != nil {
		return 0, fmt.Errorf("jobs: release slices of dead processes: %w", err)
	}
	if released > 0 {
		e.cfg.Logger.InfoContext(ctx, "jobs: released slices left running by dead processes of this node",
			"count", released, "node", e.cfg.NodeID)
	}
	if e.cfg.Workers == 0 {
		return released, nil
	}
	if _, err := e.q.reap(ctx); err != nil {
		return released, fmt.Errorf("jobs: settle stranded jobs: %w", err)
	}
	return released, e.q.start(ctx)
}

// Stop stops taking work; each running slice stops after its current
// generation, checkpoints, queues its next slice and releases the job,
// all within Config.StopTimeout, after which slice contexts are
// cancelled. Stop does not close the database; Close does.
func (e *Engine) Stop(ctx context.Context) error {
	e.stopOnce.Do(func() { close(e.stopping) })
	if e.cfg.Workers == 0 {
		return nil
	}
	return e.q.stop(ctx)
}

// Close closes the database. Call Stop first when the engine was started.
func (e *Engine) Close() error { return e.q.close() }

// SubmitParams are the inputs of Engine.Submit.
type SubmitParams struct {
	Spec   []byte            // required; opaque to the engine
	Labels map[string]string // keys: 1-63 of a-z 0-9 . _ - /
}

// Submit stores a job and queues it; it returns at once. The spec is
// opaque here: the caller has checked it (the engine never calls back to
// check it again), and a spec that the opener refuses fails its job.
func (e *Engine) Submit(ctx context.Context, p *SubmitParams) (*Job, error) {
	var v violations
	switch {
	case len(p.Spec) == 0:
		v.add("spec", "is required")
	case len(p.Spec) > e.cfg.MaxSpecBytes:
		v.add("spec", "is %d bytes, at most %d allowed", len(p.Spec), e.cfg.MaxSpecBytes)
	}
	checkLabels(&v, "labels", p.Labels)
	if err := v.err(); err != nil {
		return nil, err
	}
	return e.q.insert(ctx, &JobInsertParams{ID: e.cfg.NewID(), Spec: p.Spec, Labels: p.Labels, Now: e.cfg.Now()})
}

// Get returns a job with its progress.
func (e *Engine) Get(ctx context.Context, id string) (*Job, error) {
	return e.store.JobGetByID(ctx, &JobGetByIDParams{ID: id})
}

// List pages through jobs, newest first.
func (e *Engine) List(ctx context.Context, p *JobListParams) (*JobListResult, error) {
	return e.store.JobList(ctx, p)
}

// Cancel requests cancellation. A job with no slice running (queued,
// between slices, or stranded) is cancelled at once, keeping the front of
// its last checkpoint; a running one within about
// Config.CancelPollInterval, wherever its slice runs, keeping its front
// so far. Either front is marked partial. A slice whose worker died is
// run again, or discarded and reaped, by River's rescuer, and the job is
// cancelled then. A finished job gives a *PreconditionError.
func (e *Engine) Cancel(ctx context.Context, id string) (*Job, error) {
	if _, err := e.store.JobCancelRequest(ctx, &JobCancelRequestParams{ID: id, Now: e.cfg.Now()}); err != nil {
		return nil, err
	}
	e.q.interrupt(id, errCancelRequested)
	return e.q.cancelIdle(ctx, id)
}

// FrontPage is one page of a job's front.
type FrontPage struct {
	Job           *Job
	Partial       bool // the job runs, was cancelled or failed: the front is the best so far, not a finished run's
	Solutions     []Solution
	Total         int
	NextPageToken string
}

// TokenAfter is the page token of the page that starts after the
// solution with this index: for a caller that returns fewer solutions
// than the page holds (AIP-158 allows it) and must say where to go on.
func (p *FrontPage) TokenAfter(index int) string {
	return pageToken{Query: frontQueryHash(p.Job.ID), Index: index}.encode()
}

// Front returns a page of the stored front of a finished job (succeeded,
// cancelled or failed, the last two marked partial), or of a running
// job's front at its last checkpoint (partial; empty before the first);
// a queued job gives a *PreconditionError.
func (e *Engine) Front(ctx context.Context, p *FrontGetParams) (*FrontPage, error) {
	if p.JobID == "" {
		return nil, &InvalidArgumentError{Violations: []FieldError{{Field: "job_id", Reason: "is required"}}}
	}
	j, err := e.Get(ctx, p.JobID)
	if err != nil {
		return nil, err
	}
	if j.State == StateQueued {
		return nil, &PreconditionError{ID: j.ID, State: j.State, Reason: "the front is available once a worker has started the job; watch the job until then"}
	}
	res, err := e.store.FrontGet(ctx, p)
	if err != nil {
		return nil, err
	}
	partial := j.Partial || !j.State.Terminal()
	return &FrontPage{Job: j, Partial: partial, Solutions: res.Solutions, Total: res.Total, NextPageToken: res.NextPageToken}, nil
}

// errors that end a slice's context, told apart with context.Cause.
var (
	errSliceOver       = errors.New("jobs: slice time is up")
	errCancelRequested = errors.New("jobs: cancel requested")
	errStopping        = errors.New("jobs: engine stopping")
)

// Checkpoint returns the job's last saved checkpoint, or nil when it has
// none yet; an unknown job is ErrNotFound.
func (e *Engine) Checkpoint(ctx context.Context, id string) ([]byte, error) {
	if _, err := e.Get(ctx, id); err != nil {
		return nil, err
	}
	c, err := e.store.CheckpointGet(ctx, &CheckpointGetParams{JobID: id})
	if errors.Is(err, ErrNotFound) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	return c.Data, nil
}
