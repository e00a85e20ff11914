package main

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
)

var cancelCommand = &command{
	name:    "cancel",
	summary: "cancel jobs; a running job keeps its front so far, marked partial",
	run:     runCancel,
}

func runCancel(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, "cancel", "[flags] JOB...", `
Requests cancellation of each job. A queued job is cancelled at once; a
running one stops within seconds, wherever its worker runs, and keeps its
front so far, marked partial. Prints one line per job.`)
	cf := addClientFlags(fs, e)
	pos, err := fs.parse(args, 1, -1)
	if err != nil {
		return err
	}
	c, err := cf.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	var firstErr error
	for _, id := range pos {
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
