package main

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dampfront/api/plot"
)

// svgTexts parses an SVG file with encoding/xml to the end of the
// document, checks that its root is <svg>, and returns the text of its
// <text> elements joined by spaces (so wrapped footnotes read whole).
func svgTexts(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	d := xml.NewDecoder(bytes.NewReader(b))
	var texts []string
	root, inText := "", false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v", path, err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = tk.Name.Local
			}
			inText = tk.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText {
				texts = append(texts, string(tk))
			}
		}
	}
	if root != "svg" {
		t.Fatalf("%s: root element %q, want svg", path, root)
	}
	return strings.Join(strings.Fields(strings.Join(texts, " ")), " ")
}

// checkSVG fails for every want not in the SVG's text; the caution is
// always wanted.
func checkSVG(t *testing.T, path string, want ...string) {
	t.Helper()
	text := svgTexts(t, path)
	for _, w := range append(want, plot.Caution) {
		if !strings.Contains(text, w) {
			t.Errorf("%s lacks %q; its text:\n%s", path, w, text)
		}
	}
}

// checkPNG decodes a PNG (image/png) and checks its size in pixels:
// the page in mm over 25.4 mm per inch (the inch's definition, 1959)
// times the dots per inch, rounded.
func checkPNG(t *testing.T, path string, widthMM, heightMM float64, dpi int) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s does not decode as PNG: %v", path, err)
	}
	w := int(math.Round(widthMM / 25.4 * float64(dpi)))
	h := int(math.Round(heightMM / 25.4 * float64(dpi)))
	if b := img.Bounds(); b.Dx() != w || b.Dy() != h {
		t.Errorf("%s is %d×%d pixels, want %d×%d", path, b.Dx(), b.Dy(), w, h)
	}
}

// The charts computed here, without a server: a setup's spectra and a
// spec's road input.
func TestPlotLocal(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	spec, setup := testdataPath("demo-job.yaml"), testdataPath("candidate-setup.yaml")
	svg, pngPath := filepath.Join(dir, "spectra.svg"), filepath.Join(dir, "spectra.png")
	r := mustRun(t, exitOK, nil, "plot", "spectra", "--spec", spec, "--setup", setup, "--case", "1",
		"--svg", svg, "--png", pngPath, "--width", "170", "--height", "200", "--dpi", "96")
	if !strings.Contains(r.stdout, "Wrote "+svg) || !strings.Contains(r.stdout, "Wrote "+pngPath) {
		t.Errorf("plot spectra does not name the files it wrote:\n%s", r.stdout)
	}
	// The second road case of the demo spec, the seven modes of a car on
	// four posts, and the setup file's ratios.
	checkSVG(t, svg, "Output spectra, Port Vellan streets, bumpy braking zone", "Tyre load PSD (N²/Hz)",
		"Ride-height PSD (mm²/Hz)", "heave", "pitch", "roll", "front hop", "rear anti-phase hop",
		"front bump 0.550 rebound 0.850, rear bump 0.500 rebound 0.800", "at 30 m/s")
	checkPNG(t, pngPath, 170, 200, 96)

	// The spectra chart's default page is 17 cm × 20 cm.
	mustRun(t, exitOK, nil, "plot", "spectra", "--spec", spec, "--setup", setup, "--png", pngPath)
	checkPNG(t, pngPath, 170, 200, plot.DefaultDPI)

	road := filepath.Join(dir, "road.svg")
	mustRun(t, exitOK, nil, "plot", "road", "--spec", spec, "--svg", road, "--title", "Demo roads")
	checkSVG(t, road, "Demo roads", "Ashgrove Ring, fast sweepers, 55 m/s", "Tolvane Hill, rough slow section, 20 m/s")
}

// Usage errors end with exit code 2 and write no file.
func TestPlotUsage(t *testing.T) {
	t.Parallel()
	spec, setup := testdataPath("demo-job.yaml"), testdataPath("candidate-setup.yaml")
	out := filepath.Join(t.TempDir(), "chart.svg")
	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"no chart", []string{"plot", "--svg", out}, "name a chart"},
		{"unknown chart", []string{"plot", "pie", "--svg", out}, `unknown chart "pie"`},
		{"no file", []string{"plot", "spectra", "--spec", spec, "--setup", setup}, "give --svg FILE, --png FILE or both"},
		{"front without job", []string{"plot", "front", "--svg", out}, "the front chart needs a JOB"},
		{"flag of another chart", []string{"plot", "front", "j1", "--solution", "1", "--svg", out}, "--solution: not a flag of the front chart"},
		{"road with job and spec", []string{"plot", "road", "j1", "--spec", spec, "--svg", out}, "a JOB or --spec FILE, not both"},
		{"spectra without setup", []string{"plot", "spectra", "--spec", spec, "--svg", out}, "needs a JOB, or --spec FILE and --setup FILE"},
		{"spectra with job and spec", []string{"plot", "spectra", "j1", "--spec", spec, "--setup", setup, "--svg", out}, "a JOB or --spec FILE, not both"},
		{"spectra solution without job", []string{"plot", "spectra", "--spec", spec, "--setup", setup, "--solution", "2", "--svg", out}, "--solution and --balanced need a JOB"},
		{"spectra solution and setup", []string{"plot", "spectra", "j1", "--setup", setup, "--solution", "2", "--svg", out}, "at most one of --solution, --balanced and --setup"},
		{"case beyond the spec", []string{"plot", "spectra", "--spec", spec, "--setup", setup, "--case", "3", "--svg", out}, "--case 3: the spec has 3 road cases (0 to 2)"},
		{"page too narrow", []string{"plot", "spectra", "--spec", spec, "--setup", setup, "--width", "50", "--svg", out}, "--width: must be 80 to 1000 mm, got 50.0 mm"},
		{"dpi too high", []string{"plot", "road", "--spec", spec, "--dpi", "2000", "--png", out + ".png", "--svg", out}, "--dpi: must be 24 to 600, got 2000"},
		{"bad spec", []string{"plot", "road", "--spec", testdataPath("candidate-setup.yaml"), "--svg", out}, "candidate-setup.yaml"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := mustRun(t, exitUsage, nil, tc.args...)
			if !strings.Contains(r.stderr, tc.want) {
				t.Errorf("stderr lacks %q:\n%s", tc.want, r.stderr)
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s was written", out)
			}
		})
	}
}

// The charts of a stored job, from a served SQLite database: a short run
// of the demo job.
func TestPlotServer(t *testing.T) {
	t.Parallel()
	s := startServer(t, filepath.Join(t.TempDir(), "plot.db"), nil)
	spec := writeSpec(t, "generations: 30", "generations: 6")
	r := mustRun(t, exitOK, nil, s.client("submit", spec, "--watch", "--quiet")...)
	id := firstLine(r.stdout)
	dir := t.TempDir()
	at := func(name string) string { return filepath.Join(dir, name) }

	mustRun(t, exitOK, nil, s.client("plot", "front", id, "--svg", at("front.svg"), "--png", at("front.png"))...)
	checkSVG(t, at("front.svg"), "Pareto front, Quillon GT, demo tracks", "Job jobs/"+id+", seed 7.",
		"Grip: tyre load variation (% of static load)", "Platform: ride-height variation (mm)", "balanced, #")
	checkPNG(t, at("front.png"), 170, 110, plot.DefaultDPI) // the front chart's default page, 17 cm × 11 cm

	mustRun(t, exitOK, nil, s.client("plot", "front", id, "--colour", "rear_bump_ratio", "--mark", "0,1", "--svg", at("front-marked.svg"))...)
	checkSVG(t, at("front-marked.svg"), "Rear bump ratio", "marked", "#0", "#1")

	mustRun(t, exitOK, nil, s.client("plot", "curves", id, "--svg", at("curves.svg"))...)
	checkSVG(t, at("curves.svg"), "Damper curves at the component, balanced point (solution", "Job jobs/"+id+", seed 7.", "Front dampers", "Rear dampers",
		"adjuster range, softest to stiffest", "Setup: front bump")
	mustRun(t, exitOK, nil, s.client("plot", "curves", id, "--solution", "0", "--png", at("curves.png"), "--width", "240", "--height", "110", "--dpi", "96")...)
	checkPNG(t, at("curves.png"), 240, 110, 96)

	mustRun(t, exitOK, nil, s.client("plot", "modes", id, "--svg", at("modes.svg"))...)
	checkSVG(t, at("modes.svg"), "Modal damping ratios across the front, Quillon GT, demo tracks", "Tolvane Hill, rough slow section",
		"Modal damping ratio", "heave, hand (rigid tyres)", "balanced point, solution", "Job jobs/"+id+", seed 7.")
	mustRun(t, exitOK, nil, s.client("plot", "modes", id, "--objectives", "1", "--svg", at("modes-1.svg"))...)
	checkSVG(t, at("modes-1.svg"), "Platform: ride-height variation (mm)")

	mustRun(t, exitOK, nil, s.client("plot", "hypervolume", id, "--svg", at("hv.svg"))...)
	checkSVG(t, at("hv.svg"), "Hypervolume per generation, Quillon GT, demo tracks", "Hypervolume (% × mm)", "Generation 6 of 6")

	mustRun(t, exitOK, nil, s.client("plot", "road", id, "--svg", at("road.svg"))...)
	checkSVG(t, at("road.svg"), "Road input, Quillon GT, demo tracks", "Port Vellan streets, bumpy braking zone, 30 m/s")

	// Spectra of the job's balanced point (the default), of a solution,
	// and of a setup file on the job's car and roads.
	mustRun(t, exitOK, nil, s.client("plot", "spectra", id, "--case", "2", "--svg", at("spectra-balanced.svg"))...)
	checkSVG(t, at("spectra-balanced.svg"), "Output spectra, Tolvane Hill, rough slow section", "Balanced point, solution", "of jobs/"+id, "at 20 m/s")
	mustRun(t, exitOK, nil, s.client("plot", "spectra", id, "--solution", "0", "--svg", at("spectra-0.svg"))...)
	checkSVG(t, at("spectra-0.svg"), "Output spectra, Ashgrove Ring, fast sweepers", "Solution 0 of jobs/"+id)
	mustRun(t, exitOK, nil, s.client("plot", "spectra", id, "--setup", testdataPath("candidate-setup.yaml"), "--svg", at("spectra-setup.svg"))...)
	checkSVG(t, at("spectra-setup.svg"), "candidate-setup.yaml on jobs/"+id, "front bump 0.550 rebound 0.850")

	for _, tc := range []struct {
		name string
		args []string
		want string
	}{
		{"unknown gene", []string{"plot", "front", id, "--colour", "no_such_gene", "--svg", at("x.svg")}, "--colour:"},
		{"no such solution", []string{"plot", "curves", id, "--solution", "9999", "--svg", at("x.svg")}, "9999"},
		{"no such solution for spectra", []string{"plot", "spectra", id, "--solution", "9999", "--svg", at("x.svg")}, "has no solution 9999"},
		{"case beyond the job's", []string{"plot", "spectra", id, "--case", "3", "--svg", at("x.svg")}, "--case 3: the spec has 3 road cases"},
		{"no such job", []string{"plot", "hypervolume", "no-such-job", "--svg", at("x.svg")}, "not found"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := mustRun(t, exitUsage, nil, s.client(tc.args...)...)
			if !strings.Contains(r.stderr, tc.want) {
				t.Errorf("stderr lacks %q:\n%s", tc.want, r.stderr)
			}
		})
	}
}
