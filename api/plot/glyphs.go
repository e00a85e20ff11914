package plot

import (
	"math"

	"gonum.org/v1/plot"
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

// addHighlight draws pts on p with a glyph of style and, with a legend,
// names them in it.
func addHighlight(p *plot.Plot, leg *plot.Legend, pts plotter.XYs, style draw.GlyphStyle, name string) error {
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return err
	}
	sc.GlyphStyle = style
	p.Add(sc)
	if leg != nil {
		leg.Add(name, thumb(sc))
	}
	return nil
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

// thickStrokes is a glyph of straight strokes with its own line width.
// Each stroke is a polyline through points in units of r, half the side
// of the square inscribed in the glyph's circle.
type thickStrokes struct {
	width   vg.Length
	strokes [][]vg.Point
	closed  bool // each stroke ends back at its start
}

// thickCross is an × glyph with its own line width.
func thickCross(width vg.Length) thickStrokes {
	return thickStrokes{width: width, strokes: [][]vg.Point{{{X: -1, Y: -1}, {X: 1, Y: 1}}, {{X: -1, Y: 1}, {X: 1, Y: -1}}}}
}

// thickSquare is a square outline glyph with its own line width.
func thickSquare(width vg.Length) thickStrokes {
	return thickStrokes{width: width, strokes: [][]vg.Point{{{X: -1, Y: -1}, {X: 1, Y: -1}, {X: 1, Y: 1}, {X: -1, Y: 1}}}, closed: true}
}

func (g thickStrokes) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.width})
	r := sty.Radius * vg.Length(math.Sqrt2/2)
	var p vg.Path
	for _, stroke := range g.strokes {
		for i, u := range stroke {
			at := vg.Point{X: pt.X + u.X*r, Y: pt.Y + u.Y*r}
			if i == 0 {
				p.Move(at)
			} else {
				p.Line(at)
			}
		}
		if g.closed {
			p.Close()
		}
	}
	c.Stroke(p)
}
