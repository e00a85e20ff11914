package plot

import (
	"errors"
	"fmt"
	"math"

	"dampfront/model"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// RoadOptions choose the range and page of the road input chart.
type RoadOptions struct {
	// Title is drawn above the panel; empty means "Road input".
	Title string
	// MinN and MaxN bound the spatial frequency axis (cycles/m); 0 means
	// 0.01 and 10, wavelengths from 100 m down to 0.1 m.
	MinN, MaxN float64
	// Width and Height are the page size; 0 means 17 cm × 14 cm.
	Width, Height vg.Length
}

// isoClassLetters are the classes of ISO 8608:1995, smoothest first.
var isoClassLetters = []string{"A", "B", "C", "D", "E", "F", "G", "H"}

// roadSamples is the number of log-spaced points a spectrum is drawn with.
const roadSamples = 200

// RoadInput draws the spatial displacement PSD Gd(n) of road cases
// against spatial frequency n, log-log, over the classes of ISO 8608:
// the upper limit of each class A to H is the line
//
//	Gd(n) = 2 Gd,mean(n0) (n/n0)^-2,  n0 = 0.1 cycles/m
//
// (ISO 8608:1995: class limits a factor of 2 either side of the class's
// geometric mean, waviness 2), with the class letter in its band. A
// measured spectrum is drawn over its table only, its right track dashed
// when it has one. Problems come back as a *model.ValidationError with
// paths "road_cases[i]...".
func RoadInput(cases []model.RoadCase, opt RoadOptions) (*Figure, error) {
	lo, hi, err := roadRange(cases, opt)
	if err != nil {
		return nil, err
	}
	p := newPanel()
	p.X.Label.Text, p.Y.Label.Text = qSpatialFreq.label(), qRoadPSD.label()
	p.X.Tick.Marker, p.Y.Tick.Marker = decadeTicks{}, decadeTicks{}

	var letters plotter.XYs
	var names []string
	for _, c := range isoClassLetters {
		mean, _, upper, err := model.ISOClassGd0(c)
		if err != nil {
			return nil, err
		}
		l, err := plotter.NewLine(plotter.XYs{
			logXY(lo, qRoadPSD.of(isoPowerLaw(upper, lo))),
			logXY(hi, qRoadPSD.of(isoPowerLaw(upper, hi))),
		})
		if err != nil {
			return nil, err
		}
		l.LineStyle = lineStyle(colGuide, 0.7)
		p.Add(l)
		// The letter sits in the right margin, level with the class's
		// geometric mean, clear of any curve inside the panel.
		letters = append(letters, logXY(hi, qRoadPSD.of(isoPowerLaw(mean, hi))))
		names = append(names, c)
	}
	lab, err := newLabels(letters, names, vg.Point{X: vg.Points(5)})
	if err != nil {
		return nil, err
	}
	for i := range lab.TextStyle {
		lab.TextStyle[i] = textStyle(sizeNote)
		lab.TextStyle[i].Color = colNote
		lab.TextStyle[i].XAlign, lab.TextStyle[i].YAlign = draw.XLeft, draw.YCenter
	}
	p.Add(lab)

	leg := newLegend()
	for i := range cases {
		rc := &cases[i]
		col := seriesColours[i%len(seriesColours)]
		left, right := sampleRoad(rc, lo, hi)
		for side, xys := range []plotter.XYs{left, right} {
			if len(xys) < 2 {
				continue
			}
			l, err := plotter.NewLine(xys)
			if err != nil {
				return nil, err
			}
			l.LineStyle = lineStyle(col, 2)
			name := roadCaseName(rc)
			if side == 1 {
				l.LineStyle.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
				name += ", right track"
			}
			p.Add(l)
			leg.Add(name, l)
		}
	}
	p.X.Min, p.X.Max = math.Log10(lo), math.Log10(hi)

	def := page{title: "Road input", width: 17 * vg.Centimeter, height: 14 * vg.Centimeter}
	fig := def.or(opt.Title, opt.Width, opt.Height).figure(p)
	fig.Legend, fig.LegendBelow = leg, true
	fig.Notes = []string{"Grey: upper limits of the ISO 8608 classes A to H (waviness 2). " +
		"At speed V the tyres see the temporal PSD S(f) = Gd(f/V)/V."}
	return fig, nil
}

// logXY is the point (log10 x, log10 y) of the log-log axes.
func logXY(x, y float64) plotter.XY { return plotter.XY{X: math.Log10(x), Y: math.Log10(y)} }

// isoPowerLaw is Gd(n) = gd0 (n/n0)^-2 (m³), the ISO 8608 form of waviness 2.
func isoPowerLaw(gd0, n float64) float64 {
	r := n / model.ISO8608N0
	return gd0 / (r * r)
}

// roadRange validates the cases and the frequency range.
func roadRange(cases []model.RoadCase, opt RoadOptions) (lo, hi float64, err error) {
	var probs []model.FieldError
	lo, hi = opt.MinN, opt.MaxN
	if lo == 0 {
		lo = 0.01
	}
	if hi == 0 {
		hi = 10
	}
	if !(lo > 0) || !finite(lo) {
		probs = append(probs, model.FieldError{Field: "min_n", Reason: fmt.Sprintf("must be finite and > 0, got %v", lo)})
	}
	if !(hi > lo) || !finite(hi) {
		probs = append(probs, model.FieldError{Field: "max_n", Reason: fmt.Sprintf("must be finite and above min_n (%v), got %v", lo, hi)})
	}
	if len(cases) == 0 {
		probs = append(probs, model.FieldError{Field: "road_cases", Reason: "no road cases to draw"})
	}
	for i := range cases {
		var ve *model.ValidationError
		if err := cases[i].Validate(); errors.As(err, &ve) {
			for _, p := range ve.Problems {
				p.Field = fmt.Sprintf("road_cases[%d].%s", i, p.Field)
				probs = append(probs, p)
			}
		} else if err != nil {
			return 0, 0, err
		}
	}
	if len(probs) > 0 {
		return 0, 0, &model.ValidationError{Problems: probs}
	}
	return lo, hi, nil
}

// sampleRoad tabulates a case's left and right PSDs at log-spaced n in
// [lo, hi], within the table of a measured spectrum; right is empty when
// the tracks are equal.
func sampleRoad(rc *model.RoadCase, lo, hi float64) (left, right plotter.XYs) {
	if m := rc.Measured; m != nil {
		lo, hi = math.Max(lo, m.N[0]), math.Min(hi, m.N[len(m.N)-1])
	}
	if !(hi > lo) {
		return nil, nil
	}
	for k := range roadSamples {
		n := lo * math.Pow(hi/lo, float64(k)/(roadSamples-1))
		l, r := rc.SpatialPSD(n)
		left = append(left, logXY(n, qRoadPSD.of(l)))
		if rc.Measured != nil && rc.Measured.Right != nil {
			right = append(right, logXY(n, qRoadPSD.of(r)))
		}
	}
	return left, right
}

// roadCaseName is a case's legend entry: name, speed and spectrum.
func roadCaseName(rc *model.RoadCase) string {
	name := rc.Name
	if name == "" {
		name = "road case"
	}
	name += fmt.Sprintf(", %.0f m/s", rc.Speed)
	w := rc.Waviness
	if w == 0 {
		w = 2
	}
	switch {
	case rc.Measured != nil:
		return name + ", measured"
	case rc.Class != "":
		return name + ", ISO class " + rc.Class
	}
	return name + fmt.Sprintf(", Gd(n0) = %s m³, w = %.3g", sciText(qRoadPSD.of(rc.Gd0)), w)
}

// sciText writes v as "2.5e-6", a short mantissa and the exponent.
func sciText(v float64) string {
	if v == 0 || !finite(v) {
		return fmt.Sprint(v)
	}
	e := int(math.Floor(math.Log10(math.Abs(v))))
	return fmt.Sprintf("%.3ge%d", v/math.Pow(10, float64(e)), e)
}
