package jobs

import "context"

// Both statements of JobCounts read dampfront_job through the index
// dampfront_job_state_created (state, created_at, id) of migration 001:
//
//   - the count groups by the index's leading column: SQLite scans the
//     index alone (a covering index: no table row, no spec, is read);
//     PostgreSQL picks an index-only scan or a sequential scan with a hash
//     aggregate by its statistics (with 2000 jobs, the sequential scan).
//     Either way it is one pass that sends the client one row per state;
//   - the oldest checkpoint searches the index for state = 'running' and
//     looks up only those jobs and their checkpoints (by primary key), so
//     its cost follows the running jobs, not the jobs stored.
//
// TestJobCountsSQLitePlan holds SQLite to these plans.
//
// They run as two statements, not in one transaction: a SQLite
// transaction here takes the write lock (BEGIN IMMEDIATE), which a
// metrics read must not. A job that changes state between them can make
// the two figures disagree for one scrape; the next agrees again.
const (
	jobCountsSQL = `SELECT state, COUNT(*) FROM dampfront_job GROUP BY state`

	// oldestRunningSQL takes each running job's checkpoint time, or its
	// start time without one, and skips 0 (unset) as the collector did.
	oldestRunningSQL = `SELECT COALESCE(MIN(COALESCE(c.saved_at, j.started_at)), 0)
		FROM dampfront_job j LEFT JOIN dampfront_checkpoint c ON c.job_id = j.id
		WHERE j.state = ? AND COALESCE(c.saved_at, j.started_at) <> 0`
)

func (s *sqlStore) JobCounts(ctx context.Context, _ *JobCountsParams) (*JobCountsResult, error) {
	res := &JobCountsResult{ByState: make(map[State]int, len(States))}
	for _, st := range States {
		res.ByState[st] = 0
	}
	rows, err := s.q.query(ctx, jobCountsSQL)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	for rows.Next() {
		var (
			state string
			n     int64
		)
		if err := rows.Scan(&state, &n); err != nil {
			return nil, err
		}
		res.ByState[State(state)] = int(n)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	rows.Close() // SQLite has one connection: free it for the next statement

	var oldest int64
	if err := s.q.queryRow(ctx, oldestRunningSQL, string(StateRunning)).Scan(&oldest); err != nil {
		return nil, err
	}
	res.OldestRunningSince = timeFromDB(oldest)
	return res, nil
}
