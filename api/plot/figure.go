package plot

import (
	"bytes"
	"fmt"
	"html/template"
	"io"
	"strings"

	"dampfront/model"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is an output format of a Figure.
type Format string

// The formats a Figure writes.
const (
	SVG Format = "svg"
	PNG Format = "png"
)

// DefaultDPI is the resolution of PNG output, dots per inch: a 17 cm wide
// figure is 964 pixels wide, sharp on a laptop screen and in a report.
const DefaultDPI = 144

// Figure is a finished chart: a title, a grid of panels, a side column
// with the legend and a colour bar, and a footnote that ends with
// Caution, on a page of Width × Height.
//
//	+--------------------------------------+
//	|                title                 |
//	| +--------+ +--------+     legend     |
//	| | panel  | | panel  |     colour bar |
//	| +--------+ +--------+                |
//	| notes, caution                       |
//	+--------------------------------------+
//
// Drawing sets the legend's position, so one Figure is written by one
// goroutine at a time; build a Figure per request.
type Figure struct {
	// Width and Height are the page size.
	Width, Height vg.Length
	// DPI is the resolution of PNG output; 0 means DefaultDPI.
	DPI int
	// Title is drawn above the panels; empty draws none.
	Title string
	// Notes are footnote lines drawn above Caution.
	Notes []string

	// Panels are the plots, row-major; a nil entry leaves its tile empty.
	// They may be restyled before the figure is written.
	Panels [][]*plot.Plot
	// Legend, when it has entries, is drawn at the top of the side column,
	// or under the panels when LegendBelow is set.
	Legend      *plot.Legend
	LegendBelow bool
	// ColourBar, when not nil, is drawn in the side column under the
	// legend, level with the data area of the first row of panels.
	ColourBar *plot.Plot
}

// Layout constants of a Figure.
var (
	margin      = vg.Points(8)  // page edge to content
	panelGap    = vg.Points(14) // between panels
	sideGap     = vg.Points(12) // panels to side column
	barWidth    = vg.Points(12) // the colour strip of a colour bar
	noteLeading = 1.25          // footnote line spacing over font size
	noteWidth   = 0.96          // share of the width footnotes fill, slack for a substitute face
)

// newFigure returns a figure of one row of panels.
func newFigure(w, h vg.Length, title string, panels ...*plot.Plot) *Figure {
	return &Figure{Width: w, Height: h, Title: title, Panels: [][]*plot.Plot{panels}}
}

// page is a chart's title and page size: the caller's where given, the
// chart's own defaults where not (an empty title, a zero length).
type page struct {
	title         string
	width, height vg.Length
}

// or is p with each of title, width and height that is set taking the
// place of p's.
func (p page) or(title string, width, height vg.Length) page {
	if title != "" {
		p.title = title
	}
	if width != 0 {
		p.width = width
	}
	if height != 0 {
		p.height = height
	}
	return p
}

// figure is a figure of one row of panels on p.
func (p page) figure(panels ...*plot.Plot) *Figure {
	return newFigure(p.width, p.height, p.title, panels...)
}

// Write renders the figure in a format to w.
func (f *Figure) Write(w io.Writer, format Format) error {
	switch format {
	case SVG:
		return f.WriteSVG(w)
	case PNG:
		return f.WritePNG(w)
	}
	return fmt.Errorf("plot: unknown format %q (want svg or png)", format)
}

// Page limits: below the minimum the panels have no room for their axes;
// above the DPI maximum a 30 cm page is over 7000 pixels wide.
const (
	minPageWidth  = 8 * vg.Centimeter
	minPageHeight = 6 * vg.Centimeter
	maxPageSide   = 100 * vg.Centimeter
	minDPI        = 24
	maxDPI        = 600
)

// check reports a page or resolution the figure cannot be drawn on.
func (f *Figure) check(png bool) error {
	var probs []model.FieldError
	for _, d := range []struct {
		name   string
		v, min vg.Length
	}{{"width", f.Width, minPageWidth}, {"height", f.Height, minPageHeight}} {
		if !(d.v >= d.min && d.v <= maxPageSide) {
			probs = append(probs, model.FieldError{Field: d.name,
				Reason: fmt.Sprintf("must be %.0f to %.0f mm, got %.1f mm", d.min.Points()/vg.Millimeter.Points(),
					maxPageSide.Points()/vg.Millimeter.Points(), d.v.Points()/vg.Millimeter.Points())})
		}
	}
	if png && f.DPI != 0 && (f.DPI < minDPI || f.DPI > maxDPI) {
		probs = append(probs, model.FieldError{Field: "dpi", Reason: fmt.Sprintf("must be %d to %d, got %d", minDPI, maxDPI, f.DPI)})
	}
	if len(probs) > 0 {
		return &model.ValidationError{Problems: probs}
	}
	return nil
}

// WriteSVG renders the figure as SVG, text as text. The fonts are not
// embedded (that would add some 400 KB per face); the text names Liberation
// Sans with Arial and Helvetica after it, faces of the same metrics, so
// that the layout holds wherever one of them is installed.
func (f *Figure) WriteSVG(w io.Writer) error {
	if err := f.check(false); err != nil {
		return err
	}
	c := vgsvg.New(f.Width, f.Height)
	f.Draw(draw.New(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return err
	}
	_, err := w.Write(bytes.ReplaceAll(b.Bytes(), []byte(svgFamily), []byte(svgFamilies)))
	return err
}

// InlineSVG is an SVG document of WriteSVG as an element of an HTML page:
// the XML declaration and comments before the svg element are dropped.
// The figures of this package escape every text they draw.
func InlineSVG(doc []byte) template.HTML {
	if i := bytes.Index(doc, []byte("<svg")); i >= 0 {
		doc = doc[i:]
	}
	return template.HTML(doc) // #nosec: drawn by this package, text escaped
}

// The font family vgsvg writes for the house face, and what it becomes.
const (
	svgFamily   = "font-family:Liberation Sans;"
	svgFamilies = "font-family:'Liberation Sans',Arial,Helvetica,sans-serif;"
)

// WritePNG renders the figure as PNG of round(Width/inch × DPI) by
// round(Height/inch × DPI) pixels on a white background.
//
// Both writers refuse a page smaller than 8 cm × 6 cm or larger than 1 m,
// and WritePNG a DPI outside [24, 600], with a *model.ValidationError
// naming "width", "height" or "dpi".
func (f *Figure) WritePNG(w io.Writer) error {
	if err := f.check(true); err != nil {
		return err
	}
	dpi := f.DPI
	if dpi == 0 {
		dpi = DefaultDPI
	}
	c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(dpi))
	f.Draw(draw.New(c))
	_, err := vgimg.PngCanvas{Canvas: c}.WriteTo(w)
	return err
}

// Draw draws the figure on a canvas.
func (f *Figure) Draw(c draw.Canvas) {
	c.SetColor(colourWhite)
	c.Fill(c.Rectangle.Path())
	c = draw.Crop(c, margin, -margin, margin, -margin)

	if f.Title != "" {
		sty := textStyle(sizeTitle)
		sty.Font.Weight = xfont.WeightBold
		sty.XAlign, sty.YAlign = draw.XCenter, draw.YTop
		c.FillText(sty, vg.Point{X: c.Center().X, Y: c.Max.Y}, f.Title)
		c.Max.Y -= sty.Height(f.Title) + vg.Points(6)
	}

	note := textStyle(sizeNote)
	note.Color = colNote
	note.XAlign, note.YAlign = draw.XLeft, draw.YBottom
	var lines []string
	for _, n := range append(append([]string(nil), f.Notes...), Caution) {
		lines = append(lines, wrap(note, n, vg.Length(noteWidth)*(c.Max.X-c.Min.X))...)
	}
	lead := vg.Length(noteLeading) * note.Font.Size
	for i := len(lines) - 1; i >= 0; i-- {
		c.FillText(note, vg.Point{X: c.Min.X, Y: c.Min.Y}, lines[i])
		c.Min.Y += lead
	}
	c.Min.Y += vg.Points(4)

	if f.LegendBelow && f.hasLegend() {
		f.Legend.Top, f.Legend.Left = false, true
		f.Legend.Draw(c)
		c.Min.Y += f.Legend.Rectangle(c).Size().Y + vg.Points(8)
	}

	var side draw.Canvas
	if w := f.sideWidth(c); w > 0 {
		side = c
		side.Min.X = c.Max.X - w
		c.Max.X = side.Min.X - sideGap
	}

	rows := len(f.Panels)
	if rows == 0 {
		return
	}
	cols := 0
	for _, r := range f.Panels {
		cols = max(cols, len(r))
	}
	grid := make([][]*plot.Plot, rows)
	for i, r := range f.Panels {
		grid[i] = make([]*plot.Plot, cols)
		copy(grid[i], r)
	}
	tiles := plot.Align(grid, draw.Tiles{Rows: rows, Cols: cols, PadX: panelGap, PadY: panelGap}, c)
	for i := range grid {
		for j, p := range grid[i] {
			if p != nil {
				p.Draw(tiles[i][j])
			}
		}
	}
	if side.Max.X > side.Min.X {
		top := side.Max.Y
		if f.hasLegend() && !f.LegendBelow {
			f.Legend.Top, f.Legend.Left = true, true
			f.Legend.Draw(side)
			top -= f.Legend.Rectangle(side).Size().Y + vg.Points(10)
		}
		if f.ColourBar != nil {
			bottom := side.Min.Y
			if p := firstPanel(grid); p != nil {
				dc := p.DataCanvas(tiles[0][firstCol(grid)])
				bottom = dc.Min.Y
				top = min(top, dc.Max.Y)
			}
			f.drawColourBar(side, bottom, top)
		}
	}
}

// drawColourBar draws the colour bar with its data area from bottom to
// top, its strip at the right of the side column.
func (f *Figure) drawColourBar(side draw.Canvas, bottom, top vg.Length) {
	if top-bottom < vg.Points(30) {
		return
	}
	trial := side
	dc := f.ColourBar.DataCanvas(trial)
	left := dc.Min.X - trial.Min.X
	cb := side
	cb.Min.X = side.Min.X
	cb.Max.X = side.Min.X + left + barWidth + vg.Points(4)
	cb.Min.Y = bottom - (dc.Min.Y - trial.Min.Y)
	cb.Max.Y = top + (trial.Max.Y - dc.Max.Y)
	f.ColourBar.Draw(cb)
}

// sideWidth is the width the legend and colour bar need; 0 for neither.
func (f *Figure) sideWidth(c draw.Canvas) vg.Length {
	var w vg.Length
	if f.hasLegend() && !f.LegendBelow {
		w = f.Legend.Rectangle(c).Size().X
	}
	if f.ColourBar != nil {
		dc := f.ColourBar.DataCanvas(c)
		w = max(w, dc.Min.X-c.Min.X+barWidth+vg.Points(4))
	}
	return w
}

func (f *Figure) hasLegend() bool {
	return f.Legend != nil && f.Legend.Rectangle(draw.Canvas{}).Size().Y > 0
}

func firstPanel(grid [][]*plot.Plot) *plot.Plot {
	if j := firstCol(grid); j >= 0 {
		return grid[0][j]
	}
	return nil
}

func firstCol(grid [][]*plot.Plot) int {
	for j, p := range grid[0] {
		if p != nil {
			return j
		}
	}
	return -1
}

// wrap breaks s into lines no wider than width in style sty, at spaces.
func wrap(sty text.Style, s string, width vg.Length) []string {
	words := strings.Fields(s)
	var lines []string
	cur := ""
	for _, w := range words {
		try := w
		if cur != "" {
			try = cur + " " + w
		}
		if cur != "" && sty.Width(try) > width {
			lines = append(lines, cur)
			cur = w
			continue
		}
		cur = try
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}

// newLegend returns an empty legend in the house font.
func newLegend() *plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font = font.From(sansFont, sizeLegend)
	l.ThumbnailWidth = vg.Points(18)
	l.Padding = vg.Points(3)
	return &l
}
