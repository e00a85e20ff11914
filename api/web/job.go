package web

import (
	"context"
	"encoding/json"
	"fmt"
	"html/template"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"time"

	"dampfront/api"
	"dampfront/api/frontfile"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
	"dampfront/api/sheet"
)

type header struct {
	Label   string
	Unit    string
	Numeric bool
}

type cell struct {
	Text string
	Sort string // the value the column sorts by: SI for numbers
}

type solutionRow struct {
	Index     int32
	Balanced  bool
	Selected  bool
	Feasible  bool
	CurvesURL string
	ModesURL  string
	SheetURL  string
	PageURL   string // the job page with this solution's curves, for browsers without JavaScript
	Cells     []cell
	Warnings  string
}

type curvesView struct {
	Index       int32
	SVG         template.HTML
	Problem     string
	DownloadURL string
}

type link struct {
	Label, URL string
}

type jobView struct {
	pageView
	Job             jobRow
	Seed            uint64
	Car             string
	RoadCases       []string
	Objectives      []string
	Best            []string
	Partial         bool
	Infeasible      string // the verdict of a job no setup of which met every constraint
	FrontCheck      string // the check of a finished front in decision space (FrontCheckText)
	Refinement      string // the refinement on the nonlinear car, finished or how far (RefinementText)
	Robust          string // what a robust job's objectives are (api.RobustText); "" without uncertainty
	CancelRequested bool
	Terminal        bool
	ProgressURL     string
	PollMS          int64

	HypervolumeSVG template.HTML
	ShowFront      bool // a front section: the job has finished, or runs and has checkpointed a front
	WideFront      bool // the front chart has three panels and takes the page's width
	FrontSVG       template.HTML
	FrontProblem   string
	FrontNote      string
	Total          int32
	Balanced       int32
	Headers        []header
	Rows           []solutionRow
	Curves         *curvesView
	Modes          *modesView
	ModalSVG       template.HTML // modal ratios across the front
	AtSpeed        *atSpeedView
	History        *historyView // a solution on a manoeuvre or kerb case
	Downloads      []link
}

// job is a job's page: its state and live progress; once finished, the
// front chart, the solutions table and the damper curves of one solution
// (?solution=N, else the balanced point).
func (h *Handler) job(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	ctx, cancel := h.callContext(r)
	defer cancel()
	j, ok := h.getJob(ctx, w, r, id, pb.JobView_JOB_VIEW_FULL, true)
	if !ok {
		return
	}
	spec := j.GetSpec()
	v := &jobView{
		pageView: pageView{Title: j.GetDisplayName()},
		Job:      newJobRow(j), Seed: j.GetSeed(), Car: spec.GetVehicle().GetName(),
		Partial: j.GetPartial(), Infeasible: InfeasibleText(j), FrontCheck: FrontCheckText(j), Refinement: RefinementText(j), Robust: api.RobustText(j), CancelRequested: j.GetCancelRequested(), Terminal: terminal(j.GetState()),
		ProgressURL: jobPath(id) + "/progress.json", PollMS: h.opt.PollInterval.Milliseconds(),
		Balanced: -1,
	}
	if v.Title == "" {
		v.Title = j.GetName()
	}
	for _, rc := range spec.GetRoadCases() {
		v.RoadCases = append(v.RoadCases, fmt.Sprintf("%s at %g m/s", rc.GetName(), rc.GetSpeedMPerS()))
	}
	objs := spec.GetObjectives()
	for k, o := range objs {
		q := objectiveQuantity(o)
		v.Objectives = append(v.Objectives, q.label+" ("+q.unit+")")
		if best := j.GetProgress().GetBestObjectives(); k < len(best) {
			v.Best = append(v.Best, q.label+" "+q.text(best[k])+" "+q.unit)
		}
	}
	if !v.Terminal {
		v.Refresh = int(max(5*time.Second, 5*h.opt.PollInterval) / time.Second)
	}
	if hist := j.GetHistory(); len(hist) > 1 {
		if fig, err := plot.Hypervolume(hist, objs, plot.HypervolumeOptions{}); err == nil {
			if b, err := svgBytes(fig); err == nil {
				v.HypervolumeSVG = plot.InlineSVG(b)
			}
		}
	}
	switch {
	case v.Terminal:
		front, err := h.wholeFront(ctx, j.GetName())
		if err != nil {
			h.serviceError(w, r, err, true)
			return
		}
		h.frontSection(ctx, v, id, front, r.URL.Query())
	case j.GetState() == pb.JobState_JOB_STATE_RUNNING:
		// The front so far, as of the last checkpoint; none yet is no
		// error, the page shows its progress alone.
		if front, err := h.wholeFront(ctx, j.GetName()); err == nil && len(front.GetSolutions()) > 0 {
			h.frontSection(ctx, v, id, front, r.URL.Query())
			v.FrontNote = "The front so far, as of the job's last checkpoint; it grows until the job ends."
		}
	}
	h.render(w, r, http.StatusOK, "job", v)
}

// frontSection fills the front chart, the table and the curves of the
// solution the query selects (?solution=N, else the balanced point), and
// its time history on the case ?case= names.
func (h *Handler) frontSection(ctx context.Context, v *jobView, id string, front *pb.Front, query url.Values) {
	selected := query.Get("solution")
	sols := front.GetSolutions()
	v.ShowFront, v.WideFront = true, len(front.GetObjectives()) >= 3
	v.Total = front.GetTotalSize()
	base := jobPath(id)
	v.Downloads = []link{
		{"Front CSV (SI)", base + "/front.csv"},
		{"Front JSON (SI)", base + "/front.json"},
		{"Front chart SVG", base + "/front.svg"},
	}
	if len(sols) == 0 {
		v.FrontNote = "The front is empty: no feasible setup was found. Loosen the constraints or widen the bounds."
		return
	}
	bal, err := plot.BalancedSolution(sols)
	if err == nil && bal >= 0 {
		v.Balanced = sols[bal].GetIndex()
	}
	pick := v.Balanced
	if k, err := strconv.Atoi(selected); err == nil && solutionAt(front, k) != nil {
		pick = int32(k)
	}
	if fig, err := frontFigure(front, v.Title, pick); err != nil {
		v.FrontProblem = "The front chart cannot be drawn: " + err.Error()
	} else if b, err := svgBytes(fig); err != nil {
		v.FrontProblem = "The front chart cannot be drawn: " + err.Error()
	} else {
		v.FrontSVG = plot.InlineSVG(b)
	}
	v.Headers, v.Rows = solutionTable(id, front, v.Balanced, pick)
	if s := solutionAt(front, int(pick)); s != nil {
		c := &curvesView{Index: pick, DownloadURL: curvesURL(id, pick) + "?download=1"}
		if fig, err := curvesFigure(s); err != nil {
			c.Problem = "The damper curves cannot be drawn: " + err.Error()
		} else if b, err := svgBytes(fig); err != nil {
			c.Problem = "The damper curves cannot be drawn: " + err.Error()
		} else {
			c.SVG = plot.InlineSVG(b)
		}
		v.Curves = c
		v.Modes = newModesView(id, pick, sheet.Modes(s))
		v.AtSpeed = newAtSpeedView(s)
		v.History = h.newHistoryView(ctx, id, s, query.Get("case"))
	}
	if fig, err := plot.ModalRatios(front, plot.ModalOptions{}); err == nil {
		if b, err := svgBytes(fig); err == nil {
			v.ModalSVG = plot.InlineSVG(b)
		}
	}
}

// slopeCorners are the corners whose low-speed slopes the table shows,
// one per axle: the left ones, as the command line's front table does.
var slopeCorners = []struct {
	corner pb.CornerPosition
	label  string
}{
	{pb.CornerPosition_CORNER_POSITION_FRONT_LEFT, "F"},
	{pb.CornerPosition_CORNER_POSITION_REAR_LEFT, "R"},
}

// solutionTable is the header and rows of the solutions table: index,
// genes, objectives in trade units, the low-speed slopes at the damper,
// and the warnings.
func solutionTable(id string, front *pb.Front, balanced, selected int32) ([]header, []solutionRow) {
	hs := []header{{Label: "#", Numeric: true}}
	geneQ := make([]quantity, len(front.GetGeneNames()))
	for i, n := range front.GetGeneNames() {
		geneQ[i] = geneQuantity(n)
		hs = append(hs, header{Label: geneQ[i].label, Unit: geneQ[i].unit, Numeric: true})
	}
	objQ := make([]quantity, len(front.GetObjectives()))
	for i, o := range front.GetObjectives() {
		objQ[i] = objectiveQuantity(o)
		hs = append(hs, header{Label: objQ[i].label, Unit: objQ[i].unit, Numeric: true})
	}
	robust := frontfile.Robust(front)
	if robust {
		for _, q := range objQ {
			for _, what := range []string{"nominal", "sd", "worst"} {
				hs = append(hs, header{Label: q.label + " " + what, Unit: q.unit, Numeric: true})
			}
		}
	}
	for _, c := range slopeCorners {
		hs = append(hs, header{Label: c.label + " bump slope", Unit: qSlope.unit, Numeric: true},
			header{Label: c.label + " rebound slope", Unit: qSlope.unit, Numeric: true})
	}
	band := false
	for _, s := range front.GetSolutions() {
		band = band || len(s.GetOutOfBand()) > 0
	}
	if band {
		hs = append(hs, header{Label: "Out of adjuster range", Unit: "N", Numeric: true})
	}
	hs = append(hs, refinedHeaders(front, objQ)...)
	hs = append(hs, header{Label: "Warnings", Numeric: true}, header{Label: "Sheet"})

	base := jobPath(id)
	var rows []solutionRow
	for _, s := range front.GetSolutions() {
		idx := s.GetIndex()
		row := solutionRow{
			Index: idx, Balanced: idx == balanced, Selected: idx == selected, Feasible: s.GetFeasible(),
			CurvesURL: curvesURL(id, idx), ModesURL: modesURL(id, idx), SheetURL: sheetURL(id, idx), PageURL: fmt.Sprintf("%s?solution=%d#curves", base, idx),
			Warnings: strings.Join(s.GetWarnings(), "; "),
		}
		row.Cells = append(row.Cells, cell{Text: strconv.Itoa(int(idx)), Sort: strconv.Itoa(int(idx))})
		for i, q := range geneQ {
			row.Cells = append(row.Cells, numCell(q, s.GetGenes(), i))
		}
		for i, q := range objQ {
			row.Cells = append(row.Cells, numCell(q, s.GetObjectives(), i))
		}
		if robust {
			r := s.GetRobust()
			for i, q := range objQ {
				row.Cells = append(row.Cells, numCell(q, r.GetNominal(), i), numCell(q, r.GetSd(), i), numCell(q, r.GetWorst(), i))
			}
		}
		for _, c := range slopeCorners {
			bump, rebound := cell{}, cell{}
			for _, dc := range s.GetDamperCurves() {
				if dc.GetCorner() == c.corner {
					bump = numCell(qSlope, []float64{dc.GetBumpSlopeNSPerM()}, 0)
					rebound = numCell(qSlope, []float64{dc.GetReboundSlopeNSPerM()}, 0)
				}
			}
			row.Cells = append(row.Cells, bump, rebound)
		}
		if band {
			row.Cells = append(row.Cells, bandCell(s))
		}
		row.Cells = append(row.Cells, refinedCells(front, s, objQ)...)
		n := strconv.Itoa(len(s.GetWarnings()))
		row.Cells = append(row.Cells, cell{Text: n, Sort: n}, cell{Text: "sheet", Sort: ""})
		rows = append(rows, row)
	}
	return hs, rows
}

// bandCell is the largest excess of a solution's dampers over the
// adjuster range (frontfile.OutOfBand), empty inside the range.
func bandCell(s *pb.Solution) cell {
	x := frontfile.OutOfBand(s)
	if x == 0 {
		return cell{Sort: "0"}
	}
	return cell{Text: fmt.Sprintf("+%.0f", x), Sort: siText(x)}
}

// numCell is the table cell of values[i] in q's trade unit, sorting by
// the SI value; empty when the value is missing.
func numCell(q quantity, values []float64, i int) cell {
	if i >= len(values) {
		return cell{}
	}
	return cell{Text: q.text(values[i]), Sort: siText(values[i])}
}

// progress is the job's state and progress as JSON, for the job page's
// poll.
func (h *Handler) progress(w http.ResponseWriter, r *http.Request) {
	ctx, cancel := h.callContext(r)
	defer cancel()
	j, ok := h.getJob(ctx, w, r, r.PathValue("id"), pb.JobView_JOB_VIEW_BASIC, false)
	if !ok {
		return
	}
	b, err := json.Marshal(newProgressView(j))
	if err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("Cache-Control", "no-store")
	_, _ = w.Write(b)
}

// pathJob gets job id in the view asked for under the request's own call
// deadline, for a download; when that fails it has answered with
// serviceError.
func (h *Handler) pathJob(w http.ResponseWriter, r *http.Request, id string, view pb.JobView) (*pb.Job, bool) {
	ctx, cancel := h.callContext(r)
	defer cancel()
	return h.getJob(ctx, w, r, id, view, false)
}

// getJob gets job id in the view asked for; when that fails it has
// answered with serviceError (as a page when page is true).
func (h *Handler) getJob(ctx context.Context, w http.ResponseWriter, r *http.Request, id string, view pb.JobView, page bool) (*pb.Job, bool) {
	jr, err := h.client.GetJob(ctx, &pb.GetJobRequest{Name: jobName(id), View: view})
	if err != nil {
		h.serviceError(w, r, err, page)
		return nil, false
	}
	return jr.GetJob(), true
}
