package jobs

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"os"
	"sync"
	"time"

	"github.com/riverqueue/river"
)

// sliceKind is the River job kind of one slice; queueName its queue.
const (
	sliceKind = "dampfront_slice"
	queueName = "dampfront"
)

// sliceArgs are a slice's River job arguments. Every slice of a job has
// the same JobID; Slice counts from 1 and only helps reading River's table.
type sliceArgs struct {
	JobID string `json:"job_id"`
	Slice int    `json:"slice"`
}

func (sliceArgs) Kind() string { return sliceKind }

// riverQueue is the River client and its worker over one database.
type riverQueue[TTx any] struct {
	e      *Engine
	db     *database[TTx]
	client *river.Client[TTx]
	id     string // River client ID: node/pid/nonce

	mu      sync.Mutex
	running map[string]context.CancelCauseFunc // job ID -> its slice here

	stopReap func()        // ends reapLoop; nil until start
	reaped   chan struct{} // closed when reapLoop has returned
}

var _ queue = (*riverQueue[any])(nil)

func newRiverQueue[TTx any](e *Engine, db *database[TTx]) (*riverQueue[TTx], error) {
	var nonce [4]byte
	if _, err := rand.Read(nonce[:]); err != nil {
		return nil, err
	}
	rq := &riverQueue[TTx]{
		e:       e,
		db:      db,
		id:      formatClientID(e.cfg.NodeID, os.Getpid(), hex.EncodeToString(nonce[:])),
		running: map[string]context.CancelCauseFunc{},
	}
	workers := river.NewWorkers()
	if err := river.AddWorkerSafely[sliceArgs](workers, &sliceWorker[TTx]{rq: rq}); err != nil {
		return nil, err
	}
	cfg := e.cfg
	rcfg := &river.Config{
		ID:                   rq.id,
		Workers:              workers,
		JobTimeout:           cfg.sliceTimeout(),
		RescueStuckJobsAfter: cfg.rescueAfter(),
		MaxAttempts:          cfg.MaxAttempts,
		FetchPollInterval:    cfg.FetchPollInterval,
		FetchCooldown:        min(river.FetchCooldownDefault, cfg.FetchPollInterval),
		Logger:               cfg.Logger,
		TestOnly:             cfg.testOnly,
	}
	if cfg.Workers > 0 {
		rcfg.Queues = map[string]river.QueueConfig{queueName: {MaxWorkers: cfg.Workers}}
	}
	client, err := river.NewClient[TTx](db.driver, rcfg)
	if err != nil {
		return nil, fmt.Errorf("jobs: River client: %w", err)
	}
	rq.client = client
	return rq, nil
}

func (rq *riverQueue[TTx]) backend() string  { return rq.db.backend }
func (rq *riverQueue[TTx]) clientID() string { return rq.id }
func (rq *riverQueue[TTx]) close() error     { return rq.db.close() }

func (rq *riverQueue[TTx]) insertOpts() *river.InsertOpts {
	return &river.InsertOpts{Queue: queueName, MaxAttempts: rq.e.cfg.MaxAttempts}
}

func (rq *riverQueue[TTx]) insert(ctx context.Context, p *JobInsertParams) (*Job, error) {
	var job *Job
	err := rq.db.withTx(ctx, func(tx TTx, st *sqlStore) error {
		var err error
		if job, err = st.JobInsert(ctx, p); err != nil {
			return err
		}
		_, err = rq.client.InsertTx(ctx, tx, sliceArgs{JobID: p.ID, Slice: 1}, rq.insertOpts())
		return err
	})
	if err != nil {
		return nil, err
	}
	return job, nil
}

func (rq *riverQueue[TTx]) start(ctx context.Context) error {
	// River's work context must outlive the caller's start-up context;
	// Stop ends it.
	if err := rq.client.Start(context.WithoutCancel(ctx)); err != nil {
		return err
	}
	reapCtx, cancel := context.WithCancel(context.WithoutCancel(ctx))
	rq.stopReap, rq.reaped = cancel, make(chan struct{})
	go func() {
		defer close(rq.reaped)
		rq.reapLoop(reapCtx)
	}()
	return nil
}

// stop asks every running slice to hand over (they watch e.stopping),
// waits for them up to StopTimeout, then cancels their contexts and waits
// up to FinalizeTimeout more for their last writes.
func (rq *riverQueue[TTx]) stop(ctx context.Context) error {
	if rq.stopReap != nil {
		rq.stopReap()
		<-rq.reaped
	}
	rq.mu.Lock()
	for _, cancel := range rq.running {
		cancel(errStopping)
	}
	rq.mu.Unlock()
	soft, cancel := context.WithTimeout(ctx, rq.e.cfg.StopTimeout)
	defer cancel()
	if err := rq.client.Stop(soft); err == nil {
		return nil
	}
	hard, cancel2 := context.WithTimeout(context.WithoutCancel(ctx), rq.e.cfg.FinalizeTimeout)
	defer cancel2()
	if err := rq.client.StopAndCancel(hard); err != nil {
		return fmt.Errorf("jobs: stop: slices did not hand over within %v: %w",
			rq.e.cfg.StopTimeout+rq.e.cfg.FinalizeTimeout, err)
	}
	return nil
}

func (rq *riverQueue[TTx]) interrupt(id string, cause error) {
	rq.mu.Lock()
	defer rq.mu.Unlock()
	if cancel, ok := rq.running[id]; ok {
		cancel(cause)
	}
}

// track registers the running slice of job id; the returned function
// removes it.
func (rq *riverQueue[TTx]) track(id string, cancel context.CancelCauseFunc) func() {
	rq.mu.Lock()
	rq.running[id] = cancel
	rq.mu.Unlock()
	select {
	case <-rq.e.stopping:
		cancel(errStopping)
	default:
	}
	return func() {
		rq.mu.Lock()
		delete(rq.running, id)
		rq.mu.Unlock()
	}
}

// retryAt is when a slice attempt that returned an error runs again.
func (rq *riverQueue[TTx]) retryAt() time.Time { return time.Now().Add(rq.e.cfg.RetryDelay) }
