package main

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

// plotHistory draws the time history of a solution of a job's front (the
// balanced point when solution < 0) on its manoeuvre or kerb case named
// caseName (the first when empty), simulated by the server, with the
// solution's steady values.
func plotHistory(ctx context.Context, cf *clientFlags, job string, solution int, caseName string, page plotPage) (*plot.Figure, error) {
	c, err := cf.dial()
	if err != nil {
		return nil, err
	}
	defer c.Close()
	fd, err := fetchFront(ctx, c, job, pb.SolutionView_SOLUTION_VIEW_FULL)
	if err != nil {
		return nil, err
	}
	s, what, err := pickSolution(fd, job, solution)
	if err != nil {
		return nil, err
	}
	resp, err := unary(ctx, c, c.svc.GetTransientHistory, &pb.GetTransientHistoryRequest{
		Source: &pb.GetTransientHistoryRequest_Job{Job: job}, Setup: s.GetSetup(), CaseName: caseName})
	if err != nil {
		return nil, err
	}
	fig, err := plot.TransientHistory(resp, plot.HistoryOptions{
		Title:  fmt.Sprintf("Time history, %s: %s", resp.GetCaseName(), what),
		Steady: plot.SolutionTransient(s, resp.GetCaseName())})
	if err != nil {
		return nil, err
	}
	fig.Notes = append(fig.Notes, "Setup: "+setupText(s.GetSetup())+".", jobNote(fd.job))
	return page.apply(fig), nil
}

// pickSolution is the solution of a front whose index is solution, or
// its balanced point when solution < 0, with words naming it.
func pickSolution(fd *frontData, job string, solution int) (*pb.Solution, string, error) {
	sols := fd.front.GetSolutions()
	if solution >= 0 {
		for _, s := range sols {
			if int(s.GetIndex()) == solution {
				return s, fmt.Sprintf("solution %d", solution), nil
			}
		}
		return nil, "", &exitError{code: exitUsage, msg: fmt.Sprintf("the front of %s has no solution %d (it has %d solutions)", job, solution, len(sols))}
	}
	b := balancedIndex(sols)
	if b < 0 {
		return nil, "", &exitError{code: exitFailure, msg: "the front of " + job + " is empty: no balanced point"}
	}
	return sols[b], fmt.Sprintf("balanced point, solution %d", sols[b].GetIndex()), nil
}
