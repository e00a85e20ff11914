package web

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"dampfront/api"
	"dampfront/api/apitest"
)

// TestBrowserHistory drives the time-history section in a real browser
// on a stored job with manoeuvres and a kerb: choosing another case
// shows its chart without leaving the page, and clicking another
// solution's row shows that solution's history on the chosen case. It
// saves a screenshot of the section.
func TestBrowserHistory(t *testing.T) {
	t.Parallel()
	bctx := newBrowser(t)
	db := filepath.Join(t.TempDir(), "jobs.db")
	spec, err := apitest.DemoSpec(filepath.Join("..", "..", "testdata", "demo-manoeuvre-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	name, err := apitest.SeedDatabase(bctx, db, spec, 5, 5)
	if err != nil {
		t.Fatal(err)
	}
	b := setupOn(t, db, 0, api.Options{})
	url := b.page.URL + "/" + name + "?solution=1"
	if err := chromedp.Do(bctx, chromedp.Navigate(url), chromedp.WaitVisible(chromedp.CSS("#history-chart svg"))); err != nil {
		t.Fatalf("load %s: %v", url, err)
	}
	const kerb = "Port Vellan chicane, left kerb"
	if _, err := chromedp.Run(bctx, chromedp.Evaluate[bool](fmt.Sprintf(
		`(function () { var s = document.getElementById("history-case"); s.value = %q; s.dispatchEvent(new Event("change")); return true; })()`, kerb))); err != nil {
		t.Fatal(err)
	}
	waitText(t, bctx, "#history-chart svg", kerb+": solution 1")

	row := `#solutions-table tbody tr[data-index="3"] td:nth-child(3)`
	if err := chromedp.Do(bctx, chromedp.ScrollIntoView(chromedp.CSS(row)), chromedp.Click(chromedp.CSS(row)),
		chromedp.WaitVisible(chromedp.CSS(`#history[data-solution="3"] #history-chart svg`))); err != nil {
		t.Fatalf("the history of solution 3 did not appear: %v", err)
	}
	waitText(t, bctx, "#history-chart svg", kerb+": solution 3")
	if err := chromedp.Do(bctx, chromedp.ScrollIntoView(chromedp.CSS("#history"))); err != nil {
		t.Fatal(err)
	}
	png, err := chromedp.Run(bctx, chromedp.Screenshot(chromedp.CSS("#history")))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(artifactDir(t), "job-page-history.png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot of the time-history section: %s", path)
}

// waitText waits until the text of the element sel holds want.
func waitText(t *testing.T, ctx context.Context, sel, want string) {
	t.Helper()
	for {
		got, err := chromedp.Run(ctx, chromedp.TextContent(chromedp.CSS(sel)))
		if err == nil && strings.Contains(got, want) {
			return
		}
		select {
		case <-ctx.Done():
			t.Fatalf("%s never read %q (last %q, %v)", sel, want, got, err)
		case <-time.After(50 * time.Millisecond):
		}
	}
}
