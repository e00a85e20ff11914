package web

import (
	"bytes"
	"fmt"
	"mime"
	"net/http"

	"dampfront/api/frontfile"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/plot"
)

// download writes body as a file named name for the browser to save.
func download(w http.ResponseWriter, contentType, name string, body []byte, attach bool) {
	w.Header().Set("Content-Type", contentType)
	w.Header().Set("Cache-Control", "no-store")
	if attach {
		w.Header().Set("Content-Disposition", mime.FormatMediaType("attachment", map[string]string{"filename": name}))
	}
	_, _ = w.Write(body)
}

// fileStem names a job's downloads: "dampfront-ID".
func fileStem(id string) string { return "dampfront-" + id }

// frontCSV is the front in the schema of package frontfile (one row per
// solution, SI, the unit in each column's name), as the command line's
// front --format csv writes it.
func (h *Handler) frontCSV(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return
	}
	var b bytes.Buffer
	if err := frontfile.WriteCSV(&b, front); err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	download(w, "text/csv; charset=utf-8", fileStem(id)+"-front.csv", b.Bytes(), true)
}

// frontJSON is the front and its job's header in the schema of package
// frontfile, as the command line's front --format json writes it.
func (h *Handler) frontJSON(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	j, ok := h.pathJob(w, r, id, pb.JobView_JOB_VIEW_BASIC)
	if !ok {
		return
	}
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return
	}
	var b bytes.Buffer
	if err := frontfile.WriteJSON(&b, j, front); err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	download(w, "application/json", fileStem(id)+"-front.json", b.Bytes(), true)
}

// frontSVG is the front chart as a file.
func (h *Handler) frontSVG(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return
	}
	if len(front.GetSolutions()) == 0 {
		http.Error(w, "the front is empty: there is nothing to draw", http.StatusNotFound)
		return
	}
	title := ""
	ctx, cancel := h.callContext(r)
	defer cancel()
	if jr, err := h.client.GetJob(ctx, &pb.GetJobRequest{Name: jobName(id), View: pb.JobView_JOB_VIEW_BASIC}); err == nil {
		title = jr.GetJob().GetDisplayName()
	}
	h.writeFigure(w, fileStem(id)+"-front.svg", true, func() (*plot.Figure, error) { return frontFigure(front, title, -1) })
}

// curvesSVG is the damper curve chart of one solution: inline for the job
// page's script, a file with ?download=1.
func (h *Handler) curvesSVG(w http.ResponseWriter, r *http.Request) {
	id, s, ok := h.pathSolution(w, r)
	if !ok {
		return
	}
	name := fmt.Sprintf("%s-solution-%d-curves.svg", fileStem(id), s.GetIndex())
	h.writeFigure(w, name, r.URL.Query().Get("download") != "", func() (*plot.Figure, error) { return curvesFigure(s) })
}

// pathSolution is the job id and the solution of a request path
// (/jobs/{id}/solutions/{index}/...), from the job's whole front; when
// there is none it has answered with the error.
func (h *Handler) pathSolution(w http.ResponseWriter, r *http.Request) (string, *pb.Solution, bool) {
	id := r.PathValue("id")
	k, ok := pathIndex(w, r)
	if !ok {
		return "", nil, false
	}
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return "", nil, false
	}
	s := solutionAt(front, k)
	if s == nil {
		http.Error(w, fmt.Sprintf("the front of job %s has %d solutions; %d is not one of them", id, len(front.GetSolutions()), k), http.StatusNotFound)
		return "", nil, false
	}
	return id, s, true
}

// requestFront fetches the whole front of job id for a request with the
// reader's credentials; on failure it has written the error response.
func (h *Handler) requestFront(w http.ResponseWriter, r *http.Request, id string) (*pb.Front, bool) {
	ctx, cancel := h.callContext(r)
	defer cancel()
	front, err := h.wholeFront(ctx, jobName(id))
	if err != nil {
		h.serviceError(w, r, err, false)
		return nil, false
	}
	return front, true
}

// writeFigure renders a figure as an SVG response.
func (h *Handler) writeFigure(w http.ResponseWriter, name string, attach bool, build func() (*plot.Figure, error)) {
	fig, err := build()
	if err != nil {
		http.Error(w, "the chart cannot be drawn: "+err.Error(), http.StatusUnprocessableEntity)
		return
	}
	b, err := svgBytes(fig)
	if err != nil {
		h.opt.Logger.Error("web: render chart", "file", name, "error", err)
		http.Error(w, "the chart cannot be drawn: "+err.Error(), http.StatusInternalServerError)
		return
	}
	download(w, "image/svg+xml", name, b, attach)
}
