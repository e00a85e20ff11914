package plot

import (
	"bytes"
	"errors"
	"image/png"
	"strings"
	"testing"

	"dampfront/model"

	"gonum.org/v1/plot/vg"
)

// TestFigurePNGSize checks the pixel size of the PNG at several
// resolutions: an inch is 72 points (PostScript point, as vg.Length
// counts), so W points at d dpi are W/72 × d pixels.
func TestFigurePNGSize(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		dpi          int
		w, h         vg.Length
		wantW, wantH int
	}{
		{72, 360, 216, 360, 216},                              // 5 × 3 in at 72 dpi
		{144, 360, 216, 720, 432},                             // the same at 144 dpi
		{0, 17 * vg.Centimeter, 10 * vg.Centimeter, 964, 567}, // 6.69 × 3.94 in at DefaultDPI 144
	} {
		fig, err := Hypervolume(testHistory(), nil, HypervolumeOptions{Width: tc.w, Height: tc.h})
		if err != nil {
			t.Fatal(err)
		}
		fig.DPI = tc.dpi
		var b bytes.Buffer
		if err := fig.WritePNG(&b); err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(&b)
		if err != nil {
			t.Fatal(err)
		}
		if got := img.Bounds().Size(); got.X != tc.wantW || got.Y != tc.wantH {
			t.Errorf("%v × %v at %d dpi: %v pixels, want %d × %d", tc.w, tc.h, tc.dpi, got, tc.wantW, tc.wantH)
		}
	}
}

func TestFigureWriteUnknownFormat(t *testing.T) {
	t.Parallel()
	fig, err := Hypervolume(testHistory(), nil, HypervolumeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if err := fig.Write(&bytes.Buffer{}, "pdf"); err == nil || !strings.Contains(err.Error(), "pdf") {
		t.Errorf("Write(pdf) error %v, want one naming the format", err)
	}
}

// TestWrap checks the footnote wrapping: no line wider than the width,
// and the words in order with nothing lost.
func TestWrap(t *testing.T) {
	t.Parallel()
	sty := textStyle(sizeNote)
	for _, width := range []vg.Length{80, 200, 1000} {
		lines := wrap(sty, Caution, width)
		for _, l := range lines {
			if w := sty.Width(l); w > width && strings.Contains(l, " ") {
				t.Errorf("width %v: line %q is %v wide", width, l, w)
			}
		}
		if got := strings.Join(lines, " "); got != Caution {
			t.Errorf("width %v: wrapped text %q, want %q", width, got, Caution)
		}
	}
	if n := len(wrap(sty, Caution, 1000)); n != 1 {
		t.Errorf("caution in %d lines at 1000 pt, want 1", n)
	}
}

func TestFigurePageLimits(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name   string
		w, h   vg.Length
		dpi    int
		format Format
		field  string
	}{
		{"narrow", 5 * vg.Centimeter, 10 * vg.Centimeter, 0, SVG, "width"},
		{"flat", 17 * vg.Centimeter, 2 * vg.Centimeter, 0, PNG, "height"},
		{"huge", 17 * vg.Centimeter, 200 * vg.Centimeter, 0, SVG, "height"},
		{"dpi", 17 * vg.Centimeter, 10 * vg.Centimeter, 2000, PNG, "dpi"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			fig, err := Hypervolume(testHistory(), nil, HypervolumeOptions{Width: tc.w, Height: tc.h})
			if err != nil {
				t.Fatal(err)
			}
			fig.DPI = tc.dpi
			err = fig.Write(&bytes.Buffer{}, tc.format)
			var ve *model.ValidationError
			if !errors.As(err, &ve) || ve.Problems[0].Field != tc.field {
				t.Errorf("error %v, want one naming %q", err, tc.field)
			}
		})
	}
}
