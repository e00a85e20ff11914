package plot

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// sequentialControls make the colour map of a gene's value: dark purple
// through teal to yellow-green, increasing in lightness so that it reads
// in grey too (control colours after the viridis map of S. van der Walt
// and N. Smith, 2015, approximated from memory; the last one darkened so
// that it stays visible on white). moreland.NewLuminance checks that the
// lightness increases.
var sequentialControls = []color.Color{
	color.RGBA{68, 1, 84, 255},
	color.RGBA{59, 82, 139, 255},
	color.RGBA{33, 144, 140, 255},
	color.RGBA{93, 200, 99, 255},
	color.RGBA{200, 215, 40, 255},
}

// colourScale maps values in [lo, hi] to colours.
type colourScale struct {
	cmap   palette.ColorMap
	lo, hi float64
}

// newColourScale spans the finite values; a set without spread is
// widened by 5 % of its magnitude (or 0.05) each way so the bar has a range.
func newColourScale(values []float64) colourScale {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range values {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if !(hi > lo) {
		d := 0.05 * math.Max(math.Abs(lo), 1)
		lo, hi = lo-d, hi+d
	}
	cmap, err := moreland.NewLuminance(sequentialControls)
	if err != nil {
		panic("plot: sequential colour controls not increasing in lightness: " + err.Error())
	}
	cmap.SetMin(lo)
	cmap.SetMax(hi)
	return colourScale{cmap: cmap, lo: lo, hi: hi}
}

// at is the colour of v, clamped to the scale.
func (s colourScale) at(v float64) color.Color {
	c, err := s.cmap.At(math.Min(math.Max(v, s.lo), s.hi))
	if err != nil {
		return colGuide
	}
	return c
}

// bar returns a vertical colour bar of the scale with its axis named q.
func (s colourScale) bar(q quantity) *plot.Plot {
	p := newPanel()
	p.HideX()
	p.X.Padding, p.Y.Padding = 0, 0
	p.Y.Label.Text = q.label()
	p.Add(colourStrip{scale: s, steps: 96})
	p.Y.Min, p.Y.Max = s.lo, s.hi
	p.Y.Tick.Length = vg.Points(4)
	return p
}

// colourStrip draws a colour scale as a column of filled rectangles over
// x in [0, 1], y in [lo, hi]: vector shapes, so the SVG needs no embedded
// image and stays sharp at any zoom.
type colourStrip struct {
	scale colourScale
	steps int
}

// Plot implements plot.Plotter.
func (s colourStrip) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	x0, x1 := trX(0), trX(1)
	d := (s.scale.hi - s.scale.lo) / float64(s.steps)
	for k := range s.steps {
		lo := s.scale.lo + float64(k)*d
		// Overlap each band by a hair so no seam shows between them.
		y0, y1 := trY(lo), trY(lo+d)+vg.Points(0.3)
		c.FillPolygon(s.scale.at(lo+d/2), []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}})
	}
}

// DataRange implements plot.DataRanger.
func (s colourStrip) DataRange() (xmin, xmax, ymin, ymax float64) {
	return 0, 1, s.scale.lo, s.scale.hi
}
