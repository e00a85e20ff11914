package main

import (
	"context"
	"fmt"

	"dampfront/jobs"
)

// migrateAbout is the help text of migrate.
const migrateAbout = `
Creates the database (a SQLite file) or upgrades its tables, the queue's
and dampfront's, to this binary's version, then exits. serve and worker
do the same at start; run migrate first where several processes start at
once or the serving account may not change the schema.`

var migrateCommand = &command{name: "migrate", synopsis: "[flags]",
	summary: "create or upgrade the database tables, then exit", about: migrateAbout, flags: bindMigrate}

func bindMigrate(fs *flagSet, e *env) (runFunc, error) {
	ef, err := addEngineFlags(fs, e, false)
	return func(ctx context.Context, e *env, _ *parsed) error { return runMigrate(ctx, e, ef) }, err
}

func runMigrate(ctx context.Context, e *env, ef *engineFlags) error {
	if err := ef.check("migrate"); err != nil {
		return err
	}
	eng, err := openEngine(ctx, jobs.Config{DatabaseURL: ef.database, Logger: ef.logger(e.stderr)}, 0)
	if err != nil {
		return err
	}
	backend := eng.Backend()
	if err := eng.Close(); err != nil {
		return err
	}
	fmt.Fprintf(e.stdout, "database %s (%s) is migrated\n", redactURL(ef.database), backend)
	return nil
}
