package plot

import (
	"fmt"
	"slices"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// HypervolumeOptions choose the page of the hypervolume chart.
type HypervolumeOptions struct {
	// Title is drawn above the panel; empty means "Hypervolume per generation".
	Title string
	// Width and Height are the page size; 0 means 17 cm × 10 cm.
	Width, Height vg.Length
}

// Hypervolume draws a job's hypervolume against generation from its
// progress history (for example the Progress events of WatchJob), in the
// product of the objectives' trade units; objectives are the job's, in
// order, and nil leaves the values in the product of SI units. The axis
// runs to the generations planned, so an unfinished job shows how far it
// has got. A generation reported twice (a job resumed from a checkpoint
// repeats the generations since it) keeps its last report. Problems come
// back as a *model.ValidationError with paths "history[i]...".
func Hypervolume(history []*pb.Progress, objectives []*pb.Objective, opt HypervolumeOptions) (*Figure, error) {
	var probs []model.FieldError
	if len(history) == 0 {
		probs = append(probs, model.FieldError{Field: "history", Reason: "no progress to draw"})
	}
	last := map[int32]int{}
	planned := int32(0)
	for i, p := range history {
		if p.GetGeneration() < 0 {
			probs = append(probs, model.FieldError{Field: fmt.Sprintf("history[%d].generation", i),
				Reason: fmt.Sprintf("must be >= 0, got %d", p.GetGeneration())})
		}
		if h := p.GetHypervolume(); !finite(h) || h < 0 {
			probs = append(probs, model.FieldError{Field: fmt.Sprintf("history[%d].hypervolume", i),
				Reason: fmt.Sprintf("must be finite and >= 0, got %v", h)})
		}
		last[p.GetGeneration()] = i
		planned = max(planned, p.GetGenerations())
	}
	if len(probs) > 0 {
		return nil, &model.ValidationError{Problems: probs}
	}
	q := hypervolumeQuantity(objectives)
	gens := make([]int32, 0, len(last))
	for g := range last {
		gens = append(gens, g)
	}
	slices.Sort(gens)
	pts := make(plotter.XYs, len(gens))
	for k, g := range gens {
		pts[k] = plotter.XY{X: float64(g), Y: q.of(history[last[g]].GetHypervolume())}
	}

	p := newPanel()
	p.X.Label.Text, p.Y.Label.Text = qGeneration.label(), q.label()
	p.X.Tick.Marker = niceTicks{Integer: true}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, err
	}
	l.LineStyle = lineStyle(colBlue, 1.6)
	p.Add(l)
	if len(pts) <= 120 {
		dots, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, err
		}
		dots.GlyphStyle = draw.GlyphStyle{Color: colBlue, Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
		p.Add(dots)
	}
	p.X.Min = 0
	p.X.Max = max(float64(planned), pts[len(pts)-1].X, 1)
	p.Y.Min = 0
	for _, pt := range pts {
		p.Y.Max = max(p.Y.Max, 1.05*pt.Y) // headroom above the last value
	}

	def := page{title: "Hypervolume per generation", width: 17 * vg.Centimeter, height: 10 * vg.Centimeter}
	fig := def.or(opt.Title, opt.Width, opt.Height).figure(p)
	done := pts[len(pts)-1]
	at := fmt.Sprintf("Generation %.0f", done.X)
	if planned > 0 {
		at += fmt.Sprintf(" of %d", planned)
	}
	fig.Notes = []string{fmt.Sprintf("Area (volume) the front dominates up to the job's reference point; larger is better. "+
		"%s: %.4g %s.", at, done.Y, q.unit)}
	return fig, nil
}
