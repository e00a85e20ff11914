package jobs

import (
	"context"
	"embed"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strconv"
	"strings"
	"time"
)

// migrationFS holds the store's numbered migrations, one directory per
// backend: migrations/<backend>/NNN_name.up.sql, applied in number order,
// each in its own transaction together with its row in
// dampfront_migration.
//
//go:embed migrations
var migrationFS embed.FS

type migration struct {
	version int
	name    string
	sql     string
}

func loadMigrations(backend string) ([]migration, error) {
	dir := path.Join("migrations", backend)
	entries, err := fs.ReadDir(migrationFS, dir)
	if err != nil {
		return nil, err
	}
	var ms []migration
	for _, e := range entries {
		name := e.Name()
		if !strings.HasSuffix(name, ".up.sql") {
			continue
		}
		num, _, ok := strings.Cut(name, "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil || v <= 0 {
			return nil, fmt.Errorf("jobs: migration file %s has no leading version number", name)
		}
		b, err := fs.ReadFile(migrationFS, path.Join(dir, name))
		if err != nil {
			return nil, err
		}
		ms = append(ms, migration{version: v, name: strings.TrimSuffix(name, ".up.sql"), sql: string(b)})
	}
	sort.Slice(ms, func(i, j int) bool { return ms[i].version < ms[j].version })
	for i := 1; i < len(ms); i++ {
		if ms[i].version == ms[i-1].version {
			return nil, fmt.Errorf("jobs: two migrations numbered %d", ms[i].version)
		}
	}
	return ms, nil
}

// migrateUp applies the backend's migrations that dampfront_migration does
// not list yet. Concurrent migrators are kept apart by the caller
// (PostgreSQL: an advisory lock) or by the database (SQLite: BEGIN
// IMMEDIATE takes the write lock before the version is read).
func migrateUp(ctx context.Context, s *sqlStore, backend string) ([]int, error) {
	ms, err := loadMigrations(backend)
	if err != nil {
		return nil, err
	}
	if _, err := s.q.exec(ctx, `CREATE TABLE IF NOT EXISTS dampfront_migration (
		version    BIGINT NOT NULL PRIMARY KEY,
		name       TEXT   NOT NULL,
		applied_at BIGINT NOT NULL)`); err != nil {
		return nil, fmt.Errorf("jobs: create migration table: %w", err)
	}
	var applied []int
	for _, m := range ms {
		done := false
		err := s.inTx(ctx, func(tx *sqlStore) error {
			var n int64
			if err := tx.q.queryRow(ctx, `SELECT COUNT(*) FROM dampfront_migration WHERE version = ?`, int64(m.version)).Scan(&n); err != nil {
				return err
			}
			if n > 0 {
				done = true
				return nil
			}
			if _, err := tx.q.exec(ctx, m.sql); err != nil {
				return err
			}
			_, err := tx.q.exec(ctx, `INSERT INTO dampfront_migration (version, name, applied_at) VALUES (?, ?, ?)`,
				int64(m.version), m.name, time.Now().UnixNano())
			return err
		})
		if err != nil {
			return applied, fmt.Errorf("jobs: migration %s: %w", m.name, err)
		}
		if !done {
			applied = append(applied, m.version)
		}
	}
	return applied, nil
}
