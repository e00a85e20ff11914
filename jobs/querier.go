package jobs

import (
	"context"
	"database/sql"
	"errors"
	"strconv"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

// querier is the little of a database handle that the SQL store uses; it
// hides the difference between database/sql (SQLite) and pgx (PostgreSQL),
// pools and transactions alike.
type querier interface {
	exec(ctx context.Context, query string, args ...any) (rowsAffected int64, err error)
	query(ctx context.Context, query string, args ...any) (rowsIter, error)
	queryRow(ctx context.Context, query string, args ...any) rowScanner
}

type rowsIter interface {
	Next() bool
	Scan(dest ...any) error
	Err() error
	Close()
}

type rowScanner interface {
	Scan(dest ...any) error
}

// errNoRows is what a rowScanner of either backend returns for no row.
var errNoRows = errors.New("jobs: no rows")

// sqlDBTX is satisfied by *sql.DB, *sql.Conn and *sql.Tx.
type sqlDBTX interface {
	ExecContext(ctx context.Context, query string, args ...any) (sql.Result, error)
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
}

type stdQuerier struct{ db sqlDBTX }

func (q stdQuerier) exec(ctx context.Context, query string, args ...any) (int64, error) {
	res, err := q.db.ExecContext(ctx, query, args...)
	if err != nil {
		return 0, err
	}
	return res.RowsAffected()
}

func (q stdQuerier) query(ctx context.Context, query string, args ...any) (rowsIter, error) {
	rows, err := q.db.QueryContext(ctx, query, args...)
	if err != nil {
		return nil, err
	}
	return stdRows{rows}, nil
}

func (q stdQuerier) queryRow(ctx context.Context, query string, args ...any) rowScanner {
	return stdRow{q.db.QueryRowContext(ctx, query, args...)}
}

type stdRows struct{ *sql.Rows }

func (r stdRows) Close() { _ = r.Rows.Close() }

type stdRow struct{ row *sql.Row }

func (r stdRow) Scan(dest ...any) error {
	err := r.row.Scan(dest...)
	if errors.Is(err, sql.ErrNoRows) {
		return errNoRows
	}
	return err
}

// pgxDBTX is satisfied by *pgxpool.Pool, *pgx.Conn and pgx.Tx.
type pgxDBTX interface {
	Exec(ctx context.Context, sql string, args ...any) (pgconn.CommandTag, error)
	Query(ctx context.Context, sql string, args ...any) (pgx.Rows, error)
	QueryRow(ctx context.Context, sql string, args ...any) pgx.Row
}

// pgxQuerier rewrites the store's ? placeholders to PostgreSQL's $n.
type pgxQuerier struct{ db pgxDBTX }

func (q pgxQuerier) exec(ctx context.Context, query string, args ...any) (int64, error) {
	tag, err := q.db.Exec(ctx, rebindDollar(query), args...)
	if err != nil {
		return 0, err
	}
	return tag.RowsAffected(), nil
}

func (q pgxQuerier) query(ctx context.Context, query string, args ...any) (rowsIter, error) {
	rows, err := q.db.Query(ctx, rebindDollar(query), args...)
	if err != nil {
		return nil, err
	}
	return rows, nil
}

func (q pgxQuerier) queryRow(ctx context.Context, query string, args ...any) rowScanner {
	return pgxRow{q.db.QueryRow(ctx, rebindDollar(query), args...)}
}

type pgxRow struct{ row pgx.Row }

func (r pgxRow) Scan(dest ...any) error {
	err := r.row.Scan(dest...)
	if errors.Is(err, pgx.ErrNoRows) {
		return errNoRows
	}
	return err
}

// rebindDollar turns each ? into $1, $2, ... The store's statements hold no
// ? inside string literals.
func rebindDollar(query string) string {
	if !strings.Contains(query, "?") {
		return query
	}
	var b strings.Builder
	b.Grow(len(query) + 16)
	n := 0
	for i := 0; i < len(query); i++ {
		if query[i] == '?' {
			n++
			b.WriteByte('$')
			b.WriteString(strconv.Itoa(n))
			continue
		}
		b.WriteByte(query[i])
	}
	return b.String()
}

// isUniqueViolation recognises a primary-key or unique-index clash on
// either backend.
func isUniqueViolation(err error) bool {
	var pgErr *pgconn.PgError
	if errors.As(err, &pgErr) {
		return pgErr.Code == "23505"
	}
	return err != nil && strings.Contains(err.Error(), "UNIQUE constraint failed")
}
