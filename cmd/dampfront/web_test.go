package main

import (
	"io"
	"net/http"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

// waitAddrFile waits for a server's address file and returns the address.
func waitAddrFile(t *testing.T, s *server, path string) string {
	t.Helper()
	deadline := time.Now().Add(serverStart)
	for time.Now().Before(deadline) {
		if b, err := os.ReadFile(path); err == nil {
			return strings.TrimSpace(string(b))
		}
		select {
		case <-s.done:
			t.Fatalf("dampfront serve exited early:\n%s", s.logs.String())
		case <-time.After(20 * time.Millisecond):
		}
	}
	t.Fatalf("no %s within %v", path, serverStart)
	return ""
}

// httpGet fetches url with the headers given as name, value pairs.
func httpGet(t *testing.T, url string, headers ...string) (int, string) {
	t.Helper()
	req, err := http.NewRequest(http.MethodGet, url, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i+1 < len(headers); i += 2 {
		req.Header.Set(headers[i], headers[i+1])
	}
	c := &http.Client{Timeout: commandTimeout}
	res, err := c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Body.Close()
	b, err := io.ReadAll(res.Body)
	if err != nil {
		t.Fatal(err)
	}
	return res.StatusCode, string(b)
}

// metricValue is the value of the one sample of the exposition that
// starts with series (name and labels as written, in the text format's
// sorted label order).
func metricValue(t *testing.T, exposition, series string) float64 {
	t.Helper()
	m := regexp.MustCompile(`(?m)^` + regexp.QuoteMeta(series) + ` (\S+)$`).FindStringSubmatch(exposition)
	if m == nil {
		t.Fatalf("no sample %s in the metrics:\n%.2000s", series, exposition)
	}
	v, err := strconv.ParseFloat(m[1], 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// serve --http-addr serves the job page and the metrics beside the API,
// over the same engine: the job submitted through the API shows on the
// page, and the metrics count it.
func TestServeJobPage(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	pageFile := filepath.Join(dir, "http-addr")
	s := startServer(t, filepath.Join(dir, "page.db"), nil, "--http-addr", "127.0.0.1:0", "--http-addr-file", pageFile)
	base := "http://" + waitAddrFile(t, s, pageFile)
	spec := writeSpec(t, "generations: 30", "generations: 6")
	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec, "--watch", "--quiet")...).stdout)

	code, body := httpGet(t, base+"/")
	if code != http.StatusOK || !strings.Contains(body, id) || !strings.Contains(body, "succeeded") {
		t.Errorf("jobs list: %d\n%.1000s", code, body)
	}
	code, body = httpGet(t, base+"/jobs/"+id)
	if code != http.StatusOK || !strings.Contains(body, `id="front-chart"><svg`) || !strings.Contains(body, "qualified engineers") {
		t.Errorf("job page: %d\n%.1000s", code, body)
	}

	var job pb.Job
	if err := protojson.Unmarshal([]byte(mustRun(t, exitOK, nil, s.client("get", id, "--format", "json")...).stdout), &job); err != nil {
		t.Fatal(err)
	}
	code, metrics := httpGet(t, base+"/metrics")
	if code != http.StatusOK {
		t.Fatalf("/metrics: %d", code)
	}
	const svc = `service="dampfront.v1.DampfrontService"`
	for _, c := range []struct {
		series string
		want   float64
	}{
		{`dampfront_jobs{state="succeeded"}`, 1},
		{`dampfront_jobs{state="running"}`, 0},
		{`dampfront_store_up`, 1},
		{`dampfront_generations_total`, 6},
		{`dampfront_evaluations_total`, float64(job.GetProgress().GetEvaluations())},
		{`dampfront_rpc_requests_total{code="OK",method="SubmitJob",` + svc + `}`, 1},
		{`dampfront_http_requests_total{code="200",handler="job"}`, 1},
	} {
		if got := metricValue(t, metrics, c.series); got != c.want {
			t.Errorf("%s = %v, want %v", c.series, got, c.want)
		}
	}
}

// With --tokens the page asks for one of them; off loopback without
// tokens it refuses to start, as the API does.
func TestServeJobPageAuth(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	token, line := newToken(t, "viewer", "reader")
	tokensFile := writeTestFile(t, dir, "tokens.yaml", []byte(line+"\n"))
	pageFile := filepath.Join(dir, "http-addr")
	s := startServer(t, filepath.Join(dir, "auth.db"), nil, "--tokens", tokensFile, "--http-addr", "127.0.0.1:0", "--http-addr-file", pageFile)
	base := "http://" + waitAddrFile(t, s, pageFile)
	if code, body := httpGet(t, base+"/"); code != http.StatusUnauthorized || !strings.Contains(body, `name="token"`) {
		t.Errorf("without a token: %d\n%.600s", code, body)
	}
	if code, body := httpGet(t, base+"/", "Authorization", "Bearer "+token); code != http.StatusOK {
		t.Errorf("with the reader's token: %d\n%.600s", code, body)
	}

	// 192.0.2.0/24 is TEST-NET-1 (RFC 5737), never a local address; the
	// check comes before anything listens.
	r := mustRun(t, exitUsage, nil, "serve", "--addr", "127.0.0.1:0", "--http-addr", "192.0.2.1:0", "--database", filepath.Join(dir, "never.db"))
	if want := "--http-addr 192.0.2.1:0 is not a loopback address"; !strings.Contains(r.stderr, want) {
		t.Errorf("serve --http-addr off loopback without tokens: stderr lacks %q:\n%s", want, r.stderr)
	}
}

// The demo serves the job page while it runs and says where; without
// --serve-page it says how to keep it open, and still ends with the
// caution.
func TestDemoJobPage(t *testing.T) {
	t.Parallel()
	r := mustRun(t, exitOK, []string{"TMPDIR=" + t.TempDir()}, "demo", "--quiet", "--spec", writeSpec(t, "generations: 30", "generations: 4"))
	if !regexp.MustCompile(`(?m)^Job page: http://127\.0\.0\.1:\d+/jobs/[0-9a-f]+$`).MatchString(r.stdout) {
		t.Errorf("the demo does not print its job page:\n%s", r.stdout)
	}
	if !strings.Contains(r.stdout, "run with --serve-page to keep it open at http://127.0.0.1:") {
		t.Errorf("the demo does not say how to keep the page:\n%s", r.stdout)
	}
	if !strings.HasSuffix(strings.TrimSpace(r.stdout), cautionText) {
		t.Errorf("demo output does not end with the caution:\n%s", r.stdout)
	}
}
