package web

import (
	"context"
	"embed"
	"errors"
	"html/template"
	"log/slog"
	"net/http"
	"time"

	"google.golang.org/grpc"

	pb "dampfront/api/gen/dampfront/v1"
)

// Client is what the page calls of the DampfrontService; a
// pb.DampfrontServiceClient is one.
type Client interface {
	GetJob(ctx context.Context, in *pb.GetJobRequest, opts ...grpc.CallOption) (*pb.GetJobResponse, error)
	ListJobs(ctx context.Context, in *pb.ListJobsRequest, opts ...grpc.CallOption) (*pb.ListJobsResponse, error)
	GetFront(ctx context.Context, in *pb.GetFrontRequest, opts ...grpc.CallOption) (*pb.GetFrontResponse, error)
	GetTransientHistory(ctx context.Context, in *pb.GetTransientHistoryRequest, opts ...grpc.CallOption) (*pb.GetTransientHistoryResponse, error)
}

var _ Client = pb.DampfrontServiceClient(nil)

// Options configure the page. Zero values take the defaults named.
type Options struct {
	// RequestTimeout bounds the service calls of one request. Default
	// 30 s.
	RequestTimeout time.Duration
	// PollInterval is how often the page of a queued or running job asks
	// for its progress. Default 1 s.
	PollInterval time.Duration
	// JobsPageSize is the number of jobs the jobs list shows a page.
	// Default 50.
	JobsPageSize int
	// Instrument, when set, wraps the handler of each route, named by a
	// fixed route name ("jobs", "job", "progress", "front_csv", ...), for
	// example with api.Metrics.InstrumentHandler.
	Instrument func(route string, h http.Handler) http.Handler
	// Logger receives errors the service gave that the page cannot
	// explain to its reader. Default slog.Default().
	Logger *slog.Logger
}

// Defaults of Options.
const (
	DefaultRequestTimeout = 30 * time.Second
	DefaultPollInterval   = time.Second
	DefaultJobsPageSize   = 50
)

func (o Options) withDefaults() Options {
	if o.RequestTimeout <= 0 {
		o.RequestTimeout = DefaultRequestTimeout
	}
	if o.PollInterval <= 0 {
		o.PollInterval = DefaultPollInterval
	}
	if o.JobsPageSize <= 0 {
		o.JobsPageSize = DefaultJobsPageSize
	}
	if o.Logger == nil {
		o.Logger = slog.Default()
	}
	return o
}

//go:embed assets
var assets embed.FS

// Handler serves the page.
type Handler struct {
	client Client
	opt    Options
	mux    *http.ServeMux
	pages  map[string]*template.Template
}

// New returns the page over client.
func New(client Client, opt Options) (*Handler, error) {
	if client == nil {
		return nil, errors.New("web: New needs a client of the service")
	}
	h := &Handler{client: client, opt: opt.withDefaults(), mux: http.NewServeMux(), pages: map[string]*template.Template{}}
	for _, name := range []string{"jobs", "job", "login", "error"} {
		t, err := template.New("layout.html").ParseFS(assets, "assets/layout.html", "assets/"+name+".html")
		if err != nil {
			return nil, err
		}
		h.pages[name] = t
	}
	static := http.FileServerFS(assets)
	routes := []struct {
		pattern, name string
		fn            http.HandlerFunc
	}{
		{"GET /{$}", "jobs", h.jobs},
		{"GET /jobs/{id}", "job", h.job},
		{"GET /jobs/{id}/progress.json", "progress", h.progress},
		{"GET /jobs/{id}/front.csv", "front_csv", h.frontCSV},
		{"GET /jobs/{id}/front.json", "front_json", h.frontJSON},
		{"GET /jobs/{id}/front.svg", "front_svg", h.frontSVG},
		{"GET /jobs/{id}/solutions/{index}/curves.svg", "curves_svg", h.curvesSVG},
		{"GET /jobs/{id}/solutions/{index}/history.svg", "history_svg", h.historySVG},
		{"GET /jobs/{id}/solutions/{index}/sheet.html", "sheet", h.sheet},
		{"GET /jobs/{id}/solutions/{index}/modes.html", "modes", h.modes},
		{"GET /login", "login", h.loginForm},
		{"POST /login", "login", h.login},
		{"POST /logout", "logout", h.logout},
		{"GET /assets/page.css", "assets", serveAsset(static)},
		{"GET /assets/page.js", "assets", serveAsset(static)},
		{"GET /", "not_found", func(w http.ResponseWriter, r *http.Request) {
			h.fail(w, r, http.StatusNotFound, "There is no page at "+r.URL.Path+".")
		}},
	}
	for _, rt := range routes {
		var handler http.Handler = rt.fn
		if h.opt.Instrument != nil {
			handler = h.opt.Instrument(rt.name, handler)
		}
		h.mux.Handle(rt.pattern, handler)
	}
	return h, nil
}

// contentSecurityPolicy lets the page run only its own script and load
// only from itself. Inline styles stay allowed: the SVG charts style
// their elements with style attributes.
const contentSecurityPolicy = "default-src 'none'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data:; " +
	"connect-src 'self'; form-action 'self'; frame-ancestors 'none'; base-uri 'none'"

// ServeHTTP serves the page with its security headers.
func (h *Handler) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	hd := w.Header()
	hd.Set("Content-Security-Policy", contentSecurityPolicy)
	hd.Set("X-Content-Type-Options", "nosniff")
	hd.Set("Referrer-Policy", "no-referrer")
	hd.Set("X-Frame-Options", "DENY")
	h.mux.ServeHTTP(w, r)
}

// callContext is the context of a request's service calls: bounded by
// RequestTimeout and carrying the request's bearer token.
func (h *Handler) callContext(r *http.Request) (context.Context, context.CancelFunc) {
	ctx, cancel := context.WithTimeout(r.Context(), h.opt.RequestTimeout)
	return withToken(ctx, requestToken(r)), cancel
}

// serveAsset serves the style sheet and the script, cached for a while.
func serveAsset(static http.Handler) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Cache-Control", "max-age=300")
		static.ServeHTTP(w, r)
	}
}
