package jobs

import (
	"context"
	"errors"
	"strings"
)

// progressUpdate writes p into the job row if lease still holds it.
func (s *sqlStore) progressUpdate(ctx context.Context, id, lease string, p Progress, now int64) error {
	n, err := s.q.exec(ctx, `UPDATE dampfront_job SET generation = ?, generations = ?, evaluations = ?,
		hypervolume = ?, best = ?, updated_at = ? WHERE id = ? AND lease = ? AND state = ?`,
		int64(p.Generation), int64(p.Generations), p.Evaluations, p.Hypervolume, encodeFloats(p.Best), now,
		id, lease, string(StateRunning))
	if err != nil {
		return err
	}
	if n == 0 {
		return s.leaseMiss(ctx, id)
	}
	return nil
}

func checkProgress(v *violations, p Progress) {
	if p.Generation < 0 {
		v.add("progress.generation", "must not be negative, got %d", p.Generation)
	}
	if p.Generations < 0 {
		v.add("progress.generations", "must not be negative, got %d", p.Generations)
	}
	if p.Evaluations < 0 {
		v.add("progress.evaluations", "must not be negative, got %d", p.Evaluations)
	}
}

func (s *sqlStore) CheckpointSave(ctx context.Context, p *CheckpointSaveParams) error {
	var v violations
	checkID(&v, "job_id", p.JobID)
	checkID(&v, "lease", p.Lease)
	if len(p.Data) == 0 {
		v.add("data", "is required")
	}
	checkProgress(&v, p.Progress)
	if p.Now.IsZero() {
		v.add("now", "is required")
	}
	if err := v.err(); err != nil {
		return err
	}
	now := timeToDB(p.Now)
	return s.inTx(ctx, func(tx *sqlStore) error {
		if err := tx.progressUpdate(ctx, p.JobID, p.Lease, p.Progress, now); err != nil {
			return err
		}
		_, err := tx.q.exec(ctx, `INSERT INTO dampfront_checkpoint (job_id, data, generation, saved_at) VALUES (?, ?, ?, ?)
			ON CONFLICT (job_id) DO UPDATE SET data = excluded.data, generation = excluded.generation, saved_at = excluded.saved_at`,
			p.JobID, p.Data, int64(p.Progress.Generation), now)
		return err
	})
}

func (s *sqlStore) CheckpointGet(ctx context.Context, p *CheckpointGetParams) (*Checkpoint, error) {
	var v violations
	checkID(&v, "job_id", p.JobID)
	if err := v.err(); err != nil {
		return nil, err
	}
	var (
		c          = Checkpoint{JobID: p.JobID}
		gen, saved int64
	)
	err := s.q.queryRow(ctx, `SELECT data, generation, saved_at FROM dampfront_checkpoint WHERE job_id = ?`, p.JobID).
		Scan(&c.Data, &gen, &saved)
	if errors.Is(err, errNoRows) {
		if _, err := s.jobGet(ctx, p.JobID); err != nil {
			return nil, err
		}
		return nil, &NotFoundError{Resource: "checkpoint", ID: p.JobID}
	}
	if err != nil {
		return nil, err
	}
	c.Generation, c.SavedAt = int(gen), timeFromDB(saved)
	return &c, nil
}

func (s *sqlStore) ProgressPut(ctx context.Context, p *ProgressPutParams) error {
	var v violations
	checkID(&v, "job_id", p.JobID)
	checkID(&v, "lease", p.Lease)
	checkProgress(&v, p.Progress)
	if p.Now.IsZero() {
		v.add("now", "is required")
	}
	if err := v.err(); err != nil {
		return err
	}
	return s.progressUpdate(ctx, p.JobID, p.Lease, p.Progress, timeToDB(p.Now))
}

func (s *sqlStore) ProgressGet(ctx context.Context, p *ProgressGetParams) (*Progress, error) {
	var v violations
	checkID(&v, "job_id", p.JobID)
	if err := v.err(); err != nil {
		return nil, err
	}
	j, err := s.jobGet(ctx, p.JobID)
	if err != nil {
		return nil, err
	}
	return &j.Progress, nil
}

// frontInsertBatch is the number of solutions per INSERT statement: 7
// parameters each stays far below both backends' parameter limits
// (SQLite 32766, PostgreSQL 65535).
const frontInsertBatch = 200

func (s *sqlStore) FrontPut(ctx context.Context, p *FrontPutParams) error {
	var v violations
	checkID(&v, "job_id", p.JobID)
	checkID(&v, "lease", p.Lease)
	for i, sol := range p.Solutions {
		if sol.Index != i {
			v.add("solutions", "solution %d has index %d; indices must run 0, 1, 2, ...", i, sol.Index)
			break
		}
	}
	if err := v.err(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx *sqlStore) error {
		var lease, state string
		err := tx.q.queryRow(ctx, `SELECT lease, state FROM dampfront_job WHERE id = ?`, p.JobID).Scan(&lease, &state)
		if errors.Is(err, errNoRows) {
			return &NotFoundError{Resource: "job", ID: p.JobID}
		}
		if err != nil {
			return err
		}
		if lease != p.Lease || State(state) != StateRunning {
			return tx.leaseMiss(ctx, p.JobID)
		}
		if _, err := tx.q.exec(ctx, `DELETE FROM dampfront_front WHERE job_id = ?`, p.JobID); err != nil {
			return err
		}
		if _, err := tx.q.exec(ctx, `UPDATE dampfront_job SET summary = ? WHERE id = ?`, p.Summary, p.JobID); err != nil {
			return err
		}
		for start := 0; start < len(p.Solutions); start += frontInsertBatch {
			batch := p.Solutions[start:min(start+frontInsertBatch, len(p.Solutions))]
			q := `INSERT INTO dampfront_front (job_id, idx, genes, objectives, violations, feasible, detail) VALUES ` +
				strings.TrimSuffix(strings.Repeat("(?, ?, ?, ?, ?, ?, ?), ", len(batch)), ", ")
			args := make([]any, 0, 7*len(batch))
			for _, sol := range batch {
				detail := sol.Detail
				if detail == nil {
					detail = []byte{}
				}
				args = append(args, p.JobID, int64(sol.Index), encodeFloats(sol.Genes), encodeFloats(sol.Objectives),
					encodeFloats(sol.Violations), boolToDB(sol.Feasible), detail)
			}
			if _, err := tx.q.exec(ctx, q, args...); err != nil {
				return err
			}
		}
		return nil
	})
}

func (s *sqlStore) FrontGet(ctx context.Context, p *FrontGetParams) (*FrontGetResult, error) {
	var v violations
	checkID(&v, "job_id", p.JobID)
	size := checkPageSize(&v, p.PageSize)
	hash := frontQueryHash(p.JobID)
	after := -1
	if p.PageToken != "" {
		tok, ok := decodePageToken(p.PageToken, hash)
		if !ok {
			v.add("page_token", "not a token of this job's front; start without a token")
		}
		after = tok.Index
	}
	if err := v.err(); err != nil {
		return nil, err
	}
	res := &FrontGetResult{}
	err := s.inTx(ctx, func(tx *sqlStore) error {
		if _, err := tx.jobGet(ctx, p.JobID); err != nil {
			return err
		}
		var total int64
		if err := tx.q.queryRow(ctx, `SELECT COUNT(*) FROM dampfront_front WHERE job_id = ?`, p.JobID).Scan(&total); err != nil {
			return err
		}
		res.Total = int(total)
		rows, err := tx.q.query(ctx, `SELECT idx, genes, objectives, violations, feasible, detail FROM dampfront_front
			WHERE job_id = ? AND idx > ? ORDER BY idx LIMIT ?`, p.JobID, int64(after), size+1)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var (
				sol                       Solution
				idx, feasible             int64
				genes, objectives, violat []byte
			)
			if err := rows.Scan(&idx, &genes, &objectives, &violat, &feasible, &sol.Detail); err != nil {
				return err
			}
			sol.Index, sol.Feasible = int(idx), feasible != 0
			if sol.Genes, err = decodeFloats(genes); err != nil {
				return err
			}
			if sol.Objectives, err = decodeFloats(objectives); err != nil {
				return err
			}
			if sol.Violations, err = decodeFloats(violat); err != nil {
				return err
			}
			res.Solutions = append(res.Solutions, sol)
		}
		return rows.Err()
	})
	if err != nil {
		return nil, err
	}
	if len(res.Solutions) > size {
		res.Solutions = res.Solutions[:size]
		res.NextPageToken = pageToken{Query: hash, Index: res.Solutions[size-1].Index}.encode()
	}
	return res, nil
}
