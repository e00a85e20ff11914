package plot

import (
	"fmt"
	"image/color"
	"math"
	"slices"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/model/tradeunit"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ModalOptions choose the page of the modal-ratio chart.
type ModalOptions struct {
	// Title is drawn above the panels; empty means "Modal damping ratios across the front".
	Title string
	// Width and Height are the page size; 0 means 8.5 cm wide per road
	// case (at least 17 cm) × 13 cm.
	Width, Height vg.Length
	// Objective is the position of the objective along the x axis.
	Objective int
}

// qModalRatio is the axis of a modal damping ratio.
var qModalRatio = axis("Modal damping ratio", tradeunit.None)

// bodyModeColours are heave, pitch and roll.
var bodyModeColours = [3]color.Color{colBlue, colVermilion, colGreen}

// ModalRatios draws the heave, pitch and roll modal damping ratios of a
// front's solutions (full view: their modes per road case, at the case's
// equivalent slopes) against one objective, one panel per road case:
// solid with dots the car's ratio, dashed the hand ratio at the same
// slopes (the mode alone on rigid tyres); the balanced point's position
// as a grey guide. Problems come back as a *model.ValidationError.
func ModalRatios(f *pb.Front, opt ModalOptions) (*Figure, error) {
	sols := f.GetSolutions()
	objs := f.GetObjectives()
	var probs []model.FieldError
	switch {
	case len(sols) == 0:
		probs = append(probs, model.FieldError{Field: "solutions", Reason: "no solutions to draw"})
	case opt.Objective < 0 || opt.Objective >= len(objs):
		probs = append(probs, model.FieldError{Field: "objective", Reason: fmt.Sprintf("must be in [0, %d), got %d", len(objs), opt.Objective)})
	case len(sols[0].GetCaseMetrics()) == 0:
		probs = append(probs, model.FieldError{Field: "solutions[0].case_metrics", Reason: "no road case metrics (ask for the full view)"})
	}
	if len(probs) > 0 {
		return nil, &model.ValidationError{Problems: probs}
	}
	q := objectiveQuantity(objs[opt.Objective])
	order := make([]int, len(sols))
	for i := range order {
		order[i] = i
	}
	x := func(i int) float64 { return q.of(at(sols[i].GetObjectives(), opt.Objective)) }
	slices.SortStableFunc(order, func(a, b int) int { return cmpFloat(x(a), x(b)) })
	bal, _ := BalancedSolution(sols)

	leg := newLegend()
	var panels []*gplot.Plot
	for c, cm := range sols[0].GetCaseMetrics() {
		p := newPanel()
		p.Title.Text = cm.GetRoadCase()
		p.X.Label.Text, p.Y.Label.Text = q.label(), qModalRatio.label()
		lo, hi := math.Inf(1), math.Inf(-1)
		for j := 0; j < 3; j++ {
			var car, hand plotter.XYs
			for _, i := range order {
				cms := sols[i].GetCaseMetrics()
				if c >= len(cms) || j >= len(cms[c].GetModes()) || !finite(x(i)) {
					continue
				}
				m := cms[c].GetModes()[j]
				car = append(car, plotter.XY{X: x(i), Y: m.GetModalDampingRatio()})
				if m.GetHandDampingRatio() > 0 {
					hand = append(hand, plotter.XY{X: x(i), Y: m.GetHandDampingRatio()})
				}
			}
			for _, s := range []struct {
				pts  plotter.XYs
				hand bool
			}{{car, false}, {hand, true}} {
				if len(s.pts) == 0 {
					continue
				}
				for _, pt := range s.pts {
					lo, hi = math.Min(lo, pt.Y), math.Max(hi, pt.Y)
				}
				l, err := plotter.NewLine(s.pts)
				if err != nil {
					return nil, err
				}
				l.LineStyle = lineStyle(bodyModeColours[j], 1.4)
				name := model.ModeNames[j]
				if s.hand {
					l.LineStyle.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
					name += ", hand (rigid tyres)"
				}
				p.Add(l)
				if !s.hand {
					dots, err := plotter.NewScatter(s.pts)
					if err != nil {
						return nil, err
					}
					dots.GlyphStyle = draw.GlyphStyle{Color: bodyModeColours[j], Radius: vg.Points(1.6), Shape: draw.CircleGlyph{}}
					p.Add(dots)
				}
				if c == 0 {
					leg.Add(name, l)
				}
			}
		}
		if bal >= 0 && finite(x(bal)) {
			g, err := plotter.NewLine(plotter.XYs{{X: x(bal), Y: 0}, {X: x(bal), Y: 1.1 * hi}})
			if err != nil {
				return nil, err
			}
			g.LineStyle = draw.LineStyle{Color: colGuide, Width: vg.Points(0.9), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}}
			p.Add(g)
			if c == 0 {
				leg.Add(fmt.Sprintf("balanced point, solution %d", sols[bal].GetIndex()), g)
			}
		}
		p.Y.Min, p.Y.Max = 0, math.Max(1.1*hi, 0.1)
		panels = append(panels, p)
	}
	def := page{title: "Modal damping ratios across the front", width: max(17*vg.Centimeter, vg.Length(len(panels))*8.5*vg.Centimeter), height: 13 * vg.Centimeter}
	fig := def.or(opt.Title, opt.Width, opt.Height).figure(panels...)
	fig.Legend, fig.LegendBelow = leg, true
	fig.Notes = []string{"Heave, pitch and roll modal damping ratios of each solution at the road case's equivalent damper slopes (full car, tyres and wheels); " +
		"dashed, the same mode worked out by hand at the same slopes, alone on the wheel rates with rigid tyres: the tyres in series leave the dampers only part of the body's motion."}
	return fig, nil
}

// at is xs[k], NaN when absent.
func at(xs []float64, k int) float64 {
	if k < len(xs) {
		return xs[k]
	}
	return math.NaN()
}
