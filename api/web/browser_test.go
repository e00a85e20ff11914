package web

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"dampfront/api"
)

// chromiumPath is Debian's chromium (apt-get install chromium).
const chromiumPath = "/usr/bin/chromium"

// browserTimeout bounds the whole browser test: start-up, a job of a few
// seconds and the page's polls.
const browserTimeout = 55 * time.Second

// artifactDir is where the test leaves its screenshots: $DAMPFRONT_ARTIFACTS
// when set (CI keeps it), a temporary directory otherwise.
func artifactDir(t *testing.T) string {
	t.Helper()
	if d := os.Getenv("DAMPFRONT_ARTIFACTS"); d != "" {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
		return d
	}
	return t.TempDir()
}

// newBrowser starts a headless Chromium with an empty profile, nothing of
// its own on the network, and a window the size of a laptop screen.
func newBrowser(t *testing.T) context.Context {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		t.Skipf("no browser at %s (Debian: apt-get install chromium): %v", chromiumPath, err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), browserTimeout)
	t.Cleanup(cancel)
	actx, acancel := chromedp.NewExecAllocator(ctx,
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1440, 1000),
	)
	t.Cleanup(acancel)
	bctx, bcancel := chromedp.NewContext(actx)
	t.Cleanup(bcancel)
	return bctx
}

// TestBrowserJobPage drives the page in a real browser: the page of a
// queued job follows it to its end without being navigated, then shows
// the front chart; sorting the table by an objective orders the rows by
// it; clicking a solution shows that solution's damper curves. It saves
// a screenshot of the finished page.
func TestBrowserJobPage(t *testing.T) {
	t.Parallel()
	bctx := newBrowser(t)

	// The page's engine has no workers, so the job stays queued until a
	// second engine on the same database, a worker alone, starts.
	dir := t.TempDir()
	db := filepath.Join(dir, "jobs.db")
	b := setupOn(t, db, 0, api.Options{})
	job := b.submit(t, demoSpec(t, 16, 10))
	url := b.page.URL + "/jobs/" + job.GetJobId()

	if err := chromedp.Do(bctx, chromedp.Navigate(url), chromedp.WaitVisible(chromedp.CSS("#progress-bar"))); err != nil {
		t.Fatalf("load %s: %v", url, err)
	}
	text, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS("#progress-text")))
	if err != nil {
		t.Fatal(err)
	}
	if text != "waiting for a worker" {
		t.Errorf("progress of the queued job reads %q, want %q", text, "waiting for a worker")
	}
	startEngine(t, engineConfig(db, 1))

	// The page polls, sees the job finish and reloads itself with the front.
	if err := chromedp.Do(bctx, chromedp.WaitVisible(chromedp.CSS("#front-chart svg"))); err != nil {
		t.Fatalf("the front chart did not appear: %v", err)
	}
	caution, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS("#caution")))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(caution, "qualified engineers") {
		t.Errorf("caution reads %q", caution)
	}

	// Sort by the first objective (column after the index and the four
	// genes of the demo's design space), ascending on the first press.
	const col = 5
	if err := chromedp.Do(bctx, chromedp.Click(chromedp.CSS(fmt.Sprintf("#solutions-table th[data-col=\"%d\"] button", col)))); err != nil {
		t.Fatal(err)
	}
	keys, err := chromedp.Run(bctx, chromedp.Evaluate[[]string](fmt.Sprintf(
		`Array.from(document.querySelectorAll("#solutions-table tbody tr")).map(r => r.cells[%d].dataset.sort)`, col)))
	if err != nil {
		t.Fatal(err)
	}
	values := make([]float64, len(keys))
	for i, k := range keys {
		if values[i], err = strconv.ParseFloat(k, 64); err != nil {
			t.Fatalf("row %d sorts by %q: %v", i, k, err)
		}
	}
	if len(values) < 2 || !slices.IsSorted(values) {
		t.Errorf("after sorting by column %d the rows' values are %v, want ascending", col, values)
	}

	// Click another solution than the one shown.
	shown, err := chromedp.Run(bctx, chromedp.AttributeValue(chromedp.CSS("#curves"), "data-solution"))
	if err != nil {
		t.Fatal(err)
	}
	pick, err := chromedp.Run(bctx, chromedp.Evaluate[string](fmt.Sprintf(
		`Array.from(document.querySelectorAll("#solutions-table tbody tr")).map(r => r.dataset.index).find(i => i !== %q)`, shown.Value)))
	if err != nil {
		t.Fatal(err)
	}
	row := fmt.Sprintf(`#solutions-table tbody tr[data-index="%s"] td:nth-child(3)`, pick)
	if err := chromedp.Do(bctx,
		chromedp.ScrollIntoView(chromedp.CSS(row)),
		chromedp.Click(chromedp.CSS(row)),
		chromedp.WaitVisible(chromedp.CSS(fmt.Sprintf(`#curves[data-solution="%s"] #curves-chart svg`, pick))),
	); err != nil {
		t.Fatalf("the damper curves of solution %s did not appear: %v", pick, err)
	}
	title, err := chromedp.Run(bctx, chromedp.TextContent(chromedp.CSS("#curves-chart svg")))
	if err != nil {
		t.Fatal(err)
	}
	if want := "solution " + pick; !strings.Contains(title, want) {
		t.Errorf("the curve chart's text does not name %q", want)
	}
	selected, err := chromedp.Run(bctx, chromedp.Evaluate[[]string](
		`Array.from(document.querySelectorAll("#solutions-table tbody tr.selected")).map(r => r.dataset.index)`))
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(selected, []string{pick}) {
		t.Errorf("selected rows %v, want [%s]", selected, pick)
	}
	// The car-at-speed section stays the loaded solution's and says so,
	// linking the picked one's.
	note, err := chromedp.Run(bctx, chromedp.Evaluate[string](
		`(function () { var n = document.getElementById("at-speed-other"); return n.hidden ? "" : n.textContent + " " + document.getElementById("at-speed-link").getAttribute("href"); })()`))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(note, "solution "+shown.Value+"'s") || !strings.Contains(note, "?solution="+pick+"#at-speed") {
		t.Errorf("after picking solution %s the car-at-speed note reads %q, want it to name solution %s and link %s's", pick, note, shown.Value, pick)
	}

	png, err := chromedp.Run(bctx, chromedp.FullScreenshot(100))
	if err != nil {
		t.Fatal(err)
	}
	artifacts := artifactDir(t)
	path := filepath.Join(artifacts, "job-page.png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot of the job page: %s", path)

	// The jobs list shows the finished job with its state and labels.
	if err := chromedp.Do(bctx, chromedp.Navigate(b.page.URL+"/"), chromedp.WaitVisible(chromedp.CSS("table.jobs"))); err != nil {
		t.Fatal(err)
	}
	list, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS("table.jobs tbody")))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{job.GetJobId(), "succeeded", "car=quillon-gt"} {
		if !strings.Contains(list, want) {
			t.Errorf("the jobs list lacks %q:\n%s", want, list)
		}
	}
	if png, err = chromedp.Run(bctx, chromedp.FullScreenshot(100)); err != nil {
		t.Fatal(err)
	}
	path = filepath.Join(artifacts, "jobs-list.png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot of the jobs list: %s", path)
	if err := bctx.Err(); errors.Is(err, context.DeadlineExceeded) {
		t.Fatalf("browser test ran past %v", browserTimeout)
	}
}
