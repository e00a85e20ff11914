package plot

import (
	"math"
	"slices"
	"strconv"

	"dampfront/model"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// modeMarks draws the undamped natural frequencies of modes as vertical lines over
// the whole height of a panel whose x data are log10 of frequency in Hz,
// and with labels names them, the labels standing upright at the foot of
// the panel, where a spectrum is low at the modes (it peaks there). It
// has no data range of its own, so it does not widen the panel's axes.
type modeMarks struct {
	modes  []model.Mode // sorted by frequency
	labels bool
}

var _ plot.Plotter = modeMarks{}

// Looks of the mode marks.
var (
	modeLine       = draw.LineStyle{Color: colGuide, Width: vg.Points(0.9), Dashes: []vg.Length{vg.Points(4), vg.Points(2.5)}}
	overdampedLine = draw.LineStyle{Color: colGuide, Width: vg.Points(0.9), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
	modeLabelGap   = vg.Points(1.5) // between labels, and between a line and its label
	modeLabelFoot  = vg.Points(10)  // panel bottom to the labels' foot, room for a leader
)

func newModeMarks(modes []model.Mode) modeMarks {
	m := slices.Clone(modes)
	slices.SortStableFunc(m, func(a, b model.Mode) int { return cmpFloat(a.UndampedFrequencyHz, b.UndampedFrequencyHz) })
	return modeMarks{modes: m}
}

// lineOf is the line style of a mode.
func lineOf(m model.Mode) draw.LineStyle {
	if m.Overdamped {
		return overdampedLine
	}
	return modeLine
}

// modeLabel is "heave 1.92 Hz": the frequency to three significant
// figures, trailing zeros kept ("16.0 Hz").
func modeLabel(m model.Mode) string {
	f, _ := strconv.ParseFloat(strconv.FormatFloat(m.UndampedFrequencyHz, 'g', 3, 64), 64) // 9.996 is 10.0
	decimals := max(0, 2-int(math.Floor(math.Log10(f))))
	return m.Name + " " + strconv.FormatFloat(f, 'f', decimals, 64) + " Hz"
}

// Plot implements plot.Plotter. Each label stands on its line, on a
// white ground that breaks the line there; labels that would overlap are
// spread apart (spreadLabels) and joined to their lines by leaders. A
// ground also hides what else lies behind its label, the neighbouring
// lines and, should a spectrum be that low at a mode, the curve.
func (mm modeMarks) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	var xs []vg.Length
	var shown []model.Mode
	for _, m := range mm.modes {
		x := math.Log10(m.UndampedFrequencyHz)
		if x < p.X.Min || x > p.X.Max {
			continue
		}
		xs = append(xs, trX(x))
		shown = append(shown, m)
	}
	for k, m := range shown {
		c.StrokeLine2(lineOf(m), xs[k], c.Min.Y, xs[k], c.Max.Y)
	}
	if !mm.labels || len(shown) == 0 {
		return
	}
	sty := textStyle(sizeNote)
	sty.Color = colNote
	sty.Rotation = math.Pi / 2
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YCenter
	across := sty.Height("M") // a label's width once turned upright
	// Turned upright, gonum's plain text handler puts the middle of the
	// glyphs (ascent + descent) this far right of the point given.
	fe := sty.FontExtents()
	centre := across/2 - sty.Font.Size + (fe.Ascent+fe.Descent)/2
	at := spreadLabels(xs, across+modeLabelGap, c.Min.X+across/2, c.Max.X-across/2)
	foot := c.Min.Y + modeLabelFoot
	for k, m := range shown {
		text := modeLabel(m)
		along := sty.Width(text)
		c.SetColor(colourWhite)
		c.Fill(vg.Rectangle{
			Min: vg.Point{X: at[k] - across/2, Y: foot - modeLabelGap},
			Max: vg.Point{X: at[k] + across/2, Y: foot + along + modeLabelGap},
		}.Path())
		if math.Abs(float64(at[k]-xs[k])) > 0.5 {
			// A leader from the foot of the line to the foot of its label.
			ls := lineOf(m)
			ls.Dashes = nil
			c.StrokeLine2(ls, xs[k], c.Min.Y, at[k], foot-modeLabelGap)
		}
		c.FillText(sty, vg.Point{X: at[k] - centre, Y: foot}, text)
	}
}

// legend adds the entries of the mode lines to leg: one for lightly
// damped modes and one for overdamped modes, each when there is one.
func (mm modeMarks) legend(leg *plot.Legend) error {
	for _, e := range []struct {
		name       string
		overdamped bool
	}{{"mode, natural frequency", false}, {"overdamped mode", true}} {
		if !slices.ContainsFunc(mm.modes, func(m model.Mode) bool { return m.Overdamped == e.overdamped }) {
			continue
		}
		l, err := plotter.NewLine(plotter.XYs{{}, {X: 1}})
		if err != nil {
			return err
		}
		l.LineStyle = lineOf(model.Mode{Overdamped: e.overdamped})
		leg.Add(e.name, l)
	}
	return nil
}

// spreadLabels places labels of a width along a line as near as it can
// to their wanted centres, in the same order, no two closer than width,
// all within [lo, hi] when there is room: runs of labels that would
// overlap become clusters laid out edge to edge, each centred on the mean
// of its wanted centres (the placement that minimises the sum of squared
// shifts of a cluster), then moved inside [lo, hi]. want must be
// increasing.
func spreadLabels(want []vg.Length, width, lo, hi vg.Length) []vg.Length {
	type cluster struct {
		first, n int
		start    vg.Length // centre of its first label
	}
	place := func(cl *cluster) {
		var sum vg.Length
		for _, w := range want[cl.first : cl.first+cl.n] {
			sum += w
		}
		span := vg.Length(cl.n-1) * width
		cl.start = sum/vg.Length(cl.n) - span/2
		cl.start = max(min(cl.start, hi-span), lo)
	}
	var cls []cluster
	for i := range want {
		cls = append(cls, cluster{first: i, n: 1})
		place(&cls[len(cls)-1])
		for len(cls) > 1 {
			a, b := &cls[len(cls)-2], &cls[len(cls)-1]
			if a.start+vg.Length(a.n)*width <= b.start {
				break
			}
			a.n += b.n
			cls = cls[:len(cls)-1]
			place(a)
		}
	}
	out := make([]vg.Length, 0, len(want))
	for _, cl := range cls {
		for k := range cl.n {
			out = append(out, cl.start+vg.Length(k)*width)
		}
	}
	return out
}
