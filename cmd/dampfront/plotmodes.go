package main

import (
	"context"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

// plotModes draws the modal damping ratios across a job's front against
// the objective at position objective[0] (the first without).
func plotModes(ctx context.Context, c *client, job string, objective []int, page plotPage) (*plot.Figure, error) {
	if len(objective) > 1 {
		return nil, usagef("plot", "the modes chart takes one objective position, got %d", len(objective))
	}
	fd, err := fetchFront(ctx, c, job, pb.SolutionView_SOLUTION_VIEW_FULL)
	if err != nil {
		return nil, err
	}
	opt := plot.ModalOptions{Title: "Modal damping ratios across the front, " + jobTitle(fd.job)}
	if len(objective) == 1 {
		opt.Objective = objective[0]
	}
	fig, err := plot.ModalRatios(fd.front, opt)
	if err != nil {
		return nil, err
	}
	fig.Notes = append(fig.Notes, jobNote(fd.job))
	return page.apply(fig), nil
}
