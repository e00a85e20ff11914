package web

import (
	"bytes"
	"context"
	"fmt"
	"net/url"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

// frontPageSize is the page size of the page's GetFront calls: full
// solutions carry their metrics and curves, some kilobytes each, so a
// page stays far below the service's message limit.
const frontPageSize = 100

// jobName is the resource name of the job of a request path, checked by
// the service.
func jobName(id string) string { return "jobs/" + id }

// wholeFront reads every page of a finished job's front in the full view.
func (h *Handler) wholeFront(ctx context.Context, name string) (*pb.Front, error) {
	get := func(ctx context.Context, req *pb.GetFrontRequest) (*pb.GetFrontResponse, error) {
		return h.client.GetFront(ctx, req)
	}
	return api.ReadWholeFront(ctx, get, &pb.GetFrontRequest{Job: name, PageSize: frontPageSize, View: pb.SolutionView_SOLUTION_VIEW_FULL})
}

// solutionAt returns the solution of front whose index is k, or nil.
func solutionAt(front *pb.Front, k int) *pb.Solution {
	for _, s := range front.GetSolutions() {
		if int(s.GetIndex()) == k {
			return s
		}
	}
	return nil
}

// frontFigure is the chart of a front: two or three objectives (the
// first three of more), coloured by the front/rear balance, titled with
// the job's display name (its resource name when it has none), the
// selected solution (a Solution.index; -1 for none) boxed.
func frontFigure(front *pb.Front, title string, selected int32) (*plot.Figure, error) {
	if title == "" {
		title = front.GetJob()
	}
	opt := plot.FrontOptions{Title: "Pareto front, " + title}
	if n := len(front.GetObjectives()); n > 3 {
		opt.Objectives = []int{0, 1, 2}
	}
	if selected >= 0 {
		opt.Marked = []int32{selected}
	}
	return plot.Front(front, opt)
}

// curvesFigure is the chart of a solution's damper curves.
func curvesFigure(s *pb.Solution) (*plot.Figure, error) {
	if len(s.GetDamperCurves()) == 0 {
		return nil, fmt.Errorf("solution %d carries no damper curves", s.GetIndex())
	}
	return plot.DamperCurves(s.GetDamperCurves(), plot.CurveOptions{
		Title: fmt.Sprintf("Damper curves at the component, solution %d", s.GetIndex()),
	})
}

// svgBytes renders a figure as SVG.
func svgBytes(f *plot.Figure) ([]byte, error) {
	var b bytes.Buffer
	if err := f.WriteSVG(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// jobPath is the path of a job's page.
func jobPath(id string) string { return "/jobs/" + url.PathEscape(id) }

// curvesURL is the path of a solution's damper curve chart.
func curvesURL(id string, index int32) string {
	return fmt.Sprintf("%s/solutions/%d/curves.svg", jobPath(id), index)
}
