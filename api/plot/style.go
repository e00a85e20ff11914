package plot

import (
	"image/color"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The look shared by every chart: a sans-serif face at sizes that stay
// readable when a figure is shrunk to the width of a report column.
var (
	sansFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

	sizeTitle  = vg.Points(12)
	sizeLabel  = vg.Points(10)
	sizeTick   = vg.Points(9)
	sizeLegend = vg.Points(9)
	sizeNote   = vg.Points(8)
)

// Colours of the Okabe-Ito palette (M. Okabe and K. Ito, "Color Universal
// Design", 2008; the values from memory), told apart by the common forms
// of colour blindness.
var (
	colBlack     = color.RGBA{0, 0, 0, 255}
	colOrange    = color.RGBA{230, 159, 0, 255}
	colSky       = color.RGBA{86, 180, 233, 255}
	colGreen     = color.RGBA{0, 158, 115, 255}
	colBlue      = color.RGBA{0, 114, 178, 255}
	colVermilion = color.RGBA{213, 94, 0, 255}
	colPurple    = color.RGBA{204, 121, 167, 255}

	colourWhite = color.White
	colGrid     = color.Gray{Y: 225}
	colGuide    = color.Gray{Y: 150}
	colNote     = color.Gray{Y: 60}
	colOutline  = color.Gray{Y: 70}
	colBandFill = color.NRGBA{R: 110, G: 110, B: 110, A: 70} // grey at 27 % opacity
)

// seriesColours cycle over road cases and other unordered series.
var seriesColours = []color.Color{colBlue, colVermilion, colGreen, colOrange, colPurple, colSky, colBlack}

// textStyle is the sans-serif text style of a size.
func textStyle(size vg.Length) text.Style {
	return text.Style{
		Color:   colBlack,
		Font:    font.From(sansFont, size),
		Handler: plot.DefaultTextHandler,
	}
}

// newPanel returns an empty plot in the house look, with a light grid.
func newPanel() *plot.Plot {
	p := plot.New()
	p.Title.TextStyle.Font = font.From(sansFont, sizeLabel)
	p.Title.TextStyle.Font.Weight = xfont.WeightBold
	p.Title.Padding = vg.Points(4)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sansFont, sizeLabel)
		a.Tick.Label.Font = font.From(sansFont, sizeTick)
		a.Label.Padding = vg.Points(3)
		a.Tick.Marker = niceTicks{}
	}
	p.Legend.TextStyle.Font = font.From(sansFont, sizeLegend)
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = colGrid, colGrid
	p.Add(g)
	return p
}

// newLabels returns text labels at points in the house font, shifted by
// off from each point.
func newLabels(xys plotter.XYs, labels []string, off vg.Point) (*plotter.Labels, error) {
	l, err := plotter.NewLabels(plotter.XYLabels{XYs: xys, Labels: labels})
	if err != nil {
		return nil, err
	}
	for i := range l.TextStyle {
		l.TextStyle[i] = textStyle(sizeTick)
	}
	l.Offset = off
	return l, nil
}

// lineStyle is a solid line of a colour and width in points.
func lineStyle(c color.Color, width float64) draw.LineStyle {
	return draw.LineStyle{Color: c, Width: vg.Points(width)}
}
