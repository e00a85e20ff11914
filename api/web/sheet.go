package web

import (
	"bytes"
	"errors"
	"fmt"
	"net/http"
	"strconv"

	"dampfront/api/sheet"
)

// sheetURL is the path of a solution's specification sheet.
func sheetURL(id string, index int32) string {
	return fmt.Sprintf("%s/solutions/%d/sheet.html", jobPath(id), index)
}

// modesURL is the path of the modes table of a solution, for the page's
// script.
func modesURL(id string, index int32) string {
	return fmt.Sprintf("%s/solutions/%d/modes.html", jobPath(id), index)
}

// pathIndex is the solution index of a request path; when it is not one
// it has answered 400.
func pathIndex(w http.ResponseWriter, r *http.Request) (int, bool) {
	k, err := strconv.Atoi(r.PathValue("index"))
	if err != nil || k < 0 {
		http.Error(w, fmt.Sprintf("solution index %q must be a whole number from 0", r.PathValue("index")), http.StatusBadRequest)
		return 0, false
	}
	return k, true
}

// sheet is a solution's damper specification sheet, the printable page
// the command line's sheet writes too.
func (h *Handler) sheet(w http.ResponseWriter, r *http.Request) {
	id := r.PathValue("id")
	k, ok := pathIndex(w, r)
	if !ok {
		return
	}
	ctx, cancel := h.callContext(r)
	defer cancel()
	s, err := sheet.Fetch(ctx, h.client, jobName(id), k)
	var nf *sheet.NotFoundError
	switch {
	case errors.As(err, &nf):
		h.fail(w, r, http.StatusNotFound, "The front of job "+id+" has no solution "+strconv.Itoa(k)+".")
		return
	case err != nil:
		h.serviceError(w, r, err, true)
		return
	}
	var b bytes.Buffer
	if err := sheet.WriteHTML(&b, s); err != nil {
		h.serviceError(w, r, err, true)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	_, _ = w.Write(b.Bytes())
}

// modes is the modes table of one solution, an HTML fragment the page's
// script puts in place of the one shown when another row is chosen.
func (h *Handler) modes(w http.ResponseWriter, r *http.Request) {
	id, s, ok := h.pathSolution(w, r)
	if !ok {
		return
	}
	var b bytes.Buffer
	if err := h.pages["job"].ExecuteTemplate(&b, "modes", newModesView(id, s.GetIndex(), sheet.Modes(s))); err != nil {
		h.serviceError(w, r, err, false)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	_, _ = w.Write(b.Bytes())
}

// modesView is the modes section of one solution.
type modesView struct {
	Index    int32
	SheetURL string
	Cases    []sheet.CaseModes
}

func newModesView(id string, index int32, cases []sheet.CaseModes) *modesView {
	return &modesView{Index: index, SheetURL: sheetURL(id, index), Cases: cases}
}
