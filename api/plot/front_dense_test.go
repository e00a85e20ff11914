package plot

import (
	"image/color"
	"testing"

	"gonum.org/v1/plot/plotter"
)

// A dense front is drawn translucent (overlap then shows as density) and
// a sparse one opaque; the labels of highlighted points that lie close
// together go on separate lines, and those far apart stay on the first.
func TestDenseFrontAndLabelsApart(t *testing.T) {
	t.Parallel()
	if a, _ := dotAlpha(sparseFront); a != 1 {
		t.Errorf("a front of %d is drawn with opacity %v, want 1", sparseFront, a)
	}
	if a, _ := dotAlpha(1500); !(a > 0 && a < 1) {
		t.Errorf("a front of 1500 is drawn with opacity %v, want translucent", a)
	}
	if c := translucent(color.NRGBA{R: 10, G: 20, B: 30, A: 255}, 0.2).(color.NRGBA); c.A != 51 || c.R != 10 {
		t.Errorf("translucent: %v, want alpha 51 (0.2 of 255) and the same colour", c)
	}
	all := plotter.XYs{{X: 0, Y: 0}, {X: 10, Y: 10}}
	at := plotter.XYs{{X: 5, Y: 5}, {X: 5.1, Y: 5.1}, {X: 5, Y: 5.2}, {X: 9, Y: 1}}
	off := labelOffsets(at, all)
	if off[0].Y == off[1].Y || off[1].Y == off[2].Y || off[0].Y == off[2].Y {
		t.Errorf("labels of three nearby points share a line: %v", off[:3])
	}
	if off[3] != off[0] {
		t.Errorf("a lone label moved: %v, want %v", off[3], off[0])
	}
}
