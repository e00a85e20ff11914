package sheet

import (
	"context"
	_ "embed"
	"fmt"
	"html/template"
	"io"

	"google.golang.org/grpc"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

//go:embed sheet.html
var pageText string

// page is the sheet's one template, for the command line and the job page.
var page = template.Must(template.New("sheet").Parse(pageText))

// WriteHTML writes the sheet as a printable HTML page (A4 print styles,
// the curve chart inline, no script, nothing loaded from elsewhere).
func WriteHTML(w io.Writer, s *Sheet) error {
	return page.Execute(w, s)
}

// Client is what Fetch calls of the DampfrontService; a
// pb.DampfrontServiceClient is one.
type Client interface {
	GetJob(ctx context.Context, in *pb.GetJobRequest, opts ...grpc.CallOption) (*pb.GetJobResponse, error)
	GetFront(ctx context.Context, in *pb.GetFrontRequest, opts ...grpc.CallOption) (*pb.GetFrontResponse, error)
}

// frontPageSize is the page size of Fetch's GetFront calls (full
// solutions, some kilobytes each).
const frontPageSize = 100

// NoSolution is the index that asks Fetch for the front's balanced point.
const NoSolution = -1

// Fetch gets a finished job and its front through c and builds the sheet
// of the solution whose index is given, or of the balanced point
// (NoSolution). Service errors come back as they are (gRPC statuses).
func Fetch(ctx context.Context, c Client, job string, index int) (*Sheet, error) {
	jr, err := c.GetJob(ctx, &pb.GetJobRequest{Name: job, View: pb.JobView_JOB_VIEW_FULL})
	if err != nil {
		return nil, err
	}
	get := func(ctx context.Context, req *pb.GetFrontRequest) (*pb.GetFrontResponse, error) {
		return c.GetFront(ctx, req)
	}
	front, err := api.ReadWholeFront(ctx, get, &pb.GetFrontRequest{Job: job, PageSize: frontPageSize, View: pb.SolutionView_SOLUTION_VIEW_FULL})
	if err != nil {
		return nil, err
	}
	sols := front.GetSolutions()
	bal := -1
	if b, err := plot.BalancedSolution(sols); err == nil && b >= 0 {
		bal = int(sols[b].GetIndex())
	}
	if index == NoSolution {
		if bal < 0 {
			return nil, &NotFoundError{Job: job, Index: index}
		}
		index = bal
	}
	for _, s := range sols {
		if int(s.GetIndex()) == index {
			return Build(jr.GetJob(), s, index == bal)
		}
	}
	return nil, &NotFoundError{Job: job, Index: index}
}

// NotFoundError says a job's front has no such solution (or, for
// NoSolution, no balanced point: it is empty).
type NotFoundError struct {
	Job   string
	Index int
}

func (e *NotFoundError) Error() string {
	if e.Index == NoSolution {
		return fmt.Sprintf("the front of %s is empty: no balanced point", e.Job)
	}
	return fmt.Sprintf("the front of %s has no solution %d", e.Job, e.Index)
}
