package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"

	"dampfront/api/sheet"
)

var sheetCommand = &command{name: "sheet", synopsis: "[flags] JOB", minArgs: 1, maxArgs: 1, client: true,
	summary: "write the damper specification sheet of a front solution as a printable HTML page", about: sheetAbout, flags: bindSheet}

// sheetAbout is the help text of sheet.
const sheetAbout = `
Writes the damper specification sheet of one solution of a finished job's
front (--solution, or the balanced point by default) as a printable HTML
page (A4 print styles; print it to PDF from a browser): per corner the
damper forces at 25, 50, 100, 150, 200, 250 and 300 mm/s in bump and
rebound (common dyno practice) with a +/-10 % tolerance band (common
practice) and the adjuster range's forces, the curves with their adjuster
band, damping ratios, ride rates and frequencies, the modes per road case
with the hand figures beside them, the objectives, the job and solution it
comes from, and the caution. The job page links the same sheet for each
solution.`

func bindSheet(fs *flagSet, _ *env) (runFunc, error) {
	solution := fs.Int("solution", sheet.NoSolution, "`index` of a solution of the job's front (default: the balanced point)")
	out := fs.String("o", "", "write the page to this `file` (default: sheet-JOB-N.html)")
	return func(ctx context.Context, e *env, in *parsed) error {
		if isFlagSet(in.fs, "solution") && *solution < 0 {
			return usagef("sheet", "--solution must be a front index >= 0")
		}
		c, err := in.client.dial()
		if err != nil {
			return err
		}
		defer c.Close()
		cctx, cancel := c.call(ctx)
		s, err := sheet.Fetch(cctx, c.svc, jobName(in.args[0]), *solution)
		cancel()
		var nf *sheet.NotFoundError
		if errors.As(err, &nf) {
			return &exitError{code: exitUsage, msg: err.Error()}
		}
		if err != nil {
			return err
		}
		var b bytes.Buffer
		if err := sheet.WriteHTML(&b, s); err != nil {
			return err
		}
		path := *out
		if path == "" {
			path = fmt.Sprintf("sheet-%s-%d.html", jobID(in.args[0]), s.Index)
		}
		if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "Wrote %s (damper specification sheet, solution %d%s).\n", path, s.Index, balancedNote(s.Balanced))
		printCaution(e.stdout)
		return nil
	}, nil
}

// balancedNote is ", the balanced point" for the balanced point.
func balancedNote(b bool) string {
	if b {
		return ", the balanced point"
	}
	return ""
}
