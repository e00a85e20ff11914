package model

import (
	"fmt"
	"math"
)

// SetTransientCases prepares manoeuvre and kerb cases beside the road
// cases: Evaluate then fills Result.Transients, manoeuvres first, in the
// order given. Call it before the evaluator is used (it is not safe
// against concurrent Evaluate calls). Every problem is named, with paths
// "manoeuvres[i]." and "kerbs[i].".
func (e *Evaluator) SetTransientCases(ms []Manoeuvre, ks []Kerb, opt TransientOptions) error {
	var p problems
	for i := range ms {
		p.merge(fmt.Sprintf("manoeuvres[%d].", i), ms[i].Validate())
	}
	for i := range ks {
		p.merge(fmt.Sprintf("kerbs[%d].", i), ks[i].Validate())
	}
	if len(ms) > 0 && !(e.v.LoadPaths.CGHeight > 0) {
		p.add("vehicle.load_paths.cg_height_m", "is needed by the manoeuvre cases, got %s", num(e.v.LoadPaths.CGHeight))
	}
	p.merge("transient.", opt.validate())
	if err := p.err(); err != nil {
		return err
	}
	opt = opt.withDefaults()
	cc, hc := e.ref.CriticalDamping(), e.ref.HeaveCriticalDamping()
	var slope [nDamp]float64
	for i := range cc {
		slope[i] = opt.MaxRatio * cc[i]
	}
	for ax := range hc {
		if e.v.Heave[ax].has() {
			slope[dampHeave+ax] = opt.MaxRatio * hc[ax]
		}
	}
	cases := make([]*transientCase, 0, len(ms)+len(ks))
	for i := range ms {
		m := ms[i]
		m.Table = append([]ManoeuvrePoint(nil), m.Table...)
		c, err := newTransientCase(&e.v, &m, nil, opt, slope)
		if err != nil {
			return err
		}
		cases = append(cases, c)
	}
	for i := range ks {
		k := ks[i]
		if k.Road != nil {
			rc := *k.Road
			k.Road = &rc
		}
		c, err := newTransientCase(&e.v, nil, &k, opt, slope)
		if err != nil {
			return err
		}
		cases = append(cases, c)
	}
	e.transients = cases
	return nil
}

// TransientCases is the number of manoeuvre and kerb cases.
func (e *Evaluator) TransientCases() int { return len(e.transients) }

// TransientCase returns the name and kind of transient case i.
func (e *Evaluator) TransientCase(i int) (string, TransientKind) {
	return e.transients[i].name, e.transients[i].kind
}

// evaluateTransients fills dst.Transients for the dampers (corners and
// heave dampers).
func (e *Evaluator) evaluateTransients(d *[nDamp]wheelDamper, dst *Result) error {
	if cap(dst.Transients) < len(e.transients) {
		dst.Transients = make([]TransientMetrics, len(e.transients))
	}
	dst.Transients = dst.Transients[:len(e.transients)]
	for i, c := range e.transients {
		if err := c.evaluate(d, &dst.Transients[i]); err != nil {
			return err
		}
	}
	return nil
}

// TransientHistory is the time history of one setup on one manoeuvre or
// kerb case, one sample per RK4 step.
type TransientHistory struct {
	Case  string
	Kind  TransientKind
	Time  []float64 // (s)
	Roll  []float64 // (rad)
	Pitch []float64 // (rad)
	// LLTDFront is the front share of the lateral load transfer (-);
	// where the total transfer is under 10 % of its steady value (or the
	// case has no lateral input) it holds the steady share (or 0).
	LLTDFront []float64
	TyreLoad  [4][]float64 // tyre load, static at speed included (N)
	// AxLateral are the input accelerations a_x and a_y (m/s²), zero for
	// a kerb.
	Ax, Ay []float64
}

// History simulates setup s on transient case i and returns its history.
func (e *Evaluator) History(s Setup, i int) (*TransientHistory, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if err := e.v.CheckSetup(&s); err != nil {
		return nil, err
	}
	if i < 0 || i >= len(e.transients) {
		return nil, &ValidationError{Problems: []FieldError{{Field: "case", Reason: fmt.Sprintf("must be in [0, %d), got %d", len(e.transients), i)}}}
	}
	d := e.ref.dampers(&s)
	c, err := e.transients[i].coveringCase(&d)
	if err != nil {
		return nil, err
	}
	w, err := c.run(&d)
	if err != nil {
		return nil, err
	}
	defer c.pool.Put(w)
	n := c.steps
	out := &TransientHistory{Case: c.name, Kind: c.kind, Time: make([]float64, n),
		Roll: append([]float64(nil), w.roll...), Pitch: append([]float64(nil), w.pitch...),
		LLTDFront: make([]float64, n), Ax: make([]float64, n), Ay: make([]float64, n)}
	for k := 0; k < n; k++ {
		t := float64(k) * c.h
		out.Time[k] = t
		if c.man != nil {
			out.Ax[k], out.Ay[k], _ = c.man.input(t)
		}
		if !math.IsNaN(c.lltdSS) {
			out.LLTDFront[k] = c.lltdSS
			if tot := w.dwf[k] + w.dwr[k]; math.Abs(tot) >= lltdFloor*c.lltdW {
				out.LLTDFront[k] = w.dwf[k] / tot
			}
		}
	}
	for i := range out.TyreLoad {
		out.TyreLoad[i] = make([]float64, n)
		for k, dyn := range w.tyre[i] {
			out.TyreLoad[i][k] = c.op.TyreLoad[i] + dyn
		}
	}
	return out, nil
}
