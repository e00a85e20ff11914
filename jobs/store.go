package jobs

import (
	"context"
	"time"
)

// Store is the engine's storage of specs, progress, checkpoints and fronts,
// in tables of the project's own (prefix dampfront_) beside River's. Its
// methods follow River's driver style: (ctx, *XxxParams) (..., error),
// nouns first. Two implementations exist, SQLite and PostgreSQL; both pass
// the one conformance suite (store_conformance_test.go).
//
// Errors: a bad parameter gives an *InvalidArgumentError naming the field,
// an unknown job ID a *NotFoundError, and a transition that the job's state
// forbids a *PreconditionError.
type Store interface {
	// JobInsert stores a new job in state queued.
	JobInsert(ctx context.Context, params *JobInsertParams) (*Job, error)
	// JobGetByID returns a job with its progress.
	JobGetByID(ctx context.Context, params *JobGetByIDParams) (*Job, error)
	// JobList pages through jobs, newest first, filtered by state and labels.
	JobList(ctx context.Context, params *JobListParams) (*JobListResult, error)
	// JobCounts counts the jobs in each state and finds the oldest last
	// checkpoint among running jobs, by aggregate queries that decode no
	// job (a metrics scrape reads it; JobList would read every spec).
	JobCounts(ctx context.Context, params *JobCountsParams) (*JobCountsResult, error)
	// JobCancelRequest flags a job for cancellation. A queued job that no
	// slice has started is cancelled at once; a running one is finished by
	// its slice. A terminal job gives a *PreconditionError.
	JobCancelRequest(ctx context.Context, params *JobCancelRequestParams) (*Job, error)
	// JobStart hands a job to a slice run: it must be queued or running and
	// not terminal; the run's lease replaces any earlier one, the state
	// becomes running and the slice count goes up by one.
	JobStart(ctx context.Context, params *JobStartParams) (*Job, error)
	// JobFinish moves a job held by the given lease to a terminal state.
	JobFinish(ctx context.Context, params *JobFinishParams) (*Job, error)

	// JobListStranded lists, oldest first, the jobs that are queued or
	// running but have no slice in River's queue (available, pending,
	// scheduled, retryable or running): their last slice was discarded
	// or cancelled, and nothing would ever end them.
	JobListStranded(ctx context.Context, params *JobListStrandedParams) ([]*Job, error)
	// JobRequeue counts one more fresh slice for a queued or running job
	// and clears its lease, so that no earlier slice run writes again;
	// the caller queues the slice in the same transaction. Fenced by
	// Requeues: a job requeued or ended since it was read gives a
	// *PreconditionError.
	JobRequeue(ctx context.Context, params *JobRequeueParams) (*Job, error)
	// JobEnd moves a queued or running job that no slice run will end
	// (stranded, or cancelled with no slice running) to failed or
	// cancelled, partial, keeping the front of its last checkpoint.
	// Fenced by Requeues as JobRequeue is.
	JobEnd(ctx context.Context, params *JobEndParams) (*Job, error)

	// CheckpointSave stores the optimiser state and its progress in one
	// transaction, if the lease still holds the job.
	CheckpointSave(ctx context.Context, params *CheckpointSaveParams) error
	// CheckpointGet returns the last checkpoint; a job without one gives a
	// *NotFoundError with Resource "checkpoint".
	CheckpointGet(ctx context.Context, params *CheckpointGetParams) (*Checkpoint, error)

	// ProgressPut stores progress between checkpoints, if the lease holds.
	ProgressPut(ctx context.Context, params *ProgressPutParams) error
	// ProgressGet returns a job's progress.
	ProgressGet(ctx context.Context, params *ProgressGetParams) (*Progress, error)

	// FrontPut replaces a job's stored front, if the lease holds.
	FrontPut(ctx context.Context, params *FrontPutParams) error
	// FrontGet pages through a job's stored front by index.
	FrontGet(ctx context.Context, params *FrontGetParams) (*FrontGetResult, error)

	// Tx runs fn with a Store bound to one transaction, committed when fn
	// returns nil. Inside fn, use only the Store passed to it.
	Tx(ctx context.Context, fn func(ctx context.Context, tx Store) error) error
}

// Job is one stored job.
type Job struct {
	ID     string
	State  State
	Labels map[string]string
	Spec   []byte // opaque; the API layer's serialised job spec

	CreatedAt  time.Time
	StartedAt  time.Time // zero until the first slice runs
	FinishedAt time.Time // zero until terminal

	Error           string // why the job failed; empty otherwise
	Partial         bool   // the stored front is not that of a finished run (cancelled or failed)
	CancelRequested bool
	Slices          int // slice runs started so far, retries and resumes included
	// Requeues counts the fresh slices queued after one of the job's
	// slices ran out of attempts (at most Config.MaxRequeues).
	Requeues int

	Progress Progress
	// Summary is the study's summary of the stored front (see Summarizer),
	// opaque to the engine; nil until a front with one is stored.
	Summary []byte

	lease string
}

// JobInsertParams are the inputs of Store.JobInsert.
type JobInsertParams struct {
	ID     string // required; unique
	Spec   []byte // required
	Labels map[string]string
	Now    time.Time // required; creation time
}

// JobGetByIDParams are the inputs of Store.JobGetByID.
type JobGetByIDParams struct {
	ID string
}

// JobListParams are the inputs of Store.JobList.
type JobListParams struct {
	// PageSize is the maximum number of jobs returned: 0 means
	// DefaultPageSize, larger than MaxPageSize means MaxPageSize (AIP-158).
	PageSize int
	// PageToken is NextPageToken from the previous page, which must have
	// been listed with the same filter.
	PageToken string
	// States keeps jobs in any of these states; empty keeps all.
	States []State
	// Labels keeps jobs carrying every one of these key=value pairs.
	Labels map[string]string
}

// Page sizes of JobList and FrontGet.
const (
	DefaultPageSize = 50
	MaxPageSize     = 1000
)

// JobListResult is one page of jobs.
type JobListResult struct {
	Jobs          []*Job
	NextPageToken string // empty on the last page
}

// JobCountsParams are the inputs of Store.JobCounts. There are none yet;
// the struct keeps the Store's one signature style and room for a filter.
type JobCountsParams struct{}

// JobCountsResult is what Store.JobCounts read.
type JobCountsResult struct {
	// ByState holds the number of jobs in each state; every state of
	// States is present, with 0 when no job is in it.
	ByState map[State]int
	// OldestRunningSince is, over the running jobs, the earliest of each
	// job's last checkpoint time, or of its start time when it has no
	// checkpoint yet: the start of the oldest work that a crash now would
	// lose. Zero when no job runs.
	OldestRunningSince time.Time
}

// JobCancelRequestParams are the inputs of Store.JobCancelRequest.
type JobCancelRequestParams struct {
	ID  string
	Now time.Time
}

// JobStartParams are the inputs of Store.JobStart.
type JobStartParams struct {
	ID    string
	Lease string // identifies this slice run; required
	Now   time.Time
}

// JobFinishParams are the inputs of Store.JobFinish.
type JobFinishParams struct {
	ID      string
	Lease   string
	State   State // succeeded, failed or cancelled
	Error   string
	Partial bool
	Now     time.Time
}

// JobListStrandedParams are the inputs of Store.JobListStranded.
type JobListStrandedParams struct {
	Limit int // at most this many jobs; 0 means DefaultPageSize
}

// JobRequeueParams are the inputs of Store.JobRequeue.
type JobRequeueParams struct {
	ID       string
	Requeues int // the job's Requeues when it was read
	Now      time.Time
}

// JobEndParams are the inputs of Store.JobEnd.
type JobEndParams struct {
	ID       string
	Requeues int   // the job's Requeues when it was read
	State    State // failed or cancelled
	Error    string
	Now      time.Time
}

// CheckpointSaveParams are the inputs of Store.CheckpointSave.
type CheckpointSaveParams struct {
	JobID    string
	Lease    string
	Data     []byte
	Progress Progress
	Now      time.Time
}

// Checkpoint is the stored optimiser state of a job.
type Checkpoint struct {
	JobID      string
	Data       []byte
	Generation int
	SavedAt    time.Time
}

// CheckpointGetParams are the inputs of Store.CheckpointGet.
type CheckpointGetParams struct {
	JobID string
}

// ProgressPutParams are the inputs of Store.ProgressPut.
type ProgressPutParams struct {
	JobID    string
	Lease    string
	Progress Progress
	Now      time.Time
}

// ProgressGetParams are the inputs of Store.ProgressGet.
type ProgressGetParams struct {
	JobID string
}

// FrontPutParams are the inputs of Store.FrontPut.
type FrontPutParams struct {
	JobID     string
	Lease     string
	Solutions []Solution // Index must be 0, 1, 2, ... in order
	// Summary replaces the job's summary (Job.Summary); nil clears it.
	Summary []byte
}

// FrontGetParams are the inputs of Store.FrontGet.
type FrontGetParams struct {
	JobID     string
	PageSize  int // as JobListParams.PageSize
	PageToken string
}

// FrontGetResult is one page of a front.
type FrontGetResult struct {
	Solutions     []Solution
	Total         int // size of the whole stored front
	NextPageToken string
}
