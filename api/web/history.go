package web

import (
	"context"
	"fmt"
	"html/template"
	"net/http"
	"net/url"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"

	"google.golang.org/grpc/status"
)

// historyView is the time-history section of the job page: one solution
// on one of the job's manoeuvre or kerb cases, simulated by the service
// (GetTransientHistory on the job's stored spec), the case chosen in a
// small form that works without the script.
type historyView struct {
	Index       int32
	Cases       []historyCase
	Case        string // the case shown
	FormURL     string // the job page, with solution and case as the query
	ChartURL    string // the chart of Index, without the case, for the script
	DownloadURL string
	SVG         template.HTML
	Problem     string
}

type historyCase struct {
	Name, Kind string
	Selected   bool
}

// historyURL is the path of a solution's time-history chart.
func historyURL(id string, index int32) string {
	return fmt.Sprintf("%s/solutions/%d/history.svg", jobPath(id), index)
}

// newHistoryView is solution s's time-history section on the case named
// caseName (the first when it names none of s's), nil when the solution
// carries no manoeuvre or kerb metrics (a job without such cases, or the
// basic view).
func (h *Handler) newHistoryView(ctx context.Context, id string, s *pb.Solution, caseName string) *historyView {
	ms := s.GetTransientMetrics()
	if len(ms) == 0 {
		return nil
	}
	v := &historyView{Index: s.GetIndex(), Case: ms[0].GetName(), FormURL: jobPath(id), ChartURL: historyURL(id, s.GetIndex())}
	for _, m := range ms {
		if m.GetName() == caseName {
			v.Case = caseName
		}
	}
	for _, m := range ms {
		v.Cases = append(v.Cases, historyCase{Name: m.GetName(), Kind: m.GetKind(), Selected: m.GetName() == v.Case})
	}
	v.DownloadURL = v.ChartURL + "?" + url.Values{"case": {v.Case}, "download": {"1"}}.Encode()
	fig, err := h.historyFigure(ctx, id, s, v.Case)
	if err == nil {
		var b []byte
		if b, err = svgBytes(fig); err == nil {
			v.SVG = plot.InlineSVG(b)
		}
	}
	if err != nil {
		v.Problem = "The time history cannot be drawn: " + status.Convert(err).Message()
	}
	return v
}

// historyFigure simulates solution s of job id on the case named
// caseName through the service and draws it with the solution's steady
// values.
func (h *Handler) historyFigure(ctx context.Context, id string, s *pb.Solution, caseName string) (*plot.Figure, error) {
	resp, err := h.client.GetTransientHistory(ctx, &pb.GetTransientHistoryRequest{
		Source: &pb.GetTransientHistoryRequest_Job{Job: jobName(id)}, Setup: s.GetSetup(), CaseName: caseName})
	if err != nil {
		return nil, err
	}
	return plot.TransientHistory(resp, plot.HistoryOptions{
		Title:  fmt.Sprintf("Time history, %s: solution %d", resp.GetCaseName(), s.GetIndex()),
		Steady: plot.SolutionTransient(s, resp.GetCaseName())})
}

// historySVG is the time-history chart of one solution on the case named
// by ?case= (the first when empty): inline for the job page's script, a
// file with ?download=1.
func (h *Handler) historySVG(w http.ResponseWriter, r *http.Request) {
	id, s, ok := h.pathSolution(w, r)
	if !ok {
		return
	}
	q := r.URL.Query()
	ctx, cancel := h.callContext(r)
	defer cancel()
	fig, err := h.historyFigure(ctx, id, s, q.Get("case"))
	if err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	name := fmt.Sprintf("%s-solution-%d-history.svg", fileStem(id), s.GetIndex())
	h.writeFigure(w, name, q.Get("download") != "", func() (*plot.Figure, error) { return fig, nil })
}
