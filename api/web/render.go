package web

import (
	"bytes"
	"context"
	"dampfront/model"
	"errors"
	"net/http"

	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"
)

// Caution is shown at the foot of every page: the words of the command
// line's reports.
const Caution = model.Caution

// pageView is what every page's layout shows.
type pageView struct {
	Title    string
	Caution  string
	LoggedIn bool // the request carries the token cookie: offer to log out
	// Refresh, when positive, reloads the page every Refresh seconds in a
	// browser without JavaScript; Reload does the same with JavaScript,
	// unless the reader is typing in a form.
	Refresh, Reload int
}

func (p *pageView) base() *pageView { return p }

type view interface{ base() *pageView }

// render writes page name with v, or a plain 500 when the template fails.
func (h *Handler) render(w http.ResponseWriter, r *http.Request, code int, name string, v view) {
	b := v.base()
	b.Caution = Caution
	if c, err := r.Cookie(tokenCookie); err == nil && c.Value != "" {
		b.LoggedIn = true
	}
	var buf bytes.Buffer
	if err := h.pages[name].Execute(&buf, v); err != nil {
		h.opt.Logger.Error("web: render page", "page", name, "error", err)
		http.Error(w, "the page could not be drawn; the server's log says why", http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(code)
	_, _ = w.Write(buf.Bytes())
}

type errorView struct {
	pageView
	Code    int
	Message string
}

// fail shows an error page.
func (h *Handler) fail(w http.ResponseWriter, r *http.Request, code int, msg string) {
	h.render(w, r, code, "error", &errorView{pageView: pageView{Title: http.StatusText(code)}, Code: code, Message: msg})
}

// httpStatus maps the service's status codes to HTTP's: the "HTTP
// Mapping" that the comments of google.rpc.Code (googleapis,
// google/rpc/code.proto) give for each code.
func httpStatus(c codes.Code) int {
	if s, ok := httpStatuses[c]; ok {
		return s
	}
	return http.StatusInternalServerError
}

// httpStatuses is the table of httpStatus.
var httpStatuses = map[codes.Code]int{
	codes.OK:                 http.StatusOK,
	codes.InvalidArgument:    http.StatusBadRequest,
	codes.OutOfRange:         http.StatusBadRequest,
	codes.FailedPrecondition: http.StatusBadRequest,
	codes.Unauthenticated:    http.StatusUnauthorized,
	codes.PermissionDenied:   http.StatusForbidden,
	codes.NotFound:           http.StatusNotFound,
	codes.AlreadyExists:      http.StatusConflict,
	codes.Aborted:            http.StatusConflict,
	codes.ResourceExhausted:  http.StatusTooManyRequests,
	codes.Canceled:           499, // client closed request
	codes.Unimplemented:      http.StatusNotImplemented,
	codes.Unavailable:        http.StatusServiceUnavailable,
	codes.DeadlineExceeded:   http.StatusGatewayTimeout,
}

// serviceError shows what a failed service call means to the reader:
// the login form for Unauthenticated, the service's message otherwise.
// With page false (downloads, progress) it answers in plain text.
func (h *Handler) serviceError(w http.ResponseWriter, r *http.Request, err error, page bool) {
	st := status.Convert(err)
	if errors.Is(err, context.DeadlineExceeded) {
		st = status.New(codes.DeadlineExceeded, err.Error())
	}
	code := httpStatus(st.Code())
	msg := st.Message()
	if code == http.StatusInternalServerError {
		h.opt.Logger.Error("web: service call failed", "path", r.URL.Path, "error", err)
	}
	if code == http.StatusUnauthorized {
		w.Header().Set("WWW-Authenticate", `Bearer realm="dampfront"`)
	}
	if !page {
		w.Header().Set("Cache-Control", "no-store")
		http.Error(w, msg, code)
		return
	}
	if code == http.StatusUnauthorized {
		h.render(w, r, code, "login", &loginView{pageView: pageView{Title: "Log in"}, Next: localPath(r.URL.RequestURI()), Problem: msg})
		return
	}
	h.fail(w, r, code, msg)
}
