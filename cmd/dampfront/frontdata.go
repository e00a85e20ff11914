package main

import (
	"context"
	"fmt"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// frontData is a whole front with the job it belongs to.
type frontData struct {
	job   *pb.Job   // with its spec
	front *pb.Front // every page joined
}

// fetchFront reads the job and all pages of its front.
func fetchFront(ctx context.Context, c *client, name string, view pb.SolutionView) (*frontData, error) {
	jr, err := unary(ctx, c, c.svc.GetJob, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_FULL})
	if err != nil {
		return nil, err
	}
	get := func(ctx context.Context, req *pb.GetFrontRequest) (*pb.GetFrontResponse, error) {
		return unary(ctx, c, c.svc.GetFront, req)
	}
	front, err := api.ReadWholeFront(ctx, get, &pb.GetFrontRequest{Job: name, PageSize: 1000, View: view})
	if err != nil {
		return nil, err
	}
	if front == nil {
		return nil, fmt.Errorf("the server returned no front for %s", name)
	}
	return &frontData{job: jr.GetJob(), front: front}, nil
}
