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
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// CurveOptions choose the page of the damper curve chart.
type CurveOptions struct {
	// Title is drawn above the panels; empty means "Damper curves at the component".
	Title string
	// Width and Height are the page size; 0 means 24 cm × 11 cm for two
	// axles, 15 cm × 11 cm for one.
	Width, Height vg.Length
}

// curveSameRel is the relative difference of force below which a left and
// a right curve are drawn as one: the tables come from the same
// piecewise-linear law, so equal dampers agree to rounding.
const curveSameRel = 1e-9

// DamperCurves draws the force-velocity curves at the component (damper
// velocity and force, not wheel), one panel per axle that has curves,
// front then rear, on a common force axis: the baseline in bump (v > 0,
// F > 0) and rebound (v < 0, F < 0), the adjuster range from the softest
// to the stiffest setting shaded, and the knees marked with their
// velocities. When the two sides of an axle differ (unequal motion
// ratios or wheel rates) the right side is drawn dashed. Problems with
// the curves come back as a *model.ValidationError naming the field
// ("curves[i].force_n").
func DamperCurves(curves []*pb.DamperCurve, opt CurveOptions) (*Figure, error) {
	if err := validateCurves(curves); err != nil {
		return nil, err
	}
	axles := [2][]*pb.DamperCurve{}
	for _, c := range curves {
		switch c.GetCorner() {
		case pb.CornerPosition_CORNER_POSITION_FRONT_LEFT, pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT:
			axles[0] = append(axles[0], c)
		default:
			axles[1] = append(axles[1], c)
		}
	}
	fmin, fmax := math.Inf(1), math.Inf(-1)
	for _, c := range curves {
		for _, tab := range [][]float64{c.GetForceN(), c.GetSoftestForceN(), c.GetStiffestForceN()} {
			for _, f := range tab {
				fmin, fmax = math.Min(fmin, qDamperForce.of(f)), math.Max(fmax, qDamperForce.of(f))
			}
		}
	}
	var panels []*plot.Plot
	for ax, cs := range axles {
		if len(cs) == 0 {
			continue
		}
		slices.SortFunc(cs, func(a, b *pb.DamperCurve) int { return int(a.GetCorner() - b.GetCorner()) })
		p, err := axlePanel([]string{"Front dampers", "Rear dampers"}[ax], cs, fmin, fmax)
		if err != nil {
			return nil, err
		}
		p.Y.Min, p.Y.Max = fmin, fmax
		panels = append(panels, p)
	}
	def := page{title: "Damper curves at the component", width: 24 * vg.Centimeter, height: 11 * vg.Centimeter}
	if len(panels) == 1 {
		def.width = 15 * vg.Centimeter
	}
	fig := def.or(opt.Title, opt.Width, opt.Height).figure(panels...)
	fig.Notes = []string{"At the damper, not the wheel: damper velocity = motion ratio × wheel velocity, " +
		"damper force = wheel force / motion ratio. Rebound velocities and forces are negative."}
	return fig, nil
}

// validateCurves checks the tables of every curve.
func validateCurves(curves []*pb.DamperCurve) error {
	var probs []model.FieldError
	add := func(field, format string, args ...any) {
		probs = append(probs, model.FieldError{Field: field, Reason: fmt.Sprintf(format, args...)})
	}
	if len(curves) == 0 {
		add("curves", "no damper curves to draw")
	}
	for i, c := range curves {
		path := fmt.Sprintf("curves[%d]", i)
		if c.GetCorner() == pb.CornerPosition_CORNER_POSITION_UNSPECIFIED {
			add(path+".corner", "must name a corner")
		}
		v := c.GetVelocityMPerS()
		if len(v) < 2 {
			add(path+".velocity_m_per_s", "needs at least 2 velocities, got %d", len(v))
		}
		for k := range v {
			if !finite(v[k]) || (k > 0 && !(v[k] > v[k-1])) {
				add(fmt.Sprintf("%s.velocity_m_per_s[%d]", path, k), "must be finite and increasing, got %v", v[k])
				break
			}
		}
		tabs := []struct {
			name     string
			f        []float64
			optional bool
		}{{"force_n", c.GetForceN(), false}, {"softest_force_n", c.GetSoftestForceN(), true}, {"stiffest_force_n", c.GetStiffestForceN(), true}}
		for _, tab := range tabs {
			if tab.optional && len(tab.f) == 0 {
				continue
			}
			if len(tab.f) != len(v) {
				add(path+"."+tab.name, "has %d values, want one per velocity (%d)", len(tab.f), len(v))
			}
			for k, f := range tab.f {
				if !finite(f) {
					add(fmt.Sprintf("%s.%s[%d]", path, tab.name, k), "must be a finite number, got %v", f)
					break
				}
			}
		}
		if (len(c.GetSoftestForceN()) == 0) != (len(c.GetStiffestForceN()) == 0) {
			add(path+".stiffest_force_n", "softest and stiffest curves come together")
		}
		for name, x := range map[string]float64{"knee_bump_m_per_s": c.GetKneeBumpMPerS(), "knee_rebound_m_per_s": c.GetKneeReboundMPerS(),
			"bump_slope_n_s_per_m": c.GetBumpSlopeNSPerM(), "rebound_slope_n_s_per_m": c.GetReboundSlopeNSPerM()} {
			if !finite(x) || x < 0 {
				add(path+"."+name, "must be finite and >= 0, got %v", x)
			}
		}
	}
	if len(probs) > 0 {
		slices.SortFunc(probs, func(a, b model.FieldError) int { return cmpString(a.Field, b.Field) })
		return &model.ValidationError{Problems: probs}
	}
	return nil
}

// axlePanel draws one axle's curves: the first is the left side (or the
// only one); a second that differs from it is drawn dashed.
func axlePanel(title string, cs []*pb.DamperCurve, fmin, fmax float64) (*plot.Plot, error) {
	p := newPanel()
	p.Title.Text = title
	p.X.Label.Text, p.Y.Label.Text = qDamperVelocity.label(), qDamperForce.label()
	base := cs[0]
	vmin := qDamperVelocity.of(base.GetVelocityMPerS()[0])
	vmax := qDamperVelocity.of(base.GetVelocityMPerS()[len(base.GetVelocityMPerS())-1])

	if len(base.GetSoftestForceN()) > 0 {
		for _, side := range []func(v float64) bool{func(v float64) bool { return v <= 0 }, func(v float64) bool { return v >= 0 }} {
			band, err := plotter.NewPolygon(bandRing(base, side))
			if err != nil {
				return nil, err
			}
			band.Color = colBandFill
			band.LineStyle.Width = 0
			p.Add(band)
			if side(1) {
				p.Legend.Add("adjuster range, softest to stiffest", band)
			}
		}
	}
	zero := lineStyle(colGuide, 0.6)
	for _, seg := range [][2]plotter.XY{{{X: vmin, Y: 0}, {X: vmax, Y: 0}}, {{X: 0, Y: fmin}, {X: 0, Y: fmax}}} {
		l, err := plotter.NewLine(plotter.XYs{seg[0], seg[1]})
		if err != nil {
			return nil, err
		}
		l.LineStyle = zero
		p.Add(l)
	}

	sides := cs[:1]
	if len(cs) > 1 && !sameCurve(cs[0], cs[1]) {
		sides = cs[:2]
	}
	for k, c := range sides {
		dash := []vg.Length(nil)
		if k == 1 {
			dash = []vg.Length{vg.Points(5), vg.Points(3)}
		}
		bump, reb := halves(c)
		for _, h := range []struct {
			xys   plotter.XYs
			name  string
			col   color.Color
			slope float64
		}{
			{reb, "rebound", colBlue, c.GetReboundSlopeNSPerM()},
			{bump, "bump", colVermilion, c.GetBumpSlopeNSPerM()},
		} {
			l, err := plotter.NewLine(h.xys)
			if err != nil {
				return nil, err
			}
			l.LineStyle = lineStyle(h.col, 2)
			l.LineStyle.Dashes = dash
			p.Add(l)
			name := fmt.Sprintf("%s, %.2f %s", h.name, qSlope.of(h.slope), qSlope.unit)
			if len(sides) == 2 {
				name = cornerName(c.GetCorner()) + " " + name
			}
			p.Legend.Add(name, l)
		}
	}

	if err := addKnees(p, base); err != nil {
		return nil, err
	}
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.XOffs, p.Legend.YOffs = vg.Points(6), -vg.Points(4)
	p.Legend.Padding = vg.Points(3)
	p.X.Min, p.X.Max = vmin, vmax
	return p, nil
}

// halves splits a curve's baseline into its rebound (v <= 0) and bump
// (v >= 0) parts in trade units; both include v = 0 when tabulated.
func halves(c *pb.DamperCurve) (bump, rebound plotter.XYs) {
	for k, v := range c.GetVelocityMPerS() {
		pt := plotter.XY{X: qDamperVelocity.of(v), Y: qDamperForce.of(c.GetForceN()[k])}
		if v >= 0 {
			bump = append(bump, pt)
		}
		if v <= 0 {
			rebound = append(rebound, pt)
		}
	}
	return bump, rebound
}

// bandRing is the outline of the adjuster band over the velocities in
// side: the softest curve out, the stiffest back.
func bandRing(c *pb.DamperCurve, side func(v float64) bool) plotter.XYs {
	var soft, stiff plotter.XYs
	for k, v := range c.GetVelocityMPerS() {
		if !side(v) {
			continue
		}
		x := qDamperVelocity.of(v)
		soft = append(soft, plotter.XY{X: x, Y: qDamperForce.of(c.GetSoftestForceN()[k])})
		stiff = append(stiff, plotter.XY{X: x, Y: qDamperForce.of(c.GetStiffestForceN()[k])})
	}
	slices.Reverse(stiff)
	return append(soft, stiff...)
}

// sameCurve reports whether two curves draw the same.
func sameCurve(a, b *pb.DamperCurve) bool {
	same := func(x, y []float64) bool {
		if len(x) != len(y) {
			return false
		}
		for k := range x {
			if math.Abs(x[k]-y[k]) > curveSameRel*math.Max(math.Abs(x[k]), math.Abs(y[k])) {
				return false
			}
		}
		return true
	}
	return same(a.GetVelocityMPerS(), b.GetVelocityMPerS()) && same(a.GetForceN(), b.GetForceN()) &&
		same(a.GetSoftestForceN(), b.GetSoftestForceN()) && same(a.GetStiffestForceN(), b.GetStiffestForceN())
}

// addKnees marks the bump knee at (v_k, c_b v_k) and the rebound knee at
// (-v_k, -c_r v_k), the corners of the piecewise-linear law, with their
// velocities; a knee of 0 (none) or beyond the table is left out. Each
// label sits on the outer side of its knee, under the bump curve and
// over the rebound curve, where the flatter high-speed line leaves room.
func addKnees(p *plot.Plot, c *pb.DamperCurve) error {
	v := c.GetVelocityMPerS()
	gap := vg.Points(6)
	for _, k := range []struct {
		knee, slope, sign float64
		align             text.XAlignment
		off               vg.Point
	}{
		{c.GetKneeBumpMPerS(), c.GetBumpSlopeNSPerM(), 1, draw.XLeft, vg.Point{X: gap, Y: -2 * gap}},
		{c.GetKneeReboundMPerS(), c.GetReboundSlopeNSPerM(), -1, draw.XRight, vg.Point{X: -gap, Y: 2 * gap}},
	} {
		x := k.sign * k.knee
		if k.knee == 0 || x < v[0] || x > v[len(v)-1] {
			continue
		}
		pt := plotter.XYs{{X: qDamperVelocity.of(x), Y: qDamperForce.of(k.sign * k.slope * k.knee)}}
		sc, err := plotter.NewScatter(pt)
		if err != nil {
			return err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: colBlack, Radius: vg.Points(3.5), Shape: draw.PyramidGlyph{}}
		p.Add(sc)
		if k.sign > 0 || c.GetKneeBumpMPerS() == 0 {
			p.Legend.Add("knee", sc)
		}
		l, err := newLabels(pt, []string{fmt.Sprintf("knee %.0f %s", qKnee.of(k.knee), qKnee.unit)}, k.off)
		if err != nil {
			return err
		}
		l.TextStyle[0].XAlign, l.TextStyle[0].YAlign = k.align, draw.YCenter
		p.Add(l)
	}
	return nil
}

// cornerName is "left" or "right" for a corner.
func cornerName(c pb.CornerPosition) string {
	switch c {
	case pb.CornerPosition_CORNER_POSITION_FRONT_LEFT, pb.CornerPosition_CORNER_POSITION_REAR_LEFT:
		return "left"
	}
	return "right"
}

func cmpString(a, b string) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}
