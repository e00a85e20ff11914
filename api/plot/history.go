package plot

import (
	"fmt"
	"image/color"
	"math"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/model/tradeunit"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// HistoryOptions choose the page of the time-history chart.
type HistoryOptions struct {
	// Title is drawn above the panels; empty means "Time history, CASE".
	Title string
	// Width and Height are the page size; 0 means 17 cm × 15 cm.
	Width, Height vg.Length
	// Steady, when not nil, is the same setup's metrics on the same case
	// (a front solution's TransientMetrics): its quasi-static end values
	// of roll, pitch and the LLTD front share are drawn as dashed lines.
	Steady *pb.TransientMetrics
}

// Quantities of the time-history chart.
var (
	qTime      = axis("Time", si("s"))
	qRoll      = axis("Roll", tradeunit.Degree)
	qPitch     = axis("Pitch", tradeunit.Degree)
	qLLTDFront = axis("LLTD front share", tradeunit.Percent)
	qTyreLoad  = axis("Tyre load", tradeunit.Newton)
)

// Looks of the time-history chart.
var (
	tyreColours = [4]color.Color{colBlue, colSky, colVermilion, colOrange} // FL, FR, RL, RR
	tyreNames   = [4]string{"FL", "FR", "RL", "RR"}
	historyLine = lineStyle(colBlack, 1.3)
	steadyLine  = draw.LineStyle{Color: colGuide, Width: vg.Points(1.1), Dashes: []vg.Length{vg.Points(5), vg.Points(3)}}
)

// TransientHistory draws one setup's time history on one manoeuvre or
// kerb case (a GetTransientHistory response, SI): four panels against
// time, roll and pitch relative to the road in degrees, the front share
// of the lateral load transfer in % (with its steady value), and the
// four tyre loads in N, static at speed included. Where the case has no
// lateral input (opt.Steady says so, or the response's share is 0
// throughout) the LLTD panel says so instead. Problems with the data
// come back as a *model.ValidationError naming the response's field.
func TransientHistory(h *pb.GetTransientHistoryResponse, opt HistoryOptions) (*Figure, error) {
	if err := checkHistory(h); err != nil {
		return nil, err
	}
	t := h.GetTimeS()
	st := opt.Steady
	lltdDefined := st.GetLltd().GetDefined()
	if st == nil {
		for _, v := range h.GetLltdFront() {
			lltdDefined = lltdDefined || v != 0
		}
	}
	leg := newLegend()
	roll, err := historyPanel("Roll", qRoll, t, h.GetRollRad(), st != nil, st.GetRoll().GetSteadyRad())
	if err != nil {
		return nil, err
	}
	pitch, err := historyPanel("Pitch", qPitch, t, h.GetPitchRad(), st != nil, st.GetPitch().GetSteadyRad())
	if err != nil {
		return nil, err
	}
	var lltd *gplot.Plot
	if lltdDefined {
		lltd, err = historyPanel("Lateral load transfer, front share", qLLTDFront, t, h.GetLltdFront(), st != nil, st.GetLltd().GetSteady())
	} else {
		lltd, err = historyPanel("LLTD front share: no lateral input", qLLTDFront, t, nil, false, 0)
		lltd.Y.Min, lltd.Y.Max = 0, 100
	}
	if err != nil {
		return nil, err
	}
	tyres, err := tyrePanel(t, [4][]float64{h.GetTyreLoadFlN(), h.GetTyreLoadFrN(), h.GetTyreLoadRlN(), h.GetTyreLoadRrN()}, leg)
	if err != nil {
		return nil, err
	}
	if st != nil {
		l, err := plotter.NewLine(plotter.XYs{{}, {X: 1}})
		if err != nil {
			return nil, err
		}
		l.LineStyle = steadyLine
		leg.Add("steady value (quasi-static end)", l)
	}
	def := page{title: "Time history, " + h.GetCaseName(), width: 17 * vg.Centimeter, height: 15 * vg.Centimeter}
	p := def.or(opt.Title, opt.Width, opt.Height)
	fig := &Figure{Width: p.width, Height: p.height, Title: p.title,
		Panels: [][]*gplot.Plot{{roll, pitch}, {lltd, tyres}}, Legend: leg, LegendBelow: true}
	fig.Notes = []string{fmt.Sprintf("Case %q (%s), %d samples over %.3g s, from the time-domain simulation at the case's speed. "+
		"Roll and pitch relative to the road; tyre loads with the static load at speed.", h.GetCaseName(), h.GetKind(), len(t), t[len(t)-1]-t[0])}
	return fig, nil
}

// checkHistory refuses a response with fewer than two samples, a list
// whose length differs from time_s's, or a value that is not finite.
func checkHistory(h *pb.GetTransientHistoryResponse) error {
	n := len(h.GetTimeS())
	var probs []model.FieldError
	if n < 2 {
		probs = append(probs, model.FieldError{Field: "time_s", Reason: fmt.Sprintf("needs at least 2 samples to draw, got %d", n)})
	}
	for _, c := range []struct {
		field string
		vs    []float64
	}{
		{"time_s", h.GetTimeS()}, {"roll_rad", h.GetRollRad()}, {"pitch_rad", h.GetPitchRad()}, {"lltd_front", h.GetLltdFront()},
		{"tyre_load_fl_n", h.GetTyreLoadFlN()}, {"tyre_load_fr_n", h.GetTyreLoadFrN()},
		{"tyre_load_rl_n", h.GetTyreLoadRlN()}, {"tyre_load_rr_n", h.GetTyreLoadRrN()},
	} {
		if len(c.vs) != n {
			probs = append(probs, model.FieldError{Field: c.field, Reason: fmt.Sprintf("has %d samples, time_s has %d", len(c.vs), n)})
			continue
		}
		for i, v := range c.vs {
			if !finite(v) {
				probs = append(probs, model.FieldError{Field: fmt.Sprintf("%s[%d]", c.field, i), Reason: fmt.Sprintf("must be finite, got %v", v)})
				break
			}
		}
	}
	if len(probs) > 0 {
		return &model.ValidationError{Problems: probs}
	}
	return nil
}

// historyPanel is a panel of one SI series ys against time t in q's
// trade unit, with the steady value as a dashed line when withSteady.
func historyPanel(title string, q quantity, t, ys []float64, withSteady bool, steady float64) (*gplot.Plot, error) {
	p := newPanel()
	p.Title.Text = title
	p.X.Label.Text, p.Y.Label.Text = qTime.label(), q.label()
	p.X.Min, p.X.Max = t[0], t[len(t)-1]
	if withSteady {
		l, err := plotter.NewLine(plotter.XYs{{X: t[0], Y: q.of(steady)}, {X: t[len(t)-1], Y: q.of(steady)}})
		if err != nil {
			return nil, err
		}
		l.LineStyle = steadyLine
		p.Add(l)
	}
	if len(ys) == 0 {
		return p, nil
	}
	l, err := timeLine(t, ys, q, historyLine)
	if err != nil {
		return nil, err
	}
	p.Add(l)
	if lo, hi := p.Y.Min, p.Y.Max; hi-lo < 1e-9*math.Max(1, math.Abs(hi)) {
		// A flat series (no pitch on a pure turn-in): give the axis a span.
		p.Y.Min, p.Y.Max = lo-1, hi+1
	}
	return p, nil
}

// timeLine is the line of the SI series ys against time t in q's trade
// unit, in style ls.
func timeLine(t, ys []float64, q quantity, ls draw.LineStyle) (*plotter.Line, error) {
	pts := make(plotter.XYs, len(t))
	for i := range t {
		pts[i] = plotter.XY{X: t[i], Y: q.of(ys[i])}
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	l.LineStyle = ls
	return l, nil
}

// tyrePanel is the panel of the four tyre loads against time, their
// colours added to leg.
func tyrePanel(t []float64, loads [4][]float64, leg *gplot.Legend) (*gplot.Plot, error) {
	p := newPanel()
	p.Title.Text = "Tyre loads"
	p.X.Label.Text, p.Y.Label.Text = qTime.label(), qTyreLoad.label()
	p.X.Min, p.X.Max = t[0], t[len(t)-1]
	for k, ys := range loads {
		l, err := timeLine(t, ys, qTyreLoad, lineStyle(tyreColours[k], 1.2))
		if err != nil {
			return nil, err
		}
		p.Add(l)
		leg.Add("tyre "+tyreNames[k], l)
	}
	return p, nil
}

// SolutionTransient is a front solution's metrics on the manoeuvre or
// kerb case named name (full view), for HistoryOptions.Steady; nil when
// the solution carries none of that name.
func SolutionTransient(s *pb.Solution, name string) *pb.TransientMetrics {
	for _, m := range s.GetTransientMetrics() {
		if m.GetName() == name {
			return m
		}
	}
	return nil
}
