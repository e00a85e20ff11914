package plot

import (
	"fmt"
	"image/color"
	"math"
	"slices"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ColourBalance is the default colouring of a front: the front/rear
// balance of the damping, the ratio of the axles' mean damping ratios
//
//	balance = (ζ_bump,f + ζ_rebound,f) / (ζ_bump,r + ζ_rebound,r),
//
// above 1 when the front is the more damped end.
const ColourBalance = "balance"

// FrontOptions choose what the front chart shows. The zero value plots
// every objective (one panel for two, the three pairwise projections for
// three), coloured by ColourBalance, on a page of the default size.
type FrontOptions struct {
	// Title is drawn above the panels; empty means "Pareto front" and the job.
	Title string
	// Objectives are the positions in Front.objectives of the objectives
	// drawn, two or three; empty means all of them.
	Objectives []int
	// ColourGene is the name of a gene of Front.gene_names the points are
	// coloured by; empty means ColourBalance.
	ColourGene string
	// Marked are solutions an engineer picked, by Solution.index; they are
	// boxed and numbered.
	Marked []int32
	// Candidates are setups evaluated elsewhere (EvaluateSetups,
	// CompareSetup), drawn as crosses with their labels.
	Candidates []Candidate
	// Width and Height are the page size; 0 means 17 cm × 11 cm for one
	// panel and 30 cm × 11 cm for three.
	Width, Height vg.Length
}

// Candidate is a setup shown against a front.
type Candidate struct {
	// Label names the setup on the chart; empty means "candidate k".
	Label string
	// Objectives are its objective values in the front's order, SI.
	Objectives []float64
}

// Front draws a job's Pareto front: each chosen pair of objectives on its
// axes in trade units, the solutions coloured by a gene with a colour
// bar, the balanced point (BalancedSolution over all the front's
// objectives, among the solutions given: a page of a larger front gets
// the page's balanced point) ringed, marked solutions boxed and
// candidates crossed.
// Problems with the front or the options come back as a
// *model.ValidationError naming the field.
func Front(f *pb.Front, opt FrontOptions) (*Figure, error) {
	fr, err := newFrontData(f, opt)
	if err != nil {
		return nil, err
	}
	pairs := [][2]int{{0, 1}}
	if len(fr.sel) == 3 {
		pairs = [][2]int{{0, 1}, {0, 2}, {1, 2}}
	}
	var panels []*plot.Plot
	var leg *plot.Legend
	for k, pr := range pairs {
		p, l, err := fr.panel(fr.sel[pr[0]], fr.sel[pr[1]], k == 0)
		if err != nil {
			return nil, err
		}
		panels = append(panels, p)
		if l != nil {
			leg = l
		}
	}
	def := page{title: "Pareto front", width: 17 * vg.Centimeter, height: 11 * vg.Centimeter}
	if len(pairs) == 3 {
		def.width = 30 * vg.Centimeter
	}
	if f.GetJob() != "" {
		def.title += ", " + f.GetJob()
	}
	fig := def.or(opt.Title, opt.Width, opt.Height).figure(panels...)
	fig.Legend = leg
	fig.ColourBar = fr.scale.bar(fr.colour)
	fig.Notes = fr.notes()
	return fig, nil
}

// frontData is a validated front ready to draw.
type frontData struct {
	f        *pb.Front
	opt      FrontOptions
	sel      []int       // objectives drawn
	quant    []quantity  // per objective of the front
	colour   quantity    // what the colour shows
	values   []float64   // colour value per solution
	scale    colourScale // of values
	balanced int         // position in f.Solutions; -1 for none
	marked   []int       // positions in f.Solutions
}

func newFrontData(f *pb.Front, opt FrontOptions) (*frontData, error) {
	var probs []model.FieldError
	add := func(field, format string, args ...any) {
		probs = append(probs, model.FieldError{Field: field, Reason: fmt.Sprintf(format, args...)})
	}
	fr := &frontData{f: f, opt: opt, balanced: -1}
	nobj := len(f.GetObjectives())
	if nobj < 2 {
		add("front.objectives", "a front chart needs two or three objectives, the job has %d", nobj)
	}
	fr.sel = opt.Objectives
	if len(fr.sel) == 0 {
		for j := range nobj {
			fr.sel = append(fr.sel, j)
		}
	}
	if len(fr.sel) < 2 || len(fr.sel) > 3 {
		add("objectives", "choose two or three objectives, got %d", len(fr.sel))
	}
	for k, j := range fr.sel {
		if j < 0 || j >= nobj {
			add(fmt.Sprintf("objectives[%d]", k), "must be in [0, %d), got %d", nobj, j)
		} else if slices.Index(fr.sel, j) != k {
			add(fmt.Sprintf("objectives[%d]", k), "objective %d is chosen twice", j)
		}
	}
	for _, o := range f.GetObjectives() {
		fr.quant = append(fr.quant, objectiveQuantity(o))
	}
	sols := f.GetSolutions()
	if len(sols) == 0 {
		add("front.solutions", "the front has no solutions to draw")
	}
	gene := -1
	switch opt.ColourGene {
	case "", ColourBalance:
		fr.colour = qBalance
	default:
		gene = slices.Index(f.GetGeneNames(), opt.ColourGene)
		if gene < 0 {
			add("colour_gene", "%q is not a gene of the front (have %v)", opt.ColourGene, f.GetGeneNames())
		} else {
			fr.colour = geneQuantity(opt.ColourGene)
		}
	}
	for i, s := range sols {
		path := fmt.Sprintf("front.solutions[%d]", i)
		if len(s.GetObjectives()) != nobj {
			add(path+".objectives", "has %d values, want %d", len(s.GetObjectives()), nobj)
		}
		for j, v := range s.GetObjectives() {
			if !finite(v) {
				add(fmt.Sprintf("%s.objectives[%d]", path, j), "must be a finite number, got %v", v)
			}
		}
		var v float64
		switch {
		case gene >= 0 && gene < len(s.GetGenes()):
			v = fr.colour.of(s.GetGenes()[gene])
		case gene >= 0:
			add(path+".genes", "has %d values, the colour gene is at %d", len(s.GetGenes()), gene)
		default:
			var err error
			if v, err = balance(s.GetSetup()); err != nil {
				add(path+".setup", "%v", err)
			}
		}
		if !finite(v) {
			add(path, "colour value %v is not finite", v)
		}
		fr.values = append(fr.values, v)
	}
	for k, idx := range opt.Marked {
		pos := slices.IndexFunc(sols, func(s *pb.Solution) bool { return s.GetIndex() == idx })
		if pos < 0 {
			add(fmt.Sprintf("marked[%d]", k), "no solution of the front has index %d", idx)
			continue
		}
		fr.marked = append(fr.marked, pos)
	}
	for k, c := range opt.Candidates {
		if len(c.Objectives) != nobj {
			add(fmt.Sprintf("candidates[%d].objectives", k), "has %d values, want %d", len(c.Objectives), nobj)
		}
		for j, v := range c.Objectives {
			if !finite(v) {
				add(fmt.Sprintf("candidates[%d].objectives[%d]", k, j), "must be a finite number, got %v", v)
			}
		}
	}
	if len(probs) > 0 {
		return nil, &model.ValidationError{Problems: probs}
	}
	b, err := BalancedSolution(sols)
	if err != nil {
		return nil, err
	}
	fr.balanced = b
	fr.scale = newColourScale(fr.values)
	return fr, nil
}

// balance is the ColourBalance value of a setup.
func balance(s *pb.Setup) (float64, error) {
	fm := s.GetFront().GetBumpRatio() + s.GetFront().GetReboundRatio()
	rm := s.GetRear().GetBumpRatio() + s.GetRear().GetReboundRatio()
	if !(rm > 0) {
		return 0, fmt.Errorf("front/rear balance needs positive rear damping ratios, got bump %g, rebound %g",
			s.GetRear().GetBumpRatio(), s.GetRear().GetReboundRatio())
	}
	return fm / rm, nil
}

// panel draws objective jy against objective jx; with legend it also
// returns the legend of the figure.
func (fr *frontData) panel(jx, jy int, legend bool) (*plot.Plot, *plot.Legend, error) {
	qx, qy := fr.quant[jx], fr.quant[jy]
	sols := fr.f.GetSolutions()
	p := newPanel()
	p.X.Label.Text, p.Y.Label.Text = qx.label(), qy.label()
	at := func(z []float64) plotter.XY { return plotter.XY{X: qx.of(z[jx]), Y: qy.of(z[jy])} }

	pts := make(plotter.XYs, len(sols))
	for i, s := range sols {
		pts[i] = at(s.GetObjectives())
	}
	// A two-objective front is a curve: join its points in order of x.
	if len(fr.f.GetObjectives()) == 2 && len(sols) > 1 {
		byX := slices.Clone(pts)
		slices.SortFunc(byX, func(a, b plotter.XY) int { return cmpFloat(a.X, b.X) })
		l, err := plotter.NewLine(byX)
		if err != nil {
			return nil, nil, err
		}
		l.LineStyle = lineStyle(colGuide, 0.6)
		p.Add(l)
	}
	dots, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, nil, err
	}
	alpha, radius := dotAlpha(len(sols))
	dots.GlyphStyleFunc = func(i int) draw.GlyphStyle {
		return draw.GlyphStyle{Color: translucent(fr.scale.at(fr.values[i]), alpha), Radius: radius, Shape: draw.CircleGlyph{}}
	}
	dots.GlyphStyle = draw.GlyphStyle{Color: fr.scale.at((fr.scale.lo + fr.scale.hi) / 2), Radius: vg.Points(3.2), Shape: draw.CircleGlyph{}}
	rims, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, nil, err
	}
	rims.GlyphStyle = draw.GlyphStyle{Color: colOutline, Radius: vg.Points(3.2), Shape: draw.RingGlyph{}}
	p.Add(dots)
	if alpha == 1 {
		// Outlines only on a sparse front: on a dense one they merge
		// into a grey mass that hides the colours and the density.
		p.Add(rims)
	}

	var leg *plot.Legend
	if legend {
		leg = newLegend()
		noun := "solutions"
		if len(sols) == 1 {
			noun = "solution"
		}
		leg.Add(fmt.Sprintf("front, %d %s", len(sols), noun), dots, rims)
	}
	var labelPts plotter.XYs
	var labels []string
	if len(fr.marked) > 0 {
		m := make(plotter.XYs, len(fr.marked))
		for k, pos := range fr.marked {
			m[k] = pts[pos]
			labelPts = append(labelPts, pts[pos])
			labels = append(labels, fmt.Sprintf("#%d", sols[pos].GetIndex()))
		}
		style := draw.GlyphStyle{Color: colVermilion, Radius: vg.Points(7.5), Shape: thickSquare(vg.Points(1.4))}
		if err := addHighlight(p, leg, m, style, "marked"); err != nil {
			return nil, nil, err
		}
	}
	if fr.balanced >= 0 {
		b := plotter.XYs{pts[fr.balanced]}
		style := draw.GlyphStyle{Color: colBlack, Radius: vg.Points(7), Shape: thickRing{width: vg.Points(1.6)}}
		if err := addHighlight(p, leg, b, style, fmt.Sprintf("balanced, #%d", sols[fr.balanced].GetIndex())); err != nil {
			return nil, nil, err
		}
		if !slices.Contains(fr.marked, fr.balanced) {
			labelPts = append(labelPts, b[0])
			labels = append(labels, fmt.Sprintf("#%d", sols[fr.balanced].GetIndex()))
		}
	}
	if len(fr.opt.Candidates) > 0 {
		c := make(plotter.XYs, len(fr.opt.Candidates))
		for k, cand := range fr.opt.Candidates {
			c[k] = at(cand.Objectives)
			labelPts = append(labelPts, c[k])
			name := cand.Label
			if name == "" {
				name = fmt.Sprintf("candidate %d", k+1)
			}
			labels = append(labels, name)
		}
		style := draw.GlyphStyle{Color: colBlue, Radius: vg.Points(5), Shape: thickCross(vg.Points(1.8))}
		if err := addHighlight(p, leg, c, style, "candidate setup"); err != nil {
			return nil, nil, err
		}
	}
	for k, off := range labelOffsets(labelPts, pts) {
		l, err := newLabels(labelPts[k:k+1], labels[k:k+1], off)
		if err != nil {
			return nil, nil, err
		}
		p.Add(l)
	}
	return p, leg, nil
}

// sparseFront is the most solutions a panel draws as opaque outlined
// dots; more are drawn translucent, so that overlap shows as density.
const sparseFront = 150

// dotAlpha is the opacity and radius of the dots of a front of n
// solutions: opaque up to sparseFront, then sparseFront/n (about as much
// ink in all as a sparse front's), but not below 0.2 so that a lone
// dot stays visible.
func dotAlpha(n int) (float64, vg.Length) {
	if n <= sparseFront {
		return 1, vg.Points(3.2)
	}
	return max(0.2, float64(sparseFront)/float64(n)), vg.Points(2.6)
}

// translucent is c with opacity alpha.
func translucent(c color.Color, alpha float64) color.Color {
	if alpha >= 1 {
		return c
	}
	n := color.NRGBAModel.Convert(c).(color.NRGBA)
	n.A = uint8(math.Round(float64(n.A) * alpha))
	return n
}

// labelOffsets places the labels of the highlighted points (balanced,
// marked, candidates) apart: a label whose point lies within 6 % of the
// panel's span of an earlier label's point (in both x and y) goes one
// text line lower than that one, so that no two labels print over each
// other. all are the panel's points, which set the span.
func labelOffsets(at plotter.XYs, all plotter.XYs) []vg.Point {
	xlo, xhi, ylo, yhi := plotter.XYRange(all)
	for _, p := range at {
		xlo, xhi, ylo, yhi = min(xlo, p.X), max(xhi, p.X), min(ylo, p.Y), max(yhi, p.Y)
	}
	near := func(a, b plotter.XY) bool {
		return math.Abs(a.X-b.X) <= 0.06*(xhi-xlo) && math.Abs(a.Y-b.Y) <= 0.06*(yhi-ylo)
	}
	off := make([]vg.Point, len(at))
	line := make([]int, len(at))
	for k := range at {
		for j := range k {
			if near(at[k], at[j]) && line[k] <= line[j] {
				line[k] = line[j] + 1
			}
		}
		off[k] = vg.Point{X: vg.Points(8), Y: vg.Points(3 - 11*float64(line[k]))}
	}
	return off
}

// notes are the footnote lines of a front chart.
func (fr *frontData) notes() []string {
	n := []string{"Every objective is minimised: better is towards the lower left. Colour: " + fr.colour.label() +
		". Balanced: nearest the middle of the front with each objective scaled to its range."}
	if total := int(fr.f.GetTotalSize()); total > len(fr.f.GetSolutions()) {
		n = append(n, fmt.Sprintf("Showing %d of the %d solutions of the front.", len(fr.f.GetSolutions()), total))
	}
	if fr.f.GetPartial() {
		n = append(n, "Partial front: the job runs, was cancelled or failed; this is its best so far.")
	}
	return n
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}
