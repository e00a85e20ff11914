package jobs

import (
	"context"
	"fmt"
	"strings"

	"github.com/riverqueue/river/riverdriver"
)

// database is one open database: River's driver and this package's store
// over the same connection pool, and transactions that both can use, so
// that a checkpoint, the next slice's queue row and the completion of the
// current one commit together.
type database[TTx any] struct {
	backend string // "sqlite" or "postgres"
	driver  riverdriver.Driver[TTx]
	store   *sqlStore
	// begin opens a transaction and a store bound to it.
	begin    func(ctx context.Context) (TTx, *sqlStore, error)
	commit   func(ctx context.Context, tx TTx) error
	rollback func(ctx context.Context, tx TTx) // no-op after commit
	close    func() error
}

// withTx runs fn in one transaction of db.
func (db *database[TTx]) withTx(ctx context.Context, fn func(tx TTx, st *sqlStore) error) error {
	tx, st, err := db.begin(ctx)
	if err != nil {
		return err
	}
	defer db.rollback(ctx, tx)
	if err := fn(tx, st); err != nil {
		return err
	}
	return db.commit(ctx, tx)
}

// Backend names.
const (
	backendSQLite   = "sqlite"
	backendPostgres = "postgres"
)

// parseDatabaseURL tells the backend and its address apart:
//
//	postgres://... or postgresql://...   PostgreSQL, passed to pgx as is
//	sqlite:///abs/path.db, sqlite:rel.db SQLite file
//	anything else                        SQLite file path
func parseDatabaseURL(u string) (backend, target string, err error) {
	switch {
	case u == "":
		return "", "", &InvalidArgumentError{Violations: []FieldError{{Field: "database_url", Reason: "is required: a SQLite file path or a postgres:// URL"}}}
	case strings.HasPrefix(u, "postgres://"), strings.HasPrefix(u, "postgresql://"):
		return backendPostgres, u, nil
	case strings.HasPrefix(u, "sqlite://"):
		target = strings.TrimPrefix(u, "sqlite://")
	case strings.HasPrefix(u, "sqlite:"):
		target = strings.TrimPrefix(u, "sqlite:")
	default:
		target = u
	}
	if target == "" || strings.ContainsAny(target, "?#") {
		return "", "", &InvalidArgumentError{Violations: []FieldError{{Field: "database_url",
			Reason: fmt.Sprintf("%q is not a usable SQLite file path (empty, or contains ? or #)", u)}}}
	}
	return backendSQLite, target, nil
}
