package web

import (
	"context"
	"fmt"
	"math/rand/v2"
	"net/http"
	"net/url"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"dampfront/api"
	"dampfront/api/apitest"
)

// TestJobPageHistory checks the time-history section of the job page on
// the example job with manoeuvres and a kerb
// (testdata/demo-manoeuvre-job.yaml): the section offers the job's three
// cases, shows the case the query names for the solution it names, and
// its chart, drawn from the service's GetTransientHistory, is served on
// its own (inline and as a download); a case the job does not have is
// refused naming it. The chart's own figures are checked in package plot.
func TestJobPageHistory(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	defer cancel()
	db := filepath.Join(t.TempDir(), "jobs.db")
	spec, err := apitest.DemoSpec(filepath.Join("..", "..", "testdata", "demo-manoeuvre-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	name, err := apitest.SeedDatabase(ctx, db, spec, 5, 5)
	if err != nil {
		t.Fatal(err)
	}
	id := strings.TrimPrefix(name, "jobs/")
	b := setupOn(t, db, 0, api.Options{})

	const turn = "Ashgrove sweeper, turn-in"
	res, body := get(t, b, "/jobs/"+id+"?"+url.Values{"solution": {"2"}, "case": {turn}}.Encode())
	wantStatus(t, "job page", res, body, http.StatusOK)
	section := regexp.MustCompile(`(?s)<section id="history" data-solution="2"[^>]*>(.*?)</section>`).FindStringSubmatch(body)
	if section == nil {
		t.Fatalf("no time-history section for solution 2 on the page:\n%.3000s", body)
	}
	for _, want := range []string{
		"Time history, solution <span id=\"history-index\">2</span>",
		`<option value="Ashgrove hairpin, braking from top speed">Ashgrove hairpin, braking from top speed (manoeuvre)</option>`,
		`<option value="Ashgrove sweeper, turn-in" selected>Ashgrove sweeper, turn-in (manoeuvre)</option>`,
		`<option value="Port Vellan chicane, left kerb">Port Vellan chicane, left kerb (kerb)</option>`,
		"<svg", "Time history, Ashgrove sweeper, turn-in: solution 2", "Lateral load transfer, front share", "steady value (quasi-static end)",
	} {
		if !strings.Contains(section[1], want) {
			t.Errorf("the time-history section lacks %q:\n%.3000s", want, section[1])
		}
	}
	if strings.Contains(section[1], `id="history-problem">`) {
		t.Errorf("the time-history section shows a problem:\n%.3000s", section[1])
	}

	// Without a case the page shows the first.
	_, body = get(t, b, "/jobs/"+id+"?solution=2")
	if !strings.Contains(body, "Time history, Ashgrove hairpin, braking from top speed: solution 2") {
		t.Errorf("the page without ?case= does not show the first case")
	}

	chart := "/jobs/" + id + "/solutions/4/history.svg?" + url.Values{"case": {"Port Vellan chicane, left kerb"}}.Encode()
	res, body = get(t, b, chart)
	wantStatus(t, "history chart", res, body, http.StatusOK)
	if ct := res.Header.Get("Content-Type"); ct != "image/svg+xml" || res.Header.Get("Content-Disposition") != "" {
		t.Errorf("inline chart: Content-Type %q, Content-Disposition %q", ct, res.Header.Get("Content-Disposition"))
	}
	if root, _ := xmlRoot(t, body); root != "svg" || !strings.Contains(body, "left kerb: solution 4") {
		t.Errorf("the chart of solution 4 on the kerb is not an SVG of it (root %q)", root)
	}
	res, _ = get(t, b, chart+"&download=1")
	if cd := res.Header.Get("Content-Disposition"); !strings.Contains(cd, "solution-4-history.svg") {
		t.Errorf("download: Content-Disposition %q", cd)
	}
	res, body = get(t, b, "/jobs/"+id+"/solutions/4/history.svg?case=no+such+case")
	wantStatus(t, "unknown case", res, body, http.StatusBadRequest)
	if !strings.Contains(body, `no manoeuvre or kerb case named "no such case"`) {
		t.Errorf("unknown case: %q", body)
	}

	// A reader may see the job but not run the simulation: the section
	// says why in place of the chart, and the rest of the page stands.
	reader, err := api.NewToken(rand.NewChaCha8([32]byte{12})) // seeded, in this test only
	if err != nil {
		t.Fatal(err)
	}
	tokens, err := api.ParseTokens([]byte(fmt.Sprintf("- {name: reader, role: reader, sha256: %q}\n", api.HashToken(reader))))
	if err != nil {
		t.Fatal(err)
	}
	rb := setupOn(t, db, 0, api.Options{Tokens: tokens})
	res, body = get(t, rb, "/jobs/"+id+"?solution=2", "Authorization", "Bearer "+reader)
	wantStatus(t, "job page of a reader", res, body, http.StatusOK)
	if !strings.Contains(body, "The time history cannot be drawn: token &#34;reader&#34; has role") || !strings.Contains(body, `id="curves-chart"><svg`) {
		t.Errorf("a reader's page does not say why the history is missing, or lacks the curves:\n%.4000s", body)
	}
}
