package plot

import (
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Glyphs of the highlighted points: outlines drawn heavier than gonum's
// 0.5 pt so that they stand out from the coloured dots under them.

// thumb is a copy of a scatter whose glyph fits a legend row.
func thumb(sc *plotter.Scatter) *plotter.Scatter {
	t := *sc
	t.GlyphStyle.Radius = min(t.GlyphStyle.Radius, vg.Points(4.5))
	return &t
}

// thickRing is a ring glyph with its own line width.
type thickRing struct{ width vg.Length }

func (g thickRing) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.width})
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.Stroke(p)
}

// thickCross is an × glyph with its own line width.
type thickCross struct{ width vg.Length }

func (g thickCross) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.width})
	r := sty.Radius * vg.Length(math.Sqrt2/2)
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y - r})
	c.Stroke(p)
}

// thickSquare is a square outline glyph with its own line width.
type thickSquare struct{ width vg.Length }

func (g thickSquare) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.width})
	r := sty.Radius * vg.Length(math.Sqrt2/2)
	var p vg.Path
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X - r, Y: pt.Y + r})
	p.Close()
	c.Stroke(p)
}
