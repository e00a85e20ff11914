package jobs

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"
	"unicode/utf8"

	"dampfront/model"
)

// sqlStore implements Store with portable SQL over a querier. The SQLite
// and PostgreSQL stores differ only in how they connect, begin
// transactions and create their tables.
type sqlStore struct {
	q querier
	// begin opens a transaction and returns a querier on it; nil when the
	// store is already bound to a transaction.
	begin func(ctx context.Context) (q querier, commit func(context.Context) error, rollback func(context.Context), err error)
}

var _ Store = (*sqlStore)(nil)

const jobColumns = `id, state, labels, spec, created_at, started_at, finished_at, updated_at,
	error, partial, cancel_requested, lease, slices, requeues,
	generation, generations, evaluations, hypervolume, best, summary`

// Limits on labels, in the spirit of Kubernetes label syntax.
const (
	maxLabels        = 32
	maxLabelKeyLen   = 63
	maxLabelValueLen = 255
)

func scanJob(r rowScanner) (*Job, error) {
	var (
		j                                    Job
		state, labels                        string
		created, started, finished, updated  int64
		partial, cancelRequested, slices     int64
		requeues                             int64
		generation, generations, evaluations int64
		best                                 []byte
	)
	if err := r.Scan(&j.ID, &state, &labels, &j.Spec, &created, &started, &finished, &updated,
		&j.Error, &partial, &cancelRequested, &j.lease, &slices, &requeues,
		&generation, &generations, &evaluations, &j.Progress.Hypervolume, &best, &j.Summary); err != nil {
		return nil, err
	}
	j.State = State(state)
	if err := json.Unmarshal([]byte(labels), &j.Labels); err != nil {
		return nil, fmt.Errorf("jobs: stored labels of job %q: %w", j.ID, err)
	}
	j.CreatedAt, j.StartedAt, j.FinishedAt = timeFromDB(created), timeFromDB(started), timeFromDB(finished)
	j.Partial, j.CancelRequested, j.Slices, j.Requeues = partial != 0, cancelRequested != 0, int(slices), int(requeues)
	j.Progress.Generation, j.Progress.Generations, j.Progress.Evaluations = int(generation), int(generations), evaluations
	j.Progress.UpdatedAt = timeFromDB(updated)
	var err error
	if j.Progress.Best, err = decodeFloats(best); err != nil {
		return nil, err
	}
	return &j, nil
}

// inTx runs fn in a transaction, or directly when s is bound to one.
func (s *sqlStore) inTx(ctx context.Context, fn func(tx *sqlStore) error) error {
	if s.begin == nil {
		return fn(s)
	}
	q, commit, rollback, err := s.begin(ctx)
	if err != nil {
		return err
	}
	defer rollback(ctx)
	if err := fn(&sqlStore{q: q}); err != nil {
		return err
	}
	return commit(ctx)
}

func (s *sqlStore) Tx(ctx context.Context, fn func(ctx context.Context, tx Store) error) error {
	return s.inTx(ctx, func(tx *sqlStore) error { return fn(ctx, tx) })
}

func checkLabels(v *violations, field string, labels map[string]string) {
	if len(labels) > maxLabels {
		v.add(field, "%d labels, at most %d allowed", len(labels), maxLabels)
	}
	for k, val := range labels {
		f := fmt.Sprintf("%s[%q]", field, k)
		if !validLabelKey(k) {
			v.add(f, "label key must be 1 to %d characters of a-z, 0-9, '.', '_', '-', '/', starting with a letter or digit", maxLabelKeyLen)
		}
		if len(val) > maxLabelValueLen || !utf8.ValidString(val) {
			v.add(f, "label value must be valid UTF-8 of at most %d bytes", maxLabelValueLen)
		} else if why := model.TextProblem(val); why != "" {
			v.add(f, "label value %s", why)
		}
	}
}

func validLabelKey(k string) bool {
	if k == "" || len(k) > maxLabelKeyLen {
		return false
	}
	for i := 0; i < len(k); i++ {
		c := k[i]
		switch {
		case c >= 'a' && c <= 'z', c >= '0' && c <= '9':
		case i > 0 && (c == '.' || c == '_' || c == '-' || c == '/'):
		default:
			return false
		}
	}
	return true
}

func checkPageSize(v *violations, n int) int {
	switch {
	case n < 0:
		v.add("page_size", "must not be negative, got %d", n)
	case n == 0:
		return DefaultPageSize
	case n > MaxPageSize:
		return MaxPageSize
	}
	return n
}

func checkID(v *violations, field, id string) {
	if id == "" {
		v.add(field, "is required")
	}
}

// checkNow requires the time of a write (field "now").
func checkNow(v *violations, now time.Time) {
	if now.IsZero() {
		v.add("now", "is required")
	}
}

func (s *sqlStore) JobInsert(ctx context.Context, p *JobInsertParams) (*Job, error) {
	var v violations
	checkID(&v, "id", p.ID)
	if len(p.Spec) == 0 {
		v.add("spec", "is required")
	}
	checkLabels(&v, "labels", p.Labels)
	checkNow(&v, p.Now)
	if err := v.err(); err != nil {
		return nil, err
	}
	labels := p.Labels
	if labels == nil {
		labels = map[string]string{}
	}
	labelJSON, err := json.Marshal(labels)
	if err != nil {
		return nil, err
	}
	now := timeToDB(p.Now)
	var job *Job
	err = s.inTx(ctx, func(tx *sqlStore) error {
		// The seed column of the first migration is not used: a job's
		// seed is in its spec, the one place for it. It is written as 0
		// so that the schema stays that of every earlier version.
		_, err := tx.q.exec(ctx, `INSERT INTO dampfront_job (id, state, labels, seed, spec, created_at, updated_at)
			VALUES (?, ?, ?, 0, ?, ?, ?)`, p.ID, string(StateQueued), string(labelJSON), p.Spec, now, now)
		if isUniqueViolation(err) {
			return fmt.Errorf("%w: job %q", ErrAlreadyExists, p.ID)
		}
		if err != nil {
			return err
		}
		for k, val := range labels {
			if _, err := tx.q.exec(ctx, `INSERT INTO dampfront_job_label (job_id, label_key, label_value) VALUES (?, ?, ?)`,
				p.ID, k, val); err != nil {
				return err
			}
		}
		job, err = tx.jobGet(ctx, p.ID)
		return err
	})
	if err != nil {
		return nil, err
	}
	return job, nil
}

func (s *sqlStore) jobGet(ctx context.Context, id string) (*Job, error) {
	j, err := scanJob(s.q.queryRow(ctx, `SELECT `+jobColumns+` FROM dampfront_job WHERE id = ?`, id))
	if errors.Is(err, errNoRows) {
		return nil, &NotFoundError{Resource: "job", ID: id}
	}
	return j, err
}

func (s *sqlStore) JobGetByID(ctx context.Context, p *JobGetByIDParams) (*Job, error) {
	var v violations
	checkID(&v, "id", p.ID)
	if err := v.err(); err != nil {
		return nil, err
	}
	return s.jobGet(ctx, p.ID)
}

func (s *sqlStore) JobList(ctx context.Context, p *JobListParams) (*JobListResult, error) {
	var v violations
	size := checkPageSize(&v, p.PageSize)
	for i, st := range p.States {
		if !st.Valid() {
			v.add(fmt.Sprintf("filter.states[%d]", i), "unknown state %q", st)
		}
	}
	checkLabels(&v, "filter.labels", p.Labels)
	hash := listQueryHash(p.States, p.Labels)
	var tok pageToken
	if p.PageToken != "" {
		var ok bool
		if tok, ok = decodePageToken(p.PageToken, hash); !ok {
			v.add("page_token", "not a token of this listing; repeat the filter of the first page or start without a token")
		}
	}
	if err := v.err(); err != nil {
		return nil, err
	}

	var (
		where []string
		args  []any
	)
	if len(p.States) > 0 {
		where = append(where, "j.state IN (?"+strings.Repeat(", ?", len(p.States)-1)+")")
		for _, st := range p.States {
			args = append(args, string(st))
		}
	}
	for k, val := range p.Labels {
		where = append(where, `EXISTS (SELECT 1 FROM dampfront_job_label l WHERE l.job_id = j.id AND l.label_key = ? AND l.label_value = ?)`)
		args = append(args, k, val)
	}
	if p.PageToken != "" {
		where = append(where, "(j.created_at < ? OR (j.created_at = ? AND j.id < ?))")
		args = append(args, tok.CreatedAt, tok.CreatedAt, tok.ID)
	}
	q := `SELECT ` + jobColumns + ` FROM dampfront_job j`
	if len(where) > 0 {
		q += " WHERE " + strings.Join(where, " AND ")
	}
	q += " ORDER BY j.created_at DESC, j.id DESC LIMIT ?"
	args = append(args, size+1)

	rows, err := s.q.query(ctx, q, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	res := &JobListResult{}
	for rows.Next() {
		j, err := scanJob(rows)
		if err != nil {
			return nil, err
		}
		res.Jobs = append(res.Jobs, j)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	if len(res.Jobs) > size {
		res.Jobs = res.Jobs[:size]
		last := res.Jobs[size-1]
		res.NextPageToken = pageToken{Query: hash, CreatedAt: timeToDB(last.CreatedAt), ID: last.ID}.encode()
	}
	return res, nil
}

func (s *sqlStore) JobCancelRequest(ctx context.Context, p *JobCancelRequestParams) (*Job, error) {
	var v violations
	checkID(&v, "id", p.ID)
	return s.jobTx(ctx, &v, p.ID, p.Now, func(tx *sqlStore, j *Job, now int64) error {
		var err error
		switch {
		case j.State.Terminal():
			return &PreconditionError{ID: j.ID, State: j.State, Reason: "a finished job cannot be cancelled"}
		case j.State == StateQueued && j.Slices == 0:
			_, err = tx.q.exec(ctx, `UPDATE dampfront_job SET state = ?, cancel_requested = 1, partial = 1,
				finished_at = ?, updated_at = ? WHERE id = ?`, string(StateCancelled), now, now, p.ID)
		default:
			_, err = tx.q.exec(ctx, `UPDATE dampfront_job SET cancel_requested = 1, updated_at = ? WHERE id = ?`, now, p.ID)
		}
		return err
	})
}

func (s *sqlStore) JobStart(ctx context.Context, p *JobStartParams) (*Job, error) {
	var v violations
	checkID(&v, "id", p.ID)
	checkID(&v, "lease", p.Lease)
	return s.jobTx(ctx, &v, p.ID, p.Now, func(tx *sqlStore, j *Job, now int64) error {
		if j.State.Terminal() {
			return &PreconditionError{ID: j.ID, State: j.State, Reason: "a finished job cannot start another slice"}
		}
		_, err := tx.q.exec(ctx, `UPDATE dampfront_job SET state = ?, lease = ?, slices = slices + 1,
			started_at = CASE WHEN started_at = 0 THEN ? ELSE started_at END, updated_at = ? WHERE id = ?`,
			string(StateRunning), p.Lease, now, now, p.ID)
		return err
	})
}

// jobTx checks the time of the write after the checks already in v, then
// runs change on job id in a transaction (now is at in the database's
// form) and returns the job as it is afterwards.
func (s *sqlStore) jobTx(ctx context.Context, v *violations, id string, at time.Time, change func(tx *sqlStore, j *Job, now int64) error) (*Job, error) {
	checkNow(v, at)
	if err := v.err(); err != nil {
		return nil, err
	}
	now := timeToDB(at)
	var job *Job
	err := s.inTx(ctx, func(tx *sqlStore) error {
		j, err := tx.jobGet(ctx, id)
		if err != nil {
			return err
		}
		if err := change(tx, j, now); err != nil {
			return err
		}
		job, err = tx.jobGet(ctx, id)
		return err
	})
	return job, err
}

// leaseMiss explains why a write conditioned on (id, lease, running)
// touched no row.
func (s *sqlStore) leaseMiss(ctx context.Context, id string) error {
	j, err := s.jobGet(ctx, id)
	if err != nil {
		return err
	}
	if j.State.Terminal() {
		return &PreconditionError{ID: id, State: j.State, Reason: "the job has finished"}
	}
	return errLeaseLost
}

func (s *sqlStore) JobFinish(ctx context.Context, p *JobFinishParams) (*Job, error) {
	var v violations
	checkID(&v, "id", p.ID)
	checkID(&v, "lease", p.Lease)
	if !p.State.Terminal() {
		v.add("state", "must be succeeded, failed or cancelled, got %q", p.State)
	}
	checkNow(&v, p.Now)
	if err := v.err(); err != nil {
		return nil, err
	}
	now := timeToDB(p.Now)
	var job *Job
	err := s.inTx(ctx, func(tx *sqlStore) error {
		n, err := tx.q.exec(ctx, `UPDATE dampfront_job SET state = ?, error = ?, partial = ?, finished_at = ?, updated_at = ?
			WHERE id = ? AND lease = ? AND state = ?`,
			string(p.State), p.Error, boolToDB(p.Partial), now, now, p.ID, p.Lease, string(StateRunning))
		if err != nil {
			return err
		}
		if n == 0 {
			return tx.leaseMiss(ctx, p.ID)
		}
		job, err = tx.jobGet(ctx, p.ID)
		return err
	})
	return job, err
}
