package main

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
)

// cancelAbout is the help text of cancel.
const cancelAbout = `
Requests cancellation of each job. A queued job is cancelled at once; a
running one stops within seconds, wherever its worker runs, and keeps its
front so far, marked partial. Prints one line per job.`

var cancelCommand = &command{name: "cancel", synopsis: "[flags] JOB...", minArgs: 1, maxArgs: -1, client: true,
	summary: "cancel jobs; a running job keeps its front so far, marked partial", about: cancelAbout, run: runCancel}

func runCancel(ctx context.Context, e *env, in *parsed) error {
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	var firstErr error
	for _, id := range in.args {
		cctx, cancel := c.call(ctx)
		resp, err := c.svc.CancelJob(cctx, &pb.CancelJobRequest{Name: jobName(id)})
		cancel()
		if err != nil {
			fmt.Fprintf(e.stderr, "dampfront cancel: %s: %s\n", jobName(id), describeError(err))
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		j := resp.GetJob()
		what := "cancel requested, stopping"
		if terminal(j.GetState()) {
			what = stateName(j.GetState())
		}
		fmt.Fprintf(e.stdout, "%s %s\n", j.GetName(), what)
	}
	if firstErr != nil {
		code := exitFailure
		if inputError(firstErr) {
			code = exitUsage
		}
		return &exitError{code: code}
	}
	return nil
}
