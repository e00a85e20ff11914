package web

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
)

// TestBrowserSheet opens the demo's balanced point's specification sheet
// from the job page's link in a real browser, saves a screenshot of it
// and prints it to PDF on A4 (the browser's print, as a reader would):
// the print styles must give a few pages, not one per table.
func TestBrowserSheet(t *testing.T) {
	t.Parallel()
	bctx := newBrowser(t)
	b, name, s := sheetJob(t)
	id := strings.TrimPrefix(name, "jobs/")
	link := fmt.Sprintf(`#solutions-table tbody tr[data-index="%d"] a.sheet-link`, s.Index)
	if err := chromedp.Do(bctx,
		chromedp.Navigate(b.page.URL+"/jobs/"+id),
		chromedp.WaitVisible(chromedp.CSS("#modes table")),
		chromedp.ScrollIntoView(chromedp.CSS(link)),
		chromedp.Click(chromedp.CSS(link)),
		chromedp.WaitVisible(chromedp.CSS("#forces table")),
	); err != nil {
		t.Fatalf("the sheet of solution %d did not open from the job page: %v", s.Index, err)
	}
	title, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS("h1")))
	if err != nil {
		t.Fatal(err)
	}
	if want := fmt.Sprintf("solution %d", s.Index); !strings.Contains(title, want) {
		t.Errorf("the sheet's title %q does not name %q", title, want)
	}
	caution, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS("#caution")))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(caution, "qualified engineers") {
		t.Errorf("the sheet's caution reads %q", caution)
	}
	png, err := chromedp.Run(bctx, chromedp.FullScreenshot(100))
	if err != nil {
		t.Fatal(err)
	}
	artifacts := artifactDir(t)
	path := filepath.Join(artifacts, "sheet.png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot of the sheet: %s", path)

	pdf, err := chromedp.Run(bctx, chromedp.PrintToPDF(chromedp.PDFPaper(chromedp.PaperA4), chromedp.PDFPrintBackground()))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(pdf, []byte("%PDF-")) {
		t.Fatalf("the printed sheet is not a PDF: %.20q", pdf)
	}
	pages := bytes.Count(pdf, []byte("/Type /Page\n")) + bytes.Count(pdf, []byte("/Type /Page\r")) + bytes.Count(pdf, []byte("/Type /Page>>")) + bytes.Count(pdf, []byte("/Type /Page/"))
	t.Logf("the sheet prints on %d A4 pages (pages counted by their /Type /Page objects)", pages)
	path = filepath.Join(artifacts, "sheet.pdf")
	if err := os.WriteFile(path, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("the sheet printed to PDF: %s", path)
}
