package web

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"mime"
	"net/http"
	"strconv"

	"google.golang.org/protobuf/encoding/protojson"

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

// frontCSV is the front with one row per solution, SI values with the
// unit in each column's name, floats written so that they read back bit
// for bit: index, the genes, the objectives, the low-speed slopes at the
// damper of the front-left and rear-left corners, each constraint's
// violation, feasible and balanced.
func (h *Handler) frontCSV(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return
	}
	b, err := frontCSVBytes(front)
	if err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	download(w, "text/csv; charset=utf-8", fileStem(id)+"-front.csv", b, true)
}

func frontCSVBytes(front *pb.Front) ([]byte, error) {
	cols := []string{"index"}
	cols = append(cols, front.GetGeneNames()...)
	for _, o := range front.GetObjectives() {
		cols = append(cols, objectiveQuantity(o).column)
	}
	for _, c := range slopeCorners {
		axle := map[string]string{"F": "front", "R": "rear"}[c.label]
		cols = append(cols, axle+"_bump_"+qSlope.column, axle+"_rebound_"+qSlope.column)
	}
	for _, c := range front.GetConstraints() {
		cols = append(cols, constraintColumn(c))
	}
	cols = append(cols, "feasible", "balanced")
	bal := -1
	if k, err := plot.BalancedSolution(front.GetSolutions()); err == nil {
		bal = k
	}
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	if err := cw.Write(cols); err != nil {
		return nil, err
	}
	for i, s := range front.GetSolutions() {
		row := []string{strconv.Itoa(int(s.GetIndex()))}
		for _, g := range s.GetGenes() {
			row = append(row, siText(g))
		}
		for _, o := range s.GetObjectives() {
			row = append(row, siText(o))
		}
		for _, c := range slopeCorners {
			bump, rebound := "", ""
			for _, dc := range s.GetDamperCurves() {
				if dc.GetCorner() == c.corner {
					bump, rebound = siText(dc.GetBumpSlopeNSPerM()), siText(dc.GetReboundSlopeNSPerM())
				}
			}
			row = append(row, bump, rebound)
		}
		for k := range front.GetConstraints() {
			v := 0.0
			if k < len(s.GetViolations()) {
				v = s.GetViolations()[k]
			}
			row = append(row, siText(v))
		}
		row = append(row, strconv.FormatBool(s.GetFeasible()), strconv.FormatBool(i == bal))
		if len(row) != len(cols) {
			return nil, fmt.Errorf("solution %d has %d values for %d columns", s.GetIndex(), len(row), len(cols))
		}
		if err := cw.Write(row); err != nil {
			return nil, err
		}
	}
	cw.Flush()
	return buf.Bytes(), cw.Error()
}

// frontJSON is the whole front as GetFront returns it, every page joined,
// in the protobuf JSON mapping (field names as in the .proto files).
func (h *Handler) frontJSON(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return
	}
	b, err := protojson.MarshalOptions{Multiline: true, Indent: "  ", UseProtoNames: true}.Marshal(front)
	if err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	download(w, "application/json", fileStem(id)+"-front.json", append(b, '\n'), true)
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
	h.writeFigure(w, fileStem(id)+"-front.svg", true, func() (*plot.Figure, error) { return frontFigure(front) })
}

// curvesSVG is the damper curve chart of one solution: inline for the job
// page's script, a file with ?download=1.
func (h *Handler) curvesSVG(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	k, err := strconv.Atoi(r.PathValue("index"))
	if err != nil || k < 0 {
		http.Error(w, fmt.Sprintf("solution index %q must be a whole number from 0", r.PathValue("index")), http.StatusBadRequest)
		return
	}
	front, ok := h.requestFront(w, r, id)
	if !ok {
		return
	}
	s := solutionAt(front, k)
	if s == nil {
		http.Error(w, fmt.Sprintf("the front of job %s has %d solutions; %d is not one of them", id, len(front.GetSolutions()), k), http.StatusNotFound)
		return
	}
	name := fmt.Sprintf("%s-solution-%d-curves.svg", fileStem(id), k)
	h.writeFigure(w, name, r.URL.Query().Get("download") != "", func() (*plot.Figure, error) { return curvesFigure(s) })
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
