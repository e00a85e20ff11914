package web

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"google.golang.org/grpc/codes"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
)

// noRedirect is a client that shows redirects instead of following them.
var noRedirect = &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}

// get fetches path from the page with the headers given as name, value
// pairs and returns the response and its body.
func get(t *testing.T, b *bundle, path string, headers ...string) (*http.Response, string) {
	t.Helper()
	req, err := http.NewRequestWithContext(testContext(t), http.MethodGet, b.page.URL+path, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i+1 < len(headers); i += 2 {
		req.Header.Set(headers[i], headers[i+1])
	}
	return do(t, req)
}

// post sends a form to path.
func post(t *testing.T, b *bundle, path string, form url.Values, headers ...string) (*http.Response, string) {
	t.Helper()
	req, err := http.NewRequestWithContext(testContext(t), http.MethodPost, b.page.URL+path, strings.NewReader(form.Encode()))
	if err != nil {
		t.Fatal(err)
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	for i := 0; i+1 < len(headers); i += 2 {
		req.Header.Set(headers[i], headers[i+1])
	}
	return do(t, req)
}

func do(t *testing.T, req *http.Request) (*http.Response, string) {
	t.Helper()
	res, err := noRedirect.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	body, err := io.ReadAll(res.Body)
	if err != nil {
		t.Fatal(err)
	}
	return res, string(body)
}

func wantStatus(t *testing.T, what string, res *http.Response, body string, code int) {
	t.Helper()
	if res.StatusCode != code {
		t.Fatalf("%s: %s, want %d; body:\n%.600s", what, res.Status, code, body)
	}
}

func TestHTTPStatus(t *testing.T) {
	t.Parallel()
	// The "HTTP Mapping" lines of google/rpc/code.proto (googleapis).
	cases := []struct {
		c    codes.Code
		want int
	}{
		{codes.OK, 200}, {codes.Canceled, 499}, {codes.Unknown, 500}, {codes.InvalidArgument, 400},
		{codes.DeadlineExceeded, 504}, {codes.NotFound, 404}, {codes.AlreadyExists, 409},
		{codes.PermissionDenied, 403}, {codes.Unauthenticated, 401}, {codes.ResourceExhausted, 429},
		{codes.FailedPrecondition, 400}, {codes.Aborted, 409}, {codes.OutOfRange, 400},
		{codes.Unimplemented, 501}, {codes.Internal, 500}, {codes.Unavailable, 503}, {codes.DataLoss, 500},
	}
	for _, c := range cases {
		if got := httpStatus(c.c); got != c.want {
			t.Errorf("httpStatus(%v) = %d, want %d", c.c, got, c.want)
		}
	}
}

// TestPages reads every page of a finished demo job and checks what it
// shows against the service's own answers.
func TestPages(t *testing.T) {
	t.Parallel()
	b := setup(t, 1, api.Options{})
	const generations = 4
	job := b.submit(t, demoSpec(t, 12, generations))
	final := b.finish(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("job ended %v: %s", final.GetState(), final.GetErrorMessage())
	}
	odd := demoSpec(t, 8, 1)
	odd.DisplayName = `<script>alert("x")</script> & co`
	odd.Labels = map[string]string{"suite": "web-odd"}
	oddJob := b.submit(t, odd)
	b.finish(t, oddJob.GetName())
	front := wholeFrontOf(t, b, job.GetName())
	id := job.GetJobId()

	t.Run("jobs", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/")
		wantStatus(t, "GET /", res, body, http.StatusOK)
		for _, want := range []string{id, oddJob.GetJobId(), "succeeded", "car=quillon-gt", "Quillon GT, demo tracks", "qualified engineers",
			`&lt;script&gt;alert(&#34;x&#34;)&lt;/script&gt; &amp; co`} {
			if !strings.Contains(body, want) {
				t.Errorf("the jobs list lacks %q", want)
			}
		}
		if strings.Contains(body, `<script>alert`) {
			t.Error("a display name reached the page unescaped")
		}
		if csp := res.Header.Get("Content-Security-Policy"); !strings.Contains(csp, "script-src 'self'") {
			t.Errorf("Content-Security-Policy %q", csp)
		}
	})
	t.Run("filters", func(t *testing.T) {
		t.Parallel()
		cases := []struct {
			query     string
			code      int
			has, lack []string
		}{
			{"state=succeeded&label=suite%3Dweb", 200, []string{id}, []string{oddJob.GetJobId()}},
			{"state=queued&state=running", 200, []string{"match the filter"}, []string{id}},
			{"label=suite%3Dweb-odd", 200, []string{oddJob.GetJobId()}, []string{id}},
			{"state=sleeping", 400, []string{"sleeping", "qualified engineers"}, nil},
			{"label=suite", 400, []string{"key=value"}, nil},
		}
		for _, c := range cases {
			res, body := get(t, b, "/?"+c.query)
			wantStatus(t, c.query, res, body, c.code)
			for _, s := range c.has {
				if !strings.Contains(body, s) {
					t.Errorf("?%s: the page lacks %q", c.query, s)
				}
			}
			for _, s := range c.lack {
				if strings.Contains(body, s) {
					t.Errorf("?%s: the page shows %q", c.query, s)
				}
			}
		}
	})
	t.Run("job", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/jobs/"+id)
		wantStatus(t, "job page", res, body, http.StatusOK)
		for _, want := range []string{`id="front-chart"><svg`, `id="curves-chart"><svg`, `id="solutions-table"`, "/front.csv", "/front.json", "/front.svg", "qualified engineers"} {
			if !strings.Contains(body, want) {
				t.Errorf("the job page lacks %q", want)
			}
		}
		if n := strings.Count(body, "<tr data-index="); n != int(front.GetTotalSize()) || n == 0 {
			t.Errorf("the table has %d rows, the front %d solutions", n, front.GetTotalSize())
		}
		_, body = get(t, b, "/jobs/"+id+"?solution=2")
		if !strings.Contains(body, `id="curves" data-solution="2"`) {
			t.Error("?solution=2 does not show solution 2's curves")
		}
	})
	t.Run("unknown job", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/jobs/0123456789abcdef01234567")
		wantStatus(t, "unknown job", res, body, http.StatusNotFound)
		if !strings.Contains(body, "qualified engineers") {
			t.Error("the error page lacks the caution")
		}
	})
	t.Run("progress", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/jobs/"+id+"/progress.json")
		wantStatus(t, "progress", res, body, http.StatusOK)
		var p progressView
		if err := json.Unmarshal([]byte(body), &p); err != nil {
			t.Fatal(err)
		}
		want := progressView{State: "succeeded", Terminal: true, Generation: generations, Generations: generations,
			Evaluations: final.GetProgress().GetEvaluations(), Percent: 100}
		p.Text, p.Updated = "", ""
		if p != want {
			t.Errorf("progress %+v, want %+v", p, want)
		}
	})
	t.Run("csv", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/jobs/"+id+"/front.csv")
		wantStatus(t, "front.csv", res, body, http.StatusOK)
		rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		if len(rows) != len(front.GetSolutions())+1 {
			t.Fatalf("%d CSV rows for %d solutions", len(rows), len(front.GetSolutions()))
		}
		genes, objs := len(front.GetGeneNames()), len(front.GetObjectives())
		if rows[0][1] != front.GetGeneNames()[0] || rows[0][1+genes] != "grip_rel" || rows[0][2+genes] != "platform_m" {
			t.Errorf("CSV header %v", rows[0])
		}
		balanced := 0
		for i, s := range front.GetSolutions() {
			row := rows[i+1]
			// Floats read back bit for bit (strconv's shortest
			// round-trip formatting).
			for k, want := range append(append([]float64(nil), s.GetGenes()...), s.GetObjectives()...) {
				got, err := strconv.ParseFloat(row[1+k], 64)
				if err != nil || got != want {
					t.Errorf("solution %d column %d: %q, want %v", i, 1+k, row[1+k], want)
				}
			}
			if row[1+genes+objs] == "" {
				t.Errorf("solution %d has no front bump slope", i)
			}
			if row[len(row)-1] == "true" {
				balanced++
			}
		}
		if balanced != 1 {
			t.Errorf("%d rows marked balanced, want 1", balanced)
		}
	})
	t.Run("json", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/jobs/"+id+"/front.json")
		wantStatus(t, "front.json", res, body, http.StatusOK)
		// The schema of package frontfile: the job's header, then one
		// object per solution whose numbers read back bit for bit.
		var got struct {
			Job       string           `json:"job"`
			State     string           `json:"state"`
			Solutions []map[string]any `json:"solutions"`
		}
		if err := json.Unmarshal([]byte(body), &got); err != nil {
			t.Fatal(err)
		}
		if got.Job != front.GetJob() || got.State != "succeeded" || len(got.Solutions) != len(front.GetSolutions()) {
			t.Fatalf("front.json: job %q state %q, %d solutions; want %q, succeeded, %d", got.Job, got.State, len(got.Solutions), front.GetJob(), len(front.GetSolutions()))
		}
		for i, s := range front.GetSolutions() {
			if v := got.Solutions[i]["grip_rel"]; v != s.GetObjectives()[0] {
				t.Errorf("solution %d: grip_rel %v, want %v", i, v, s.GetObjectives()[0])
			}
		}
	})
	t.Run("svg", func(t *testing.T) {
		t.Parallel()
		for _, c := range []struct {
			path, text string
		}{
			{"/jobs/" + id + "/front.svg", "Pareto front"},
			{"/jobs/" + id + "/solutions/1/curves.svg", "solution 1"},
		} {
			res, body := get(t, b, c.path)
			wantStatus(t, c.path, res, body, http.StatusOK)
			if ct := res.Header.Get("Content-Type"); ct != "image/svg+xml" {
				t.Errorf("%s: Content-Type %q", c.path, ct)
			}
			root, text := xmlRoot(t, body)
			if root != "svg" || !strings.Contains(text, c.text) {
				t.Errorf("%s: root element %q, text without %q", c.path, root, c.text)
			}
		}
		for _, c := range []struct {
			path string
			code int
		}{
			{fmt.Sprintf("/jobs/%s/solutions/%d/curves.svg", id, front.GetTotalSize()), http.StatusNotFound},
			{"/jobs/" + id + "/solutions/one/curves.svg", http.StatusBadRequest},
			{"/jobs/" + id + "/solutions/-1/curves.svg", http.StatusBadRequest},
		} {
			res, body := get(t, b, c.path)
			wantStatus(t, c.path, res, body, c.code)
		}
	})
	t.Run("assets", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/assets/page.js")
		wantStatus(t, "page.js", res, body, http.StatusOK)
		if ct := res.Header.Get("Content-Type"); !strings.Contains(ct, "javascript") {
			t.Errorf("page.js served as %q", ct)
		}
		res, body = get(t, b, "/assets/layout.html")
		wantStatus(t, "a template", res, body, http.StatusNotFound)
		if !strings.Contains(body, "qualified engineers") {
			t.Error("the page of an unknown path lacks the caution")
		}
	})
}

// wholeFrontOf reads a front through the service.
func wholeFrontOf(t *testing.T, b *bundle, name string) *pb.Front {
	t.Helper()
	req := &pb.GetFrontRequest{Job: name, PageSize: frontPageSize, View: pb.SolutionView_SOLUTION_VIEW_FULL}
	var front *pb.Front
	for {
		res, err := b.client.GetFront(testContext(t), req)
		if err != nil {
			t.Fatal(err)
		}
		if front == nil {
			front = res.GetFront()
		} else {
			front.Solutions = append(front.Solutions, res.GetFront().GetSolutions()...)
		}
		if req.PageToken = res.GetNextPageToken(); req.PageToken == "" {
			return front
		}
	}
}

// xmlRoot parses an XML document with encoding/xml and returns its root
// element's name and all its character data; a malformed document fails
// the test.
func xmlRoot(t *testing.T, doc string) (string, string) {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(doc))
	root := ""
	var text bytes.Buffer
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			return root, text.String()
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v", err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = v.Name.Local
			}
		case xml.CharData:
			text.Write(v)
		}
	}
}

// TestAuth runs the page over a service that asks for tokens: the
// reader's token opens it, as a bearer header (RFC 6750 section 2.1) or
// as the login form's cookie; without one the page answers 401 with a
// Bearer challenge (RFC 6750 section 3) and the login form.
func TestAuth(t *testing.T) {
	t.Parallel()
	// A seeded source stands in for crypto/rand in this test only.
	random := rand.NewChaCha8([32]byte{7})
	reader, err := api.NewToken(random)
	if err != nil {
		t.Fatal(err)
	}
	other, err := api.NewToken(random)
	if err != nil {
		t.Fatal(err)
	}
	tokens, err := api.ParseTokens([]byte(fmt.Sprintf("- {name: reader, role: reader, sha256: %q}\n", api.HashToken(reader))))
	if err != nil {
		t.Fatal(err)
	}
	b := setup(t, 0, api.Options{Tokens: tokens})

	t.Run("no token", func(t *testing.T) {
		t.Parallel()
		res, body := get(t, b, "/")
		wantStatus(t, "no token", res, body, http.StatusUnauthorized)
		if ch := res.Header.Get("WWW-Authenticate"); !strings.HasPrefix(ch, "Bearer ") {
			t.Errorf("WWW-Authenticate %q, want a Bearer challenge", ch)
		}
		for _, want := range []string{`name="token"`, "no bearer token", "qualified engineers"} {
			if !strings.Contains(body, want) {
				t.Errorf("the login page lacks %q", want)
			}
		}
		res, body = get(t, b, "/jobs/0123456789abcdef01234567/progress.json")
		wantStatus(t, "progress without a token", res, body, http.StatusUnauthorized)
	})
	t.Run("tokens", func(t *testing.T) {
		t.Parallel()
		cases := []struct {
			name    string
			headers []string
			code    int
		}{
			{"bearer header", []string{"Authorization", "Bearer " + reader}, 200},
			{"bearer header, scheme in lower case", []string{"Authorization", "bearer " + reader}, 200},
			{"cookie", []string{"Cookie", tokenCookie + "=" + reader}, 200},
			{"unknown token", []string{"Authorization", "Bearer " + other}, 401},
			{"unknown cookie", []string{"Cookie", tokenCookie + "=" + other}, 401},
		}
		for _, c := range cases {
			res, body := get(t, b, "/", c.headers...)
			wantStatus(t, c.name, res, body, c.code)
		}
		// Past authentication, the service's own answer shows.
		res, body := get(t, b, "/jobs/0123456789abcdef01234567", "Authorization", "Bearer "+reader)
		wantStatus(t, "unknown job with a token", res, body, http.StatusNotFound)
	})
	t.Run("login", func(t *testing.T) {
		t.Parallel()
		res, body := post(t, b, "/login", url.Values{"token": {other}, "next": {"/jobs/x"}})
		wantStatus(t, "login with an unknown token", res, body, http.StatusUnauthorized)
		if len(res.Cookies()) != 0 || !strings.Contains(body, "not valid on this server") {
			t.Errorf("a refused login set %v; page:\n%.400s", res.Cookies(), body)
		}
		res, body = post(t, b, "/login", url.Values{"token": {reader}, "next": {"/jobs/x"}})
		wantStatus(t, "login", res, body, http.StatusSeeOther)
		if loc := res.Header.Get("Location"); loc != "/jobs/x" {
			t.Errorf("login sends to %q, want /jobs/x", loc)
		}
		var c *http.Cookie
		for _, k := range res.Cookies() {
			if k.Name == tokenCookie {
				c = k
			}
		}
		// RFC 6265 section 4.1.2: HttpOnly keeps it from scripts; SameSite
		// (RFC 6265bis) from other sites' requests.
		if c == nil || c.Value != reader || !c.HttpOnly || c.SameSite != http.SameSiteStrictMode || c.Path != "/" {
			t.Errorf("login cookie %+v", c)
		}
		for _, next := range []string{"//elsewhere.example/x", "https://elsewhere.example/", `/\elsewhere.example`, "/\t/elsewhere.example", "/\v/elsewhere.example", "/%5Celsewhere.example"} {
			res, _ = post(t, b, "/login", url.Values{"token": {reader}, "next": {next}})
			if loc := res.Header.Get("Location"); loc != "/" {
				t.Errorf("login with next=%q sends to %q, want /", next, loc)
			}
		}
		res, body = post(t, b, "/login", url.Values{"token": {reader}}, "Origin", "http://elsewhere.example")
		wantStatus(t, "login from another site", res, body, http.StatusForbidden)
		res, body = post(t, b, "/logout", nil)
		wantStatus(t, "logout", res, body, http.StatusSeeOther)
		if cs := res.Cookies(); len(cs) != 1 || cs[0].Name != tokenCookie || cs[0].MaxAge >= 0 {
			t.Errorf("logout cookies %+v, want the token cookie expired", cs)
		}
	})
}
