package plot

import (
	"bytes"
	"encoding/xml"
	"flag"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// writeExamples rewrites the example PNGs of testdata for the README:
//
//	go test ./api/plot -run Example -args -examples
var writeExamples = flag.Bool("examples", false, "write the example PNGs to testdata/")

// Bounds of the share of non-white pixels of a rendered chart: an empty
// page has none; a chart whose background failed to paint is all ink.
// Common-practice bounds, set by looking at the charts of this package
// (2 % to 20 % of their pixels are drawn on).
const (
	minInk = 0.01
	maxInk = 0.5
)

// Example PNGs for the README are written at 96 dpi and must stay under
// 100 KB each.
const (
	exampleDPI      = 96
	maxExampleBytes = 100 << 10
)

// lookDir, when set in the environment, receives every rendered PNG and
// SVG so that they can be looked at.
const lookDirEnv = "DAMPFRONT_PLOT_DIR"

// rendered is a figure in both formats.
type rendered struct {
	svg, png []byte
}

// render writes fig as SVG and PNG and checks both structurally (a named
// figure is also written for looking at and as a README example): the SVG
// is well-formed XML (encoding/xml, to the end of the document) with an
// <svg> root, the PNG decodes (image/png) to the size WritePNG documents.
func render(t *testing.T, name string, fig *Figure) rendered {
	t.Helper()
	var r rendered
	var sb, pb bytes.Buffer
	if err := fig.WriteSVG(&sb); err != nil {
		t.Fatalf("WriteSVG: %v", err)
	}
	if err := fig.Write(&pb, PNG); err != nil {
		t.Fatalf("Write(PNG): %v", err)
	}
	r.svg, r.png = sb.Bytes(), pb.Bytes()

	img, err := png.Decode(bytes.NewReader(r.png))
	if err != nil {
		t.Fatalf("PNG does not decode: %v", err)
	}
	// Pixels = page size in inches × DPI, rounded (vgimg.NewWith).
	wantW := int(math.Round(float64(fig.Width) / 72 * DefaultDPI))
	wantH := int(math.Round(float64(fig.Height) / 72 * DefaultDPI))
	if b := img.Bounds(); b.Dx() != wantW || b.Dy() != wantH {
		t.Errorf("PNG is %d×%d pixels, want %d×%d", b.Dx(), b.Dy(), wantW, wantH)
	}
	if dir := os.Getenv(lookDirEnv); dir != "" && name != "" {
		for ext, b := range map[string][]byte{".png": r.png, ".svg": r.svg} {
			if err := os.WriteFile(filepath.Join(dir, name+ext), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	// A chart is mostly white page, but not all: the share of pixels
	// that are not white is a coarse check that something was drawn.
	inked := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			if r, g, bl, _ := img.At(x, y).RGBA(); r&g&bl != 0xffff {
				inked++
			}
		}
	}
	if share := float64(inked) / float64(b.Dx()*b.Dy()); share < minInk || share > maxInk {
		t.Errorf("%.1f %% of the PNG's pixels are not white, want %g %% to %g %%", 100*share, 100*minInk, 100*maxInk)
	}
	if *writeExamples && name != "" {
		ex := *fig
		ex.DPI = exampleDPI
		var eb bytes.Buffer
		if err := ex.WritePNG(&eb); err != nil {
			t.Fatal(err)
		}
		if eb.Len() > maxExampleBytes {
			t.Errorf("example %s.png is %d bytes, over the README's %d", name, eb.Len(), maxExampleBytes)
		}
		if err := os.WriteFile(filepath.Join("testdata", name+".png"), eb.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return r
}

// svgText parses an SVG document and returns the text of its <text>
// elements, one per line, entities decoded. It fails the test when the
// document is not well-formed XML or its root is not <svg>.
func svgText(t *testing.T, doc []byte) string {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(doc))
	var out strings.Builder
	depth, inText, root := 0, false, ""
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			if depth == 0 {
				root = tk.Name.Local
			}
			depth++
			inText = tk.Name.Local == "text"
		case xml.EndElement:
			depth--
			if tk.Name.Local == "text" {
				out.WriteByte('\n')
				inText = false
			}
		case xml.CharData:
			if inText {
				out.Write(tk)
			}
		}
	}
	if root != "svg" {
		t.Fatalf("SVG root element is %q, want svg", root)
	}
	if bytes.Contains(doc, []byte(svgFamily)) {
		t.Errorf("SVG names %q without fallbacks", svgFamily)
	}
	return out.String()
}

// checkTexts fails for every want not found in the SVG's text; lines are
// joined with spaces first, so wrapped footnotes are found whole.
func checkTexts(t *testing.T, r rendered, want ...string) {
	t.Helper()
	text := svgText(t, r.svg)
	joined := strings.Join(strings.Fields(text), " ")
	for _, w := range want {
		if !strings.Contains(joined, w) {
			t.Errorf("SVG text lacks %q; it has:\n%s", w, text)
		}
	}
}

// checkLines fails for every want that is not the whole text of one of
// the SVG's <text> elements.
func checkLines(t *testing.T, r rendered, want ...string) {
	t.Helper()
	lines := map[string]bool{}
	for _, l := range strings.Split(svgText(t, r.svg), "\n") {
		lines[strings.TrimSpace(l)] = true
	}
	for _, w := range want {
		if !lines[w] {
			t.Errorf("SVG has no text element %q", w)
		}
	}
}
