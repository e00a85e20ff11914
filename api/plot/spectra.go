package plot

import (
	"fmt"
	"image/color"
	"math"

	"dampfront/model"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// SpectraOptions choose the page of the output spectra chart.
type SpectraOptions struct {
	// Title is drawn above the panels; empty means "Output spectra" and
	// the road case's name.
	Title string
	// Width and Height are the page size; 0 means 17 cm × 20 cm.
	Width, Height vg.Length
}

// spectraDecades is the most decades a PSD axis spans, down from the
// largest value of its panel: below that a spectrum holds under 10⁻⁶ of
// its peak density and nothing of its variance that a chart could show
// (a presentation choice).
const spectraDecades = 6

// spectraMinDecades is the least span of a PSD axis, centred on the data
// when they span less (a flat spectrum would leave the axis no range).
const spectraMinDecades = 1.0

// spectraSameRel is the relative difference, to the largest value of the
// series, below which a right side's spectrum is drawn as one with the
// left's: on a left-right symmetric car both come from the same in-phase
// and anti-phase responses and agree to rounding.
const spectraSameRel = 1e-9

// Spectra draws the output spectra of one setup on one road case, as
// model.Evaluator.Spectra returns them: the one-sided PSDs, at the
// linearisation's fixed point, of the dynamic tyre load (N²/Hz) and of
// the ride height relative to the road (mm²/Hz), front and rear, against
// frequency over the grid, log-log, in two panels on one frequency axis.
// Where the two sides of an axle differ (an asymmetric car) the right
// side is drawn dashed. The area under a curve, in linear units, is the
// variance of its quantity over the grid.
//
// The modes (model.ModesAt the case's speed and equivalent slopes) are
// marked by vertical lines at their natural frequencies, dotted when
// overdamped, and named with their frequency in the upper panel; modes
// outside the grid are left out. Each PSD axis spans at most six decades
// down from its panel's largest value, and at least one; zero values are
// gaps.
//
// Problems with the spectra or the modes come back as a
// *model.ValidationError naming the field ("spectra.tyre_load[2][17]",
// "modes[0].frequency_hz").
func Spectra(sp *model.Spectra, modes []model.Mode, opt SpectraOptions) (*Figure, error) {
	if err := validateSpectra(sp, modes); err != nil {
		return nil, err
	}
	f := sp.FrequencyHz
	marks := newModeMarks(modes)
	leg := newLegend()

	tyre := newPanel()
	tyre.Title.Text = "Dynamic tyre load"
	tyre.Y.Label.Text = qTyreLoadPSD.label()
	asym, err := addAxleSpectra(tyre, leg, qTyreLoadPSD, f, [2][][]float64{
		{sp.TyreLoad[model.FL], sp.TyreLoad[model.FR]},
		{sp.TyreLoad[model.RL], sp.TyreLoad[model.RR]},
	})
	if err != nil {
		return nil, err
	}

	ride := newPanel()
	ride.Title.Text = "Ride height relative to the road"
	ride.Y.Label.Text = qRideHeightPSD.label()
	ride.X.Label.Text = qFrequency.label()
	if _, err := addAxleSpectra(ride, nil, qRideHeightPSD, f, [2][][]float64{
		{sp.RideHeight[model.Front]}, {sp.RideHeight[model.Rear]},
	}); err != nil {
		return nil, err
	}

	labelled := marks
	labelled.labels = true
	tyre.Add(labelled)
	ride.Add(marks)
	if err := marks.legend(leg); err != nil {
		return nil, err
	}
	tyre.Legend = *leg
	tyre.Legend.Top, tyre.Legend.Left = true, false
	tyre.Legend.XOffs, tyre.Legend.YOffs = -vg.Points(4), -vg.Points(4)

	for _, p := range []*plot.Plot{tyre, ride} {
		p.X.Tick.Marker, p.Y.Tick.Marker = decadeTicks{}, decadeTicks{}
		p.X.Min, p.X.Max = math.Log10(f[0]), math.Log10(f[len(f)-1])
	}

	def := page{title: "Output spectra", width: 17 * vg.Centimeter, height: 20 * vg.Centimeter}
	if sp.Case != "" {
		def.title += ", " + sp.Case
	}
	pg := def.or(opt.Title, opt.Width, opt.Height)
	fig := &Figure{Width: pg.width, Height: pg.height, Title: pg.title, Panels: [][]*plot.Plot{{tyre}, {ride}}}
	note := "One-sided PSDs at the linearisation's fixed point; the area under a curve is the variance over the grid. " +
		"Grey lines: undamped natural frequencies of the modes, dotted when overdamped at the equivalent slopes."
	if asym {
		note += " Dashed: right side."
	}
	fig.Notes = []string{note}
	return fig, nil
}

// axleColours are the colours of the front and rear spectra.
var axleColours = [2]color.Color{colBlue, colVermilion}

// addAxleSpectra draws per axle the PSD of each side given (left first)
// in trade units q, on log-log axes, and sets the panel's PSD range; a
// right side equal to its left is not drawn again. It adds the entries
// to leg unless leg is nil, and reports whether a right side was drawn.
func addAxleSpectra(p *plot.Plot, leg *plot.Legend, q quantity, f []float64, axles [2][][]float64) (bool, error) {
	asym := false
	peak, least := math.Inf(-1), math.Inf(1)
	for ax, sides := range axles {
		for side, psd := range sides {
			if side > 0 && sameSpectrum(sides[0], psd) {
				continue
			}
			name := model.AxleNames[ax]
			if len(sides) > 1 && !sameSpectrum(sides[0], sides[1]) {
				name += []string{" left", " right"}[side]
			}
			for _, run := range logRuns(f, psd, q) {
				for _, pt := range run {
					peak, least = math.Max(peak, pt.Y), math.Min(least, pt.Y)
				}
				l, err := plotter.NewLine(run)
				if err != nil {
					return false, err
				}
				l.LineStyle = lineStyle(axleColours[ax], 1.8)
				if side > 0 {
					l.LineStyle.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
					asym = true
				}
				p.Add(l)
				if leg != nil && name != "" {
					leg.Add(name, l)
					name = "" // one entry per curve, however many runs
				}
			}
		}
	}
	p.Y.Min, p.Y.Max = math.Max(least, peak-spectraDecades), peak
	if p.Y.Max-p.Y.Min < spectraMinDecades {
		mid := (p.Y.Max + p.Y.Min) / 2
		p.Y.Min, p.Y.Max = mid-spectraMinDecades/2, mid+spectraMinDecades/2
	}
	return asym, nil
}

// logRuns converts a PSD to trade units and to (log10 f, log10 S) in the
// runs of consecutive positive values that log axes can show.
func logRuns(f, psd []float64, q quantity) []plotter.XYs {
	var runs []plotter.XYs
	var cur plotter.XYs
	for k, s := range psd {
		if v := q.of(s); v > 0 {
			cur = append(cur, logXY(f[k], v))
			continue
		}
		if len(cur) > 1 {
			runs = append(runs, cur)
		}
		cur = nil
	}
	if len(cur) > 1 {
		runs = append(runs, cur)
	}
	return runs
}

// sameSpectrum reports whether two spectra draw the same.
func sameSpectrum(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	scale := 0.0
	for k := range a {
		scale = math.Max(scale, math.Max(math.Abs(a[k]), math.Abs(b[k])))
	}
	for k := range a {
		if math.Abs(a[k]-b[k]) > spectraSameRel*scale {
			return false
		}
	}
	return true
}

// validateSpectra checks the tables of a Spectra and the modes.
func validateSpectra(sp *model.Spectra, modes []model.Mode) error {
	var probs []model.FieldError
	add := func(field, format string, args ...any) {
		probs = append(probs, model.FieldError{Field: field, Reason: fmt.Sprintf(format, args...)})
	}
	if sp == nil {
		return &model.ValidationError{Problems: []model.FieldError{{Field: "spectra", Reason: "is required"}}}
	}
	f := sp.FrequencyHz
	if len(f) < 2 {
		add("spectra.frequency_hz", "needs at least 2 frequencies, got %d", len(f))
	}
	for k := range f {
		if !finite(f[k]) || !(f[k] > 0) || (k > 0 && !(f[k] > f[k-1])) {
			add(fmt.Sprintf("spectra.frequency_hz[%d]", k), "must be finite, positive and increasing, got %v", f[k])
			break
		}
	}
	table := func(name string, psd []float64) bool {
		if len(psd) != len(f) {
			add(name, "has %d values, want one per frequency (%d)", len(psd), len(f))
			return false
		}
		positive := false
		for k, v := range psd {
			if !finite(v) || v < 0 {
				add(fmt.Sprintf("%s[%d]", name, k), "must be finite and >= 0, got %v", v)
				return false
			}
			positive = positive || v > 0
		}
		return positive
	}
	for _, panel := range []struct {
		name string
		psd  [][]float64
	}{
		{"tyre_load", sp.TyreLoad[:]},
		{"ride_height", sp.RideHeight[:]},
	} {
		drawn := false
		for i, psd := range panel.psd {
			drawn = table(fmt.Sprintf("spectra.%s[%d]", panel.name, i), psd) || drawn
		}
		if !drawn {
			add("spectra."+panel.name, "has no positive value to draw on a log axis")
		}
	}
	for i, m := range modes {
		if !finite(m.UndampedFrequencyHz) || !(m.UndampedFrequencyHz > 0) {
			add(fmt.Sprintf("modes[%d].undamped_frequency_hz", i), "must be finite and > 0, got %v", m.UndampedFrequencyHz)
		}
	}
	if len(probs) > 0 {
		return &model.ValidationError{Problems: probs}
	}
	return nil
}
