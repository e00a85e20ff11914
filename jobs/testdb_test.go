package jobs

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"net/url"
	"os"
	"path/filepath"
	"testing"

	"github.com/jackc/pgx/v5/pgxpool"
)

// testDatabaseURLEnv names the variable that points the tests at a
// PostgreSQL database; CI sets it, and the PostgreSQL tests are skipped
// only when it is unset.
const testDatabaseURLEnv = "DAMPFRONT_TEST_DATABASE_URL"

// testSQLitePath returns a fresh database file in the test's temp dir.
func testSQLitePath(t testing.TB) string {
	t.Helper()
	return filepath.Join(t.TempDir(), "dampfront.db")
}

// testPostgresURL creates a schema of the test's own in the database named
// by DAMPFRONT_TEST_DATABASE_URL, drops it when the test ends, and returns
// a URL whose search_path selects it. It skips the test when the variable
// is unset.
func testPostgresURL(t testing.TB) string {
	t.Helper()
	base := os.Getenv(testDatabaseURLEnv)
	if base == "" {
		t.Skipf("%s is not set; PostgreSQL tests skipped", testDatabaseURLEnv)
	}
	ctx := context.Background()
	admin, err := pgxpool.New(ctx, base)
	if err != nil {
		t.Fatalf("connect to %s: %v", testDatabaseURLEnv, err)
	}
	var b [6]byte
	if _, err := rand.Read(b[:]); err != nil {
		t.Fatal(err)
	}
	schema := "dampfront_test_" + hex.EncodeToString(b[:])
	if _, err := admin.Exec(ctx, `CREATE SCHEMA `+schema); err != nil {
		admin.Close()
		t.Fatalf("create schema: %v", err)
	}
	t.Cleanup(func() {
		defer admin.Close()
		if _, err := admin.Exec(context.Background(), `DROP SCHEMA `+schema+` CASCADE`); err != nil {
			t.Errorf("drop schema %s: %v", schema, err)
		}
	})
	u, err := url.Parse(base)
	if err != nil {
		t.Fatalf("parse %s: %v", testDatabaseURLEnv, err)
	}
	q := u.Query()
	q.Set("search_path", schema)
	u.RawQuery = q.Encode()
	return u.String()
}

// newTestSQLiteStore opens a migrated SQLite store on a fresh file.
func newTestSQLiteStore(t testing.TB) Store {
	t.Helper()
	db, err := openSQLite(context.Background(), testSQLitePath(t))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = db.close() })
	return db.store
}

// newTestPostgresStore opens a migrated PostgreSQL store in a fresh schema.
func newTestPostgresStore(t testing.TB) Store {
	t.Helper()
	db, err := openPostgres(context.Background(), testPostgresURL(t), true)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = db.close() })
	return db.store
}
