package main

import (
	"context"
	"fmt"

	"dampfront/jobs"
)

var migrateCommand = &command{
	name:    "migrate",
	summary: "create or upgrade the database tables, then exit",
	run:     runMigrate,
}

func runMigrate(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, "migrate", "[flags]", `
Creates the database (a SQLite file) or upgrades its tables, the queue's
and dampfront's, to this binary's version, then exits. serve and worker
do the same at start; run migrate first where several processes start at
once or the serving account may not change the schema.`)
	ef, err := addEngineFlags(fs, e, false)
	if err != nil {
		return err
	}
	if _, err := fs.parse(args, 0, 0); err != nil {
		return err
	}
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
