package model

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"
)

// EvaluatorOptions tune an Evaluator. The zero value gives the defaults.
type EvaluatorOptions struct {
	Grid Grid // frequency grid; zero value means DefaultGrid

	// Tolerance is the relative change of every equivalent damping below
	// which the linearisation's fixed point counts as reached; 0 = 1e-8.
	Tolerance float64
	// MaxIterations bounds the fixed-point iterations; 0 = 200.
	MaxIterations int
	// WarnThreshold is the lift-off and bump-stop contact probability
	// above which a case is flagged; 0 = 0.01 (1 %).
	WarnThreshold float64
	// General forces the full 7-DOF path even for a symmetric car.
	General bool
	// DampingReference is the car whose critical damping a setup's ratios
	// are taken of (see Vehicle.CriticalDamping); nil is the evaluator's
	// own. An uncertain car (Perturbation.Apply) takes the nominal car's,
	// so that every car runs the same dampers.
	DampingReference *Vehicle
}

func (o EvaluatorOptions) withDefaults() EvaluatorOptions {
	if o.Grid == (Grid{}) {
		o.Grid = DefaultGrid
	}
	if o.Tolerance == 0 {
		o.Tolerance = 1e-8
	}
	if o.MaxIterations == 0 {
		o.MaxIterations = 200
	}
	if o.WarnThreshold == 0 {
		o.WarnThreshold = 0.01
	}
	return o
}

// Evaluator computes ride metrics of setups for one vehicle on a set of
// road cases. It is safe for concurrent use; Evaluate allocates nothing
// when dst has room for the cases.
type Evaluator struct {
	v     Vehicle
	ref   *Vehicle // the car the setups' ratios refer to (EvaluatorOptions.DampingReference)
	opt   EvaluatorOptions
	f     []float64    // grid frequencies (Hz)
	omega []float64    // 2πf
	wts   []float64    // Simpson weights in f
	bands [4][]float64 // band weights for the tails
	cases []caseData
	pool  sync.Pool
	// transients are the manoeuvre and kerb cases (SetTransientCases).
	transients []*transientCase
}

// caseData is one road case prepared on the grid.
type caseData struct {
	rc    RoadCase
	sym   bool
	base  *system // undamped suspension (tyre damping only)
	kinv  [nDOF][nDOF]float64
	grid  *caseGrid
	geo   outputGeometry
	op    OperatingPoint // the car at the case's speed
	plat  platformRows   // downforce, balance and reference points at op
	modal modalRatios
	// cache holds the damper-independent parts of each channel's solve
	// (responsecache.go); nil for a case past the cache budget.
	cache []channelCache
}

type workspace struct {
	chs [2]channel
}

// NewEvaluator validates its inputs and prepares the road cases on the grid.
func NewEvaluator(v Vehicle, cases []RoadCase, opt EvaluatorOptions) (*Evaluator, error) {
	return NewEvaluatorContext(context.Background(), v, cases, opt)
}

// NewEvaluatorContext is NewEvaluator that stops preparing road cases
// when ctx is done, returning ctx's error: the preparation grows with the
// cases and the grid, and a caller that has gone should not pay for it.
func NewEvaluatorContext(ctx context.Context, v Vehicle, cases []RoadCase, opt EvaluatorOptions) (*Evaluator, error) {
	opt = opt.withDefaults()
	var p problems
	p.merge("vehicle.", v.Validate())
	if len(cases) == 0 {
		p.add("road_cases", "needs at least one road case")
	}
	for i := range cases {
		p.merge(fmt.Sprintf("road_cases[%d].", i), cases[i].Validate())
	}
	p.merge("grid.", opt.Grid.Validate())
	if opt.Tolerance < 0 || opt.Tolerance > 1e-2 {
		p.add("tolerance", "must be in (0, 0.01], got %g", opt.Tolerance)
	}
	p.in("warn_threshold", opt.WarnThreshold, "EvaluatorOptions.warn_threshold")
	if opt.MaxIterations < 0 {
		p.add("max_iterations", "must be >= 0, got %d", opt.MaxIterations)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	e := &Evaluator{v: v, opt: opt}
	e.ref = &e.v
	if opt.DampingReference != nil {
		ref := *opt.DampingReference
		e.ref, e.opt.DampingReference = &ref, nil
	}
	e.f = opt.Grid.Frequencies()
	e.wts = opt.Grid.weights(e.f)
	e.bands, _ = opt.Grid.bandWeights(e.f)
	e.omega = make([]float64, len(e.f))
	for k, f := range e.f {
		e.omega[k] = 2 * math.Pi * f
	}
	vsym := v.symmetric() && !opt.General
	cached := 0 // bytes of response cache so far
	for i := range cases {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		rc := cases[i]
		sym := vsym && (rc.Measured == nil || rc.Measured.Right == nil)
		op, err := e.v.operatingPoint(rc.Speed)
		if err != nil {
			p.add(fmt.Sprintf("road_cases[%d].speed_m_per_s", i), "road case %q: %v", rc.Name, err)
			continue
		}
		cd := caseData{rc: rc, sym: sym, op: op, base: newSystem(&e.v, &op.AeroStiffness), plat: newPlatformRows(&e.v, &op)}
		for a := 0; a < nDOF; a++ {
			var unit [nDOF]float64
			unit[a] = 1
			col, err := cd.base.staticSolve(unit)
			if err != nil {
				p.add("vehicle", "%v: check the rates and masses for values far out of scale", err)
				return nil, p.err()
			}
			for b := 0; b < nDOF; b++ {
				cd.kinv[b][a] = col[b]
			}
		}
		modal, err := newModalRatios(cd.base)
		if err != nil {
			return nil, err
		}
		cd.modal = modal
		cd.grid = newCaseGrid(&e.v, &cd.rc, e.f, sym)
		var chs [2]channel
		nch := channels(&chs, cd.base, sym)
		if b := cacheBytes(chs[:nch], len(e.f)); cached+b <= cacheBudget {
			cd.cache = newResponseCache(chs[:nch], cd.grid, e.omega)
			cached += b
		}
		cd.geo = outputGeometry{d: cd.base.d, a: v.CGToFrontAxle, b: v.CGToRearAxle, tf: v.TrackFront, tr: v.TrackRear, yc: -v.CGLateral, heave: v.hasHeave()}
		for c := 0; c < 4; c++ {
			cd.geo.kt[c] = v.Corners[c].TyreRate
			cd.geo.ct[c] = v.Corners[c].TyreDamping
		}
		e.cases = append(e.cases, cd)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	e.pool.New = func() any { return new(workspace) }
	return e, nil
}

// Vehicle returns the evaluator's vehicle.
func (e *Evaluator) Vehicle() *Vehicle { return &e.v }

// Cases returns the number of road cases.
func (e *Evaluator) Cases() int { return len(e.cases) }

// Case returns road case i.
func (e *Evaluator) Case(i int) *RoadCase { return &e.cases[i].rc }

// OperatingPoint returns the car's operating point on road case i.
func (e *Evaluator) OperatingPoint(i int) OperatingPoint { return e.cases[i].op }

// Frequencies returns the grid frequencies (Hz); do not modify.
func (e *Evaluator) Frequencies() []float64 { return e.f }

// WarnThreshold returns the probability above which a case is flagged.
func (e *Evaluator) WarnThreshold() float64 { return e.opt.WarnThreshold }

// Evaluate computes the metrics of a setup on every road case into dst
// (dst.Cases is reused when it has room).
func (e *Evaluator) Evaluate(s Setup, dst *Result) error {
	if !s.ok() {
		if err := s.Validate(); err != nil {
			return err
		}
	}
	if s.Heave != [2]AxleDamping{} {
		if err := e.v.CheckSetup(&s); err != nil {
			return err
		}
	}
	dst.Setup = s
	if cap(dst.Cases) < len(e.cases) {
		dst.Cases = make([]CaseMetrics, len(e.cases))
	}
	dst.Cases = dst.Cases[:len(e.cases)]
	ws := e.pool.Get().(*workspace)
	defer e.pool.Put(ws)
	dampers := e.ref.dampers(&s)
	for i := range e.cases {
		if err := e.evaluateCase(i, &dampers, ws, &dst.Cases[i], nil); err != nil {
			return err
		}
	}
	return e.evaluateTransients(&dampers, dst)
}

// evaluateCase runs the linearisation to its fixed point on case ci and
// fills m; psd, when not nil, receives the output spectra of the final pass.
func (e *Evaluator) evaluateCase(ci int, dampers *[nDamp]wheelDamper, ws *workspace, m *CaseMetrics, psd []float64) error {
	cd := &e.cases[ci]
	linear := true
	var c [nDamp]float64
	for i := range dampers {
		d := &dampers[i]
		c[i] = (d.cb + d.cr) / 2
		if c[i] == 0 {
			continue // no heave damper on this axle
		}
		if !d.linear() {
			linear = false
		}
	}
	var acc [nOut]float64
	var edge [4][nOut]float64
	iter := 0
	if !linear {
		converged := false
		var prevC, prevRes [nDamp]float64
		for iter < e.opt.MaxIterations {
			iter++
			v, err := e.caseVariances(ws, cd, &c, true, &acc, &edge, nil)
			if err != nil {
				return err
			}
			worst := 0.0
			for i := range c {
				if c[i] == 0 {
					continue
				}
				g, _ := dampers[i].Equivalent(math.Sqrt(v[outWheelVel+i]))
				r := g - c[i] // residual of the fixed point c = g(c)
				worst = math.Max(worst, math.Abs(r)/c[i])
				next := g
				// Secant step on each corner's residual (the corners couple
				// weakly): superlinear near the fixed point. Taken only when
				// it stays within a factor 2 of the plain step's target.
				// Anderson acceleration of the vector of slopes (Walker &
				// Ni, "Anderson acceleration for fixed-point iterations",
				// SIAM J. Numer. Anal. 49(4):1715-1735, 2011,
				// doi:10.1137/10078356X, cited from memory; type II, mixing 1, written from
				// memory) took more sweeps on the demo car: over 20 setups
				// spread over the ratio bounds, depth 2 or 3 needed 120,
				// 63 and 92 sweeps on ISO class C at 50 m/s and the two
				// demo cases, against 100, 60 and 80 here (depth 0, the
				// plain step: 177, 72, 129).
				if iter > 1 && r != prevRes[i] {
					if s := c[i] - r*(c[i]-prevC[i])/(r-prevRes[i]); s > g/2 && s < 2*g {
						next = s
					}
				}
				prevC[i], prevRes[i] = c[i], r
				c[i] = next
			}
			if worst <= e.opt.Tolerance {
				converged = true
				break
			}
		}
		if !converged {
			return fmt.Errorf("%w: road case %q after %d iterations", ErrNoConvergence, cd.rc.Name, iter)
		}
	}
	v, err := e.caseVariances(ws, cd, &c, false, &acc, &edge, psd)
	if err != nil {
		return err
	}
	e.fillMetrics(cd, dampers, &v, m)
	m.Iterations = iter
	return m.checkFinite()
}

// caseVariances computes road case cd's response spectra at damping c
// into acc and edge (and psd when not nil), and their variances;
// velOnly as for responseSpectra and variances.
func (e *Evaluator) caseVariances(ws *workspace, cd *caseData, c *[nDamp]float64, velOnly bool, acc *[nOut]float64, edge *[4][nOut]float64, psd []float64) ([nOut]float64, error) {
	sys := cd.base.withDamping(*c)
	n := channels(&ws.chs, &sys, cd.sym)
	if !responseSpectra(ws.chs[:n], cd.cache, cd.grid, &cd.geo, e.omega, e.wts, &e.bands, velOnly, acc, edge, psd) {
		return [nOut]float64{}, fmt.Errorf("%w: road case %q: singular dynamic stiffness", ErrUnstable, cd.rc.Name)
	}
	v, err := variances(acc, edge, e.f, velOnly)
	if err != nil {
		return v, fmt.Errorf("road case %q: %w", cd.rc.Name, err)
	}
	return v, nil
}

// fillMetrics turns variances into metrics and solves the jacking.
func (e *Evaluator) fillMetrics(cd *caseData, dampers *[nDamp]wheelDamper, v *[nOut]float64, m *CaseMetrics) {
	*m = CaseMetrics{Case: cd.rc.Name, StaticTyreLoad: cd.op.TyreLoad, AtSpeed: cd.op}
	var fbar [nDamp]float64
	for i := 0; i < 4; i++ {
		mr := e.v.Corners[i].DamperMotionRatio
		sv := math.Sqrt(v[outWheelVel+i])
		ceq, mean := dampers[i].Equivalent(sv)
		fbar[i] = mean
		m.EquivalentDamping[i] = ceq
		m.MeanDamperForce[i] = mean / mr
		m.DamperVelocitySD[i] = mr * sv
		m.TyreLoadSD[i] = math.Sqrt(v[outTyre+i])
		m.TyreLoadSDRel[i] = m.TyreLoadSD[i] / cd.op.TyreLoad[i]
		m.TravelSD[i] = math.Sqrt(v[outTravel+i])
	}
	mr3 := e.v.heaveRatios()
	for ax := 0; ax < 2; ax++ {
		if mr3[ax] == 0 {
			continue
		}
		su := math.Sqrt(v[outWheelVel+dampHeave+ax])
		ceq, mean := dampers[dampHeave+ax].Equivalent(su)
		fbar[dampHeave+ax] = mean
		m.HeaveEquivalentDamping[ax] = ceq
		m.HeaveVelocitySD[ax] = mr3[ax] * su
		m.HeaveTravelSD[ax] = mr3[ax] * math.Sqrt(v[outAxleHeave+ax])
	}
	ceq := [nDamp]float64{m.EquivalentDamping[0], m.EquivalentDamping[1], m.EquivalentDamping[2], m.EquivalentDamping[3],
		m.HeaveEquivalentDamping[0], m.HeaveEquivalentDamping[1]}
	cd.modal.fill(&ceq, &m.ModalDampingRatio)
	// Jacking: K x̄ = -Σ_j R_jᵀ F̄_j (the mean damper force pushes body up,
	// wheels down; a heave damper's pushes on its axle's mean travel).
	var f, xbar [nDOF]float64
	for a := 0; a < nDOF; a++ {
		for i := 0; i < nDamp; i++ {
			if fbar[i] != 0 {
				f[a] -= cd.base.r[i][a] * fbar[i]
			}
		}
	}
	for a := 0; a < nDOF; a++ {
		for b := 0; b < nDOF; b++ {
			xbar[a] += cd.kinv[a][b] * f[b]
		}
	}
	yc := -e.v.CGLateral * xbar[2] // ride height is taken on the centre line
	m.RideHeightShift = [2]float64{xbar[0] + e.v.CGToFrontAxle*xbar[1] + yc, xbar[0] - e.v.CGToRearAxle*xbar[1] + yc}
	m.PitchShift = xbar[1]
	for i := 0; i < 4; i++ {
		s := 0.0
		for a := 0; a < nDOF; a++ {
			s += cd.base.d[i][a] * xbar[a]
		}
		m.TravelShift[i] = s
		// Both tails start from the operating point at the case's speed:
		// the tyre load and the bump-stop gap left under downforce.
		load := cd.op.TyreLoad[i] - e.v.Corners[i].TyreRate*xbar[dofWheel+i]
		m.LiftOffProbability[i] = tailProb(load, m.TyreLoadSD[i])
		if gap := cd.op.BumpStopGap[i]; gap > 0 {
			m.BumpStopProbability[i] = tailProb(gap-s, m.TravelSD[i])
		}
		if m.LiftOffProbability[i] > e.opt.WarnThreshold {
			m.Warnings |= WarnLiftOff
		}
		if m.BumpStopProbability[i] > e.opt.WarnThreshold {
			m.Warnings |= WarnBumpStop
		}
	}
	for ax := 0; ax < 2; ax++ {
		if gap := cd.op.PackerGap[ax]; gap > 0 {
			u := 0.0
			for a := 0; a < nDOF; a++ {
				u += cd.base.r[dampHeave+ax][a] * xbar[a]
			}
			m.PackerProbability[ax] = tailProb(gap-mr3[ax]*u, m.HeaveTravelSD[ax])
			if m.PackerProbability[ax] > e.opt.WarnThreshold {
				m.Warnings |= WarnPacker
			}
		}
	}
	m.RideHeightSD = [2]float64{math.Sqrt(v[outRide]), math.Sqrt(v[outRide+1])}
	m.PitchSD = math.Sqrt(v[outPitch])
	m.RollSD = math.Sqrt(v[outRoll])
	m.HeaveAccelSD = math.Sqrt(v[outHeaveAcc])
	cd.plat.fillPlatform(m, v, &xbar, e.opt.WarnThreshold)
}

// tailProb is P(X > margin) for X ~ N(0, sd²).
func tailProb(margin, sd float64) float64 {
	if sd <= 0 {
		if margin < 0 {
			return 1
		}
		return 0
	}
	return normQ(margin / sd)
}

// IsConvergence reports whether err is a linearisation failure.
func IsConvergence(err error) bool { return errors.Is(err, ErrNoConvergence) }
