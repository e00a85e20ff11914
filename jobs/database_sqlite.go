package jobs

import (
	"context"
	"database/sql"
	"fmt"

	"github.com/riverqueue/river/riverdriver/riversqlite"
	"github.com/riverqueue/river/rivermigrate"
	_ "modernc.org/sqlite" // registers the pure-Go "sqlite" database/sql driver
)

// sqliteBusyTimeoutMS is how long a statement waits for another
// connection's write lock before failing with SQLITE_BUSY. Writes here are
// short (a checkpoint of a few kilobytes), so 10 s only ever elapses when
// something is wrong.
const sqliteBusyTimeoutMS = 10000

// sqliteDSN opens path in WAL mode (readers never block the writer, and a
// process killed mid-write leaves the file consistent), with a busy
// timeout, foreign keys on, and write-locking transactions
// (BEGIN IMMEDIATE), so two processes on one file queue for the lock
// instead of failing on a read-to-write upgrade.
func sqliteDSN(path string) string {
	return fmt.Sprintf("%s?_pragma=busy_timeout(%d)&_pragma=journal_mode(WAL)&_pragma=foreign_keys(1)&_txlock=immediate",
		path, sqliteBusyTimeoutMS)
}

// openSQLite opens (creating if needed) the SQLite file at path and
// migrates River's tables and this package's. One connection only: SQLite
// has one writer at a time, and a single pooled connection turns lock
// contention inside the process into queueing in database/sql.
func openSQLite(ctx context.Context, path string) (*database[*sql.Tx], error) {
	db, err := sql.Open("sqlite", sqliteDSN(path))
	if err != nil {
		return nil, fmt.Errorf("jobs: open SQLite %s: %w", path, err)
	}
	db.SetMaxOpenConns(1)
	if err := db.PingContext(ctx); err != nil {
		_ = db.Close()
		return nil, fmt.Errorf("jobs: open SQLite %s: %w", path, err)
	}
	driver := riversqlite.New(db)
	d := &database[*sql.Tx]{
		backend: backendSQLite,
		driver:  driver,
		store:   newSQLiteStore(db),
		begin: func(ctx context.Context) (*sql.Tx, *sqlStore, error) {
			tx, err := db.BeginTx(ctx, nil)
			if err != nil {
				return nil, nil, err
			}
			return tx, &sqlStore{q: stdQuerier{tx}}, nil
		},
		commit:   func(_ context.Context, tx *sql.Tx) error { return tx.Commit() },
		rollback: func(_ context.Context, tx *sql.Tx) { _ = tx.Rollback() },
		close:    db.Close,
	}
	migrator, err := rivermigrate.New(driver, nil)
	if err == nil {
		_, err = migrator.Migrate(ctx, rivermigrate.DirectionUp, nil)
	}
	if err != nil {
		_ = db.Close()
		return nil, fmt.Errorf("jobs: migrate River tables in %s: %w", path, err)
	}
	if _, err := migrateUp(ctx, d.store, backendSQLite); err != nil {
		_ = db.Close()
		return nil, err
	}
	return d, nil
}

// newSQLiteStore returns the store over db, which the caller migrates.
func newSQLiteStore(db *sql.DB) *sqlStore {
	return &sqlStore{
		q: stdQuerier{db},
		begin: func(ctx context.Context) (querier, func(context.Context) error, func(context.Context), error) {
			tx, err := db.BeginTx(ctx, nil)
			if err != nil {
				return nil, nil, nil, err
			}
			return stdQuerier{tx}, func(context.Context) error { return tx.Commit() }, func(context.Context) { _ = tx.Rollback() }, nil
		},
	}
}
