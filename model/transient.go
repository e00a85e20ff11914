package model

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
)

// TransientKind tells a manoeuvre case from a kerb case.
type TransientKind int

// The transient case kinds.
const (
	KindManoeuvre TransientKind = iota + 1
	KindKerb
)

func (k TransientKind) String() string {
	if k == KindKerb {
		return "kerb"
	}
	return "manoeuvre"
}

// TransientOptions tune the manoeuvre and kerb cases. The zero value
// gives the defaults.
type TransientOptions struct {
	// LoadFraction is the fraction of its static load at speed below
	// which a tyre counts as unloaded (TransientMetrics.TimeBelow);
	// 0 means 0.5.
	LoadFraction float64
	// MaxRatio is the largest damping ratio (times the high-speed factor)
	// the fixed step is prepared for; a setup beyond it gets a case
	// prepared for its own (allocating). 0 means 2.
	MaxRatio float64
	// Step is the RK4 step (s); 0 chooses it as the time-domain check
	// does (SimulateCase) for dampers at MaxRatio.
	Step float64
}

// The manoeuvre step rule: h = min(1/ρ, 2 ms), twice the time-domain
// check's (SimulateCase). A driver's input moves the body at 1-3 Hz,
// integrated at ρ_body·h < 0.05 (RK4's error (ρh)⁵/120 < 3e-9 a step);
// only the fastest, wheel-hop or damper-pole, mode runs at ρh = 1, well
// inside RK4's stability (2.78), damped numerically by y⁶/144 = 0.7 % a
// step, and it is hardly excited by a smooth input. Kerbs, which do
// excite it, keep the time-domain check's rule.
const (
	manoeuvreStability = 1.0
	manoeuvreStepMax   = 2e-3 // s
)

const (
	loadFractionDefault = 0.5
	maxRatioDefault     = 2.0
	// maxTransientSteps bounds a case's steps (a 60 s case at 1 ms).
	maxTransientSteps = 60000
)

func (o TransientOptions) withDefaults() TransientOptions {
	if o.LoadFraction == 0 {
		o.LoadFraction = loadFractionDefault
	}
	if o.MaxRatio == 0 {
		o.MaxRatio = maxRatioDefault
	}
	return o
}

func (o TransientOptions) validate() error {
	var p problems
	p.inOrZero("load_fraction", o.LoadFraction, "Transient.load_fraction")
	p.nonNegative("max_ratio", o.MaxRatio)
	p.nonNegative("step_s", o.Step)
	return p.err()
}

// transientCase is one manoeuvre or kerb case prepared for evaluation:
// its operating point, fixed step, input samples and quasi-static
// response, none of which depend on the setup. Its workspaces (state and
// history buffers) are pooled and reused across evaluations.
type transientCase struct {
	name   string
	kind   TransientKind
	weight float64
	v      *Vehicle
	opt    TransientOptions
	man    *Manoeuvre
	kerb   *Kerb

	op     OperatingPoint
	tm     timeModel      // template: its dampers are set per evaluation
	slope  [nDamp]float64 // steepest damper slope prepared for, per damper coordinate (N s/m)
	h      float64
	steps  int
	start  float64       // when the input begins (s)
	in     []float64     // (2 steps + 1) samples of inWidthForced
	x0     [nDOF]float64 // quasi-static start
	qs     [2][]float64  // quasi-static roll and pitch at each step (rad)
	qsLoad [4][]float64  // quasi-static tyre load change at each step (N); nil for a kerb
	final  [nDOF]float64 // quasi-static state under the last input
	lltdSS float64       // front share of the lateral load transfer at the end (NaN: none)
	lltdW  float64       // |ΔW_f + ΔW_r| at the end (N)
	pool   sync.Pool     // *transientWork
}

// transientWork is one evaluation's history.
type transientWork struct {
	roll, pitch, dwf, dwr []float64
	tyre                  [4][]float64
	rideMin               [2]float64
	stop                  [4]int
	heaveMax              float64
	n                     int
	gap                   [4]float64
	smp                   timeSample
}

func (w *transientWork) buffer() *timeSample { return &w.smp }

func (w *transientWork) add(o *timeSample) {
	n := w.n
	w.n++
	w.roll[n] = o.out[outRoll]
	w.pitch[n] = o.out[outPitch]
	w.dwf[n] = (o.out[outTyre+FR] - o.out[outTyre+FL]) / 2
	w.dwr[n] = (o.out[outTyre+RR] - o.out[outTyre+RL]) / 2
	for i := 0; i < 4; i++ {
		w.tyre[i][n] = o.out[outTyre+i]
		if w.gap[i] > 0 && o.out[outTravel+i] > w.gap[i] {
			w.stop[i]++
		}
	}
	for ax := 0; ax < 2; ax++ {
		w.rideMin[ax] = math.Min(w.rideMin[ax], o.out[outRide+ax])
	}
	w.heaveMax = math.Max(w.heaveMax, math.Abs(o.out[outHeaveAcc]))
}

// newTransientCase prepares a case for dampers whose steepest slope at
// each damper coordinate is at most slope (N s/m: the corners' at the
// wheel, the heave dampers' on the axle's mean wheel travel).
func newTransientCase(v *Vehicle, man *Manoeuvre, kerb *Kerb, opt TransientOptions, slope [nDamp]float64) (*transientCase, error) {
	c := &transientCase{v: v, opt: opt, man: man, kerb: kerb, slope: slope}
	speed := 0.0
	if man != nil {
		c.name, c.kind, c.weight, c.start = man.Name, KindManoeuvre, man.weight(), man.Start
		_, _, speed = man.input(0)
	} else {
		c.name, c.kind, c.weight, c.start = kerb.Name, KindKerb, kerb.weight(), kerb.start()
		speed = kerb.Speed
	}
	fail := func(err error) (*transientCase, error) {
		return nil, fmt.Errorf("%s case %q: %w", c.kind, c.name, err)
	}
	op, err := v.operatingPoint(speed)
	if err != nil {
		return fail(err)
	}
	c.op = op
	tm := newTimeModel(v, &Setup{}, &op)
	tm.width = inWidthForced
	if c.speedFollows() {
		tm.width = inWidthSpeed
	}
	for i := range slope {
		tm.damp[i] = wheelDamper{cb: slope[i], cr: slope[i], rb: 1, rr: 1}
	}
	c.tm = *tm
	h, _, rho, err := tm.timing()
	if err != nil {
		return fail(err)
	}
	if man != nil {
		h = math.Min(manoeuvreStability/rho, manoeuvreStepMax)
	}
	if opt.Step > 0 {
		if opt.Step*rho > stepLimit {
			return nil, &ValidationError{Problems: []FieldError{{Field: "step_s", Reason: fmt.Sprintf(
				"%.3g s is beyond RK4's stability for this car (|λ|max·h = %.2f > %g)", opt.Step, opt.Step*rho, stepLimit)}}}
		}
		h = opt.Step
	}
	dur := 0.0
	if man != nil {
		dur = man.duration()
	} else {
		dur = kerb.duration(v.Wheelbase())
	}
	c.steps = int(math.Ceil(dur / h * (1 - 1e-12)))
	if c.steps > maxTransientSteps {
		return nil, &ValidationError{Problems: []FieldError{{Field: "duration_s", Reason: fmt.Sprintf(
			"needs %d steps of %.3g s, more than %d: shorten the case", c.steps, h, maxTransientSteps)}}}
	}
	c.h = dur / float64(c.steps)
	if err := c.fillInputs(); err != nil {
		return fail(err)
	}
	return c, nil
}

// fillInputs samples the inputs at every half step, solves the
// quasi-static start and end, and the quasi-static attitude at each step.
func (c *transientCase) fillInputs() error {
	n := 2*c.steps + 1
	wd := c.tm.width
	c.in = make([]float64, n*wd)
	il := newInertialLoads(c.v, c.tm.sys, &c.op)
	if c.man != nil {
		for j := 0; j < n; j++ {
			ax, ay, sp := c.man.input(float64(j) * c.h / 2)
			q := c.speedRatio(sp)
			il.at(ax, ay, q, c.in[j*wd+inWidthRoad:j*wd+inWidthForced])
			if wd == inWidthSpeed {
				c.in[j*wd+inWidthForced] = q
			}
		}
	} else if err := c.kerbInputs(n); err != nil {
		return err
	}
	sys := c.tm.sys
	force := func(j int) [nDOF]float64 {
		s := c.in[j*wd : (j+1)*wd]
		var f [nDOF]float64
		for a := 0; a < nDOF; a++ {
			f[a] = s[inWidthRoad+a]
			for q := 0; q < nIn; q++ {
				f[a] += sys.bk[a][q] * s[q]
			}
		}
		return f
	}
	var err error
	if c.x0, err = sys.staticSolve(force(0)); err != nil {
		return err
	}
	if c.final, err = sys.staticSolve(force(n - 1)); err != nil {
		return err
	}
	c.qs = [2][]float64{make([]float64, c.steps), make([]float64, c.steps)}
	if wd == inWidthSpeed {
		for i := range c.qsLoad {
			c.qsLoad[i] = make([]float64, c.steps)
		}
		if err := c.quasiStaticAtSpeed(force); err != nil {
			return err
		}
	} else if c.man != nil {
		var unit [nDOF]float64
		// Quasi-static attitude: K x = f is linear, so x_qs(t) is the
		// combination of the unit responses to each generalised force.
		var resp [nDOF][nDOF]float64
		for a := 0; a < nDOF; a++ {
			unit = [nDOF]float64{}
			unit[a] = 1
			if resp[a], err = sys.staticSolve(unit); err != nil {
				return err
			}
		}
		for i := range c.qsLoad {
			c.qsLoad[i] = make([]float64, c.steps)
		}
		for k := 0; k < c.steps; k++ {
			f := force(2 * k)
			for a := 0; a < nDOF; a++ {
				c.qs[0][k] += resp[a][dofRoll] * f[a]
				c.qs[1][k] += resp[a][dofPitch] * f[a]
				for i := range c.qsLoad {
					c.qsLoad[i][k] -= c.v.Corners[i].TyreRate * resp[a][dofWheel+i] * f[a]
				}
			}
		}
	}
	var load [4]float64
	for i := 0; i < 4; i++ {
		load[i] = -c.v.Corners[i].TyreRate * c.final[dofWheel+i]
	}
	dwf, dwr := (load[FR]-load[FL])/2, (load[RR]-load[RL])/2
	c.lltdW = math.Abs(dwf + dwr)
	c.lltdSS = math.NaN()
	if c.lltdW > 1 { // N: a lateral input worth the name
		c.lltdSS = dwf / (dwf + dwr)
	}
	return nil
}

// kerbInputs samples the kerb (and the road under it) under each tyre,
// through the tyre's envelope filter (a first-order lag with time
// constant ℓ/(2πV), the time form of 1/(1 + i n ℓ), integrated exactly
// for a road linear between samples).
func (c *transientCase) kerbInputs(n int) error {
	k := c.kerb
	v := c.v
	var road []float64
	if k.Road != nil {
		rc := *k.Road
		rc.Speed = k.Speed
		rnd := rand.New(rand.NewPCG(k.Seed, 0))
		length := k.Speed * c.h * float64(c.steps)
		track := (v.TrackFront + v.TrackRear) / 2
		rcf := newRoadCoefficients(&rc, track, length, c.steps-1, rnd)
		road = rcf.tyreInputs(v, k.Speed, 2*c.steps)
	}
	delay := v.Wheelbase() / k.Speed
	dt := c.h / 2
	for i := 0; i < 4; i++ {
		t0 := c.start
		if i >= 2 {
			t0 += delay
		}
		on := k.onTrack(i % 2)
		tau := v.Corners[i].TyreEnvelopeLength / (2 * math.Pi * k.Speed)
		var e, wPrev float64
		for j := 0; j < n; j++ {
			var w, wd float64
			if on {
				z, dz := k.profile(k.Speed * (float64(j)*dt - t0))
				w, wd = z, k.Speed*dz
			}
			if tau > 0 {
				if j > 0 {
					s := (w - wPrev) / dt
					decay := math.Exp(-dt / tau)
					e = (e+s*tau)*decay - s*tau
				}
				wPrev = w
				w, wd = w+e, -e/tau
			}
			s := c.in[j*inWidthForced:]
			s[i], s[nIn+i] = w, wd
			if road != nil {
				r := road[(j%(2*c.steps))*inWidthRoad:]
				s[i] += r[i]
				s[nIn+i] += r[nIn+i]
			}
		}
	}
	return nil
}

// covers reports whether the case's step was prepared for the dampers.
func (c *transientCase) covers(d *[nDamp]wheelDamper) bool {
	for i, w := range d {
		if w.steepest() > c.slope[i]*(1+1e-12) {
			return false
		}
	}
	return true
}

// steepest is the damper's largest slope (N s/m), its stages' included.
func (d wheelDamper) steepest() float64 {
	_, hi := d.slopeRange()
	return hi
}

func (c *transientCase) work() *transientWork {
	if w, ok := c.pool.Get().(*transientWork); ok {
		return w
	}
	w := &transientWork{roll: make([]float64, c.steps), pitch: make([]float64, c.steps),
		dwf: make([]float64, c.steps), dwr: make([]float64, c.steps), gap: c.tm.gap}
	for i := range w.tyre {
		w.tyre[i] = make([]float64, c.steps)
	}
	return w
}

// run integrates the case for the dampers (corners and heave dampers)
// into a pooled workspace, which the caller returns with c.pool.Put.
func (c *transientCase) run(d *[nDamp]wheelDamper) (*transientWork, error) {
	m := c.tm
	m.damp = *d
	w := c.work()
	w.n = 0
	w.rideMin = [2]float64{math.Inf(1), math.Inf(1)}
	w.stop = [4]int{}
	w.heaveMax = 0
	m.integrate(c.in, c.steps, 0, c.h, c.x0, w)
	if !finiteAll(w.roll[c.steps-1], w.pitch[c.steps-1], w.heaveMax) {
		c.pool.Put(w)
		return nil, fmt.Errorf("%w: %s case %q: the time integration diverged at a step of %.3g s", ErrUnstable, c.kind, c.name, c.h)
	}
	return w, nil
}

// evaluate runs the case for the dampers and fills tm.
func (c *transientCase) evaluate(d *[nDamp]wheelDamper, tm *TransientMetrics) error {
	c, err := c.coveringCase(d)
	if err != nil {
		return err
	}
	w, err := c.run(d)
	if err != nil {
		return err
	}
	c.metrics(w, tm)
	c.pool.Put(w)
	return nil
}

// coveringCase returns c when its step was prepared for the dampers, and
// otherwise a case prepared afresh for them (allocating).
func (c *transientCase) coveringCase(d *[nDamp]wheelDamper) (*transientCase, error) {
	if c.covers(d) {
		return c, nil
	}
	var slope [nDamp]float64
	for i := range d {
		slope[i] = math.Max(c.slope[i], d[i].steepest())
	}
	return newTransientCase(c.v, c.man, c.kerb, c.opt, slope)
}
