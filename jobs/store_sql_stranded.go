package jobs

import (
	"context"
	"fmt"
	"strings"
)

// liveSliceStates are the states of River's jobs that will still run (or
// are running): a job with a slice in one of them is not stranded.
var liveSliceStates = []string{"available", "pending", "retryable", "running", "scheduled"}

// sliceJobID is the job ID in a slice's River arguments (sliceArgs) in
// SQL: ->> reads a JSON member as text in PostgreSQL (jsonb) and in SQLite
// (3.38 and later, jsonb blobs included) alike.
const sliceJobID = `args ->> 'job_id'`

func (s *sqlStore) JobListStranded(ctx context.Context, p *JobListStrandedParams) ([]*Job, error) {
	var v violations
	limit := checkPageSize(&v, p.Limit)
	if err := v.err(); err != nil {
		return nil, err
	}
	// NOT IN over an uncorrelated subquery: River's live rows are few
	// and found through its state index, whatever the size of its table.
	args := []any{string(StateQueued), string(StateRunning), sliceKind}
	for _, st := range liveSliceStates {
		args = append(args, st)
	}
	args = append(args, limit)
	rows, err := s.q.query(ctx, `SELECT `+jobColumns+` FROM dampfront_job j
		WHERE j.state IN (?, ?) AND j.id NOT IN (
			SELECT r.`+sliceJobID+` FROM river_job r
			WHERE r.kind = ? AND r.state IN (?`+strings.Repeat(", ?", len(liveSliceStates)-1)+`)
				AND r.`+sliceJobID+` IS NOT NULL)
		ORDER BY j.created_at, j.id LIMIT ?`, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []*Job
	for rows.Next() {
		j, err := scanJob(rows)
		if err != nil {
			return nil, err
		}
		out = append(out, j)
	}
	return out, rows.Err()
}

// checkFenced checks the parameters shared by JobRequeue and JobEnd.
func checkFenced(v *violations, id string, requeues int, now bool) {
	checkID(v, "id", id)
	if requeues < 0 {
		v.add("requeues", "must not be negative, got %d", requeues)
	}
	if !now {
		v.add("now", "is required")
	}
}

// fencedUpdate runs set (an UPDATE's SET list, with its arguments) on job
// id if it is queued or running and has been requeued exactly requeues
// times; otherwise it explains why not with a *PreconditionError.
func (s *sqlStore) fencedUpdate(ctx context.Context, id string, requeues int, set string, args ...any) (*Job, error) {
	var job *Job
	err := s.inTx(ctx, func(tx *sqlStore) error {
		args = append(args, id, int64(requeues), string(StateQueued), string(StateRunning))
		n, err := tx.q.exec(ctx, `UPDATE dampfront_job SET `+set+` WHERE id = ? AND requeues = ? AND state IN (?, ?)`, args...)
		if err != nil {
			return err
		}
		j, err := tx.jobGet(ctx, id)
		if err != nil {
			return err
		}
		if n == 0 {
			reason := fmt.Sprintf("it has been requeued %d times, not %d as read", j.Requeues, requeues)
			if j.State.Terminal() {
				reason = "the job has finished"
			}
			return &PreconditionError{ID: id, State: j.State, Reason: reason}
		}
		job = j
		return nil
	})
	return job, err
}

func (s *sqlStore) JobRequeue(ctx context.Context, p *JobRequeueParams) (*Job, error) {
	var v violations
	checkFenced(&v, p.ID, p.Requeues, !p.Now.IsZero())
	if err := v.err(); err != nil {
		return nil, err
	}
	return s.fencedUpdate(ctx, p.ID, p.Requeues, `requeues = requeues + 1, lease = '', updated_at = ?`, timeToDB(p.Now))
}

func (s *sqlStore) JobEnd(ctx context.Context, p *JobEndParams) (*Job, error) {
	var v violations
	checkFenced(&v, p.ID, p.Requeues, !p.Now.IsZero())
	if p.State != StateFailed && p.State != StateCancelled {
		v.add("state", "must be failed or cancelled, got %q", p.State)
	}
	if err := v.err(); err != nil {
		return nil, err
	}
	now := timeToDB(p.Now)
	return s.fencedUpdate(ctx, p.ID, p.Requeues, `state = ?, error = ?, partial = 1, lease = '', finished_at = ?, updated_at = ?`,
		string(p.State), p.Error, now, now)
}
