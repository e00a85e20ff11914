package jobs

import (
	"context"
	"strings"
	"testing"
)

// With SkipMigrate a process opens a PostgreSQL database only once
// `dampfront migrate` (here: an ordinary Open) has brought it up to date,
// and says what to do before that.
func TestSkipMigrate(t *testing.T) {
	t.Parallel()
	url := testPostgresURL(t) // a fresh, empty schema
	ctx := context.Background()
	_, err := Open(ctx, Config{DatabaseURL: url, SkipMigrate: true}, &toyOpener{})
	if err == nil || !strings.Contains(err.Error(), "dampfront migrate") {
		t.Fatalf("open of an unmigrated database without migrating: %v, want an error naming dampfront migrate", err)
	}
	e, err := Open(ctx, Config{DatabaseURL: url}, &toyOpener{})
	if err != nil {
		t.Fatal(err)
	}
	if err := e.Close(); err != nil {
		t.Fatal(err)
	}
	e, err = Open(ctx, Config{DatabaseURL: url, SkipMigrate: true}, &toyOpener{})
	if err != nil {
		t.Fatalf("open of a migrated database without migrating: %v", err)
	}
	if err := e.Close(); err != nil {
		t.Fatal(err)
	}
}
