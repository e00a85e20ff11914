package jobs

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/riverqueue/river/riverdriver/riverpgxv5"
	"github.com/riverqueue/river/rivermigrate"
)

// pgMigrationLockKey is the PostgreSQL advisory lock that keeps migrators
// of several processes apart (an arbitrary constant of this project).
const pgMigrationLockKey int64 = 0x64616d7066726f6e // "dampfron"

// openPostgres connects to url (a pgx connection string; search_path may
// be given as a query parameter) and migrates River's tables and this
// package's, under an advisory lock so that workers starting together do
// not migrate twice. With migrate false it only checks that both are
// current, for processes whose database role may not change the schema.
func openPostgres(ctx context.Context, url string, migrate bool) (*database[pgx.Tx], error) {
	pool, err := pgxpool.New(ctx, url)
	if err != nil {
		return nil, fmt.Errorf("jobs: open PostgreSQL: %w", err)
	}
	if err := pool.Ping(ctx); err != nil {
		pool.Close()
		return nil, fmt.Errorf("jobs: open PostgreSQL: %w", err)
	}
	driver := riverpgxv5.New(pool)
	d := &database[pgx.Tx]{
		backend: backendPostgres,
		driver:  driver,
		store:   newPostgresStore(pool),
		begin: func(ctx context.Context) (pgx.Tx, *sqlStore, error) {
			tx, err := pool.Begin(ctx)
			if err != nil {
				return nil, nil, err
			}
			return tx, &sqlStore{q: pgxQuerier{tx}}, nil
		},
		commit:   func(ctx context.Context, tx pgx.Tx) error { return tx.Commit(ctx) },
		rollback: func(ctx context.Context, tx pgx.Tx) { _ = tx.Rollback(context.WithoutCancel(ctx)) },
		close:    func() error { pool.Close(); return nil },
	}
	check := migratePostgres
	if !migrate {
		check = checkPostgresSchema
	}
	if err := check(ctx, pool, d); err != nil {
		pool.Close()
		return nil, err
	}
	return d, nil
}

// checkPostgresSchema returns an error naming the remedy when River's
// tables or this package's are behind the binary's migrations.
func checkPostgresSchema(ctx context.Context, _ *pgxpool.Pool, d *database[pgx.Tx]) error {
	migrator, err := rivermigrate.New(d.driver, nil)
	if err != nil {
		return fmt.Errorf("jobs: check River tables: %w", err)
	}
	res, err := migrator.Validate(ctx, nil)
	if err != nil {
		return fmt.Errorf("jobs: check River tables: %w", err)
	}
	if !res.OK {
		return fmt.Errorf("jobs: the database's River tables are not current (%s): run `dampfront migrate` first, or start without skipping migrations", strings.Join(res.Messages, "; "))
	}
	ms, err := loadMigrations(backendPostgres)
	if err != nil {
		return err
	}
	var have int64
	err = d.store.q.queryRow(ctx, `SELECT COALESCE(MAX(version), 0) FROM dampfront_migration`).Scan(&have)
	if err != nil || int(have) < ms[len(ms)-1].version {
		return fmt.Errorf("jobs: the database's dampfront tables are at version %d, this binary needs %d: run `dampfront migrate` first, or start without skipping migrations", have, ms[len(ms)-1].version)
	}
	return nil
}

func migratePostgres(ctx context.Context, pool *pgxpool.Pool, d *database[pgx.Tx]) (err error) {
	conn, err := pool.Acquire(ctx)
	if err != nil {
		return fmt.Errorf("jobs: migrate: %w", err)
	}
	defer conn.Release()
	if _, err := conn.Exec(ctx, `SELECT pg_advisory_lock($1)`, pgMigrationLockKey); err != nil {
		return fmt.Errorf("jobs: migrate: take lock: %w", err)
	}
	defer func() {
		_, uerr := conn.Exec(context.WithoutCancel(ctx), `SELECT pg_advisory_unlock($1)`, pgMigrationLockKey)
		err = errors.Join(err, uerr)
	}()
	migrator, err := rivermigrate.New(d.driver, nil)
	if err == nil {
		_, err = migrator.Migrate(ctx, rivermigrate.DirectionUp, nil)
	}
	if err != nil {
		return fmt.Errorf("jobs: migrate River tables: %w", err)
	}
	_, err = migrateUp(ctx, d.store, backendPostgres)
	return err
}

// newPostgresStore returns the store over pool, which the caller migrates.
func newPostgresStore(pool *pgxpool.Pool) *sqlStore {
	return &sqlStore{
		q: pgxQuerier{pool},
		begin: func(ctx context.Context) (querier, func(context.Context) error, func(context.Context), error) {
			tx, err := pool.Begin(ctx)
			if err != nil {
				return nil, nil, nil, err
			}
			return pgxQuerier{tx}, tx.Commit, func(ctx context.Context) { _ = tx.Rollback(context.WithoutCancel(ctx)) }, nil
		},
	}
}
