package model

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// TimeOptions tune the time-domain check. The zero value gives the
// defaults.
type TimeOptions struct {
	// Duration is the recorded time (s), after settling; it is also the
	// period of the synthesised road. 0 means 120 s.
	Duration float64
	// Step is the fixed RK4 step (s); 0 chooses it (see SimulateCase).
	Step float64
	// Settle is the time integrated before recording starts (s); 0
	// chooses it from the slowest mode (see SimulateCase).
	Settle float64
	// WarnThreshold is the lift-off or bump-stop time fraction above
	// which the metrics are flagged; 0 means 0.01.
	WarnThreshold float64
}

// DefaultDuration is the recorded time of the time-domain check (s) when
// none is given.
const DefaultDuration = 120.0

// Step rule constants (see SimulateCase).
const (
	stepStability = 0.5  // ρ·h, ρ the largest |eigenvalue|
	stepMax       = 1e-3 // s
	settleDecay   = 9.21 // ln(1e4): transients decay to 1e-4 of their start
	settleMin     = 1.0  // s
	settleMax     = 30.0 // s
	warnDefault   = 0.01 // time fraction
	maxSteps      = 5e7  // steps per case with settling, a bound on time
	maxRecord     = 4e6  // recorded steps: the road input takes 128 bytes a step
	stepLimit     = 2.5  // ρ·h above which a caller's step is refused (RK4 is stable below 2.78)
)

func (o TimeOptions) validate() error {
	var p problems
	p.nonNegative("duration_s", o.Duration)
	p.nonNegative("step_s", o.Step)
	p.nonNegative("settle_s", o.Settle)
	p.in("warn_threshold", o.WarnThreshold, "EvaluatorOptions.warn_threshold")
	return p.err()
}

// timeModel is the nonlinear 7-DOF car about its operating point at the
// case's speed: the linear system of newSystem (springs, bars, tyres, the
// aero map linearised at the point, tyre damping: the same matrices as
// the frequency-domain model) plus the piecewise dampers, each corner's
// bump stop (Corner.BumpStop, at the gap left at speed), a tyre that
// cannot pull (from its load at speed), and each axle's heave damper and
// packer (at the packer gap left at speed).
type timeModel struct {
	sys    *system
	minv   [nDOF]float64
	damp   [nDamp]wheelDamper // corners, then heave (see system.r)
	heave  bool               // some axle has a heave element
	mr3    [2]float64         // heave element motion ratios (0 = none)
	packer [2]float64         // packer gap left at the operating point per axle, at the element (m), 0 = none
	kp     [2]float64         // packer rate at the element (N/m), 0 = contact counted only
	stop   [4]*BumpStop
	gap    [4]float64 // bump-stop gap left at the operating point per corner (m), 0 = none
	static [4]float64 // tyre load at the operating point (N)
	kt, ct [4]float64
	mr     [4]float64
	a, b   float64
	tf, tr float64
	// width is the number of input values per half-step sample: 8 (the
	// road, w and ẇ), inWidthForced (then nDOF generalised forces
	// follow, see timeModel.accel) or inWidthSpeed (then the speed ratio
	// q, see aeroSpeed).
	width int
	ka    [2][2]float64    // aero stiffness at the operating point (N/m), for aeroSpeed
	axle  [2][nDOF]float64 // the axle rows T_a (see Vehicle.axleRows)
	// xTerms and inTerms are the non-zero entries of K, C and of Bk, Bc
	// (see sparseTerms): the matrices are mostly zero, and accel is the
	// hot loop of every time-domain run.
	xTerms, inTerms []sysTerm
}

// sysTerm is one non-zero entry pair: row r, column c of K and C (or of
// Bk and Bc).
type sysTerm struct {
	r, c int
	k, d float64
}

// sparseTerms lists the non-zero entries of the system's matrices.
func sparseTerms(s *system) (xs, ins []sysTerm) {
	for a := 0; a < nDOF; a++ {
		for b := 0; b < nDOF; b++ {
			if s.k[a][b] != 0 || s.c[a][b] != 0 {
				xs = append(xs, sysTerm{a, b, s.k[a][b], s.c[a][b]})
			}
		}
		for q := 0; q < nIn; q++ {
			if s.bk[a][q] != 0 || s.bc[a][q] != 0 {
				ins = append(ins, sysTerm{a, q, s.bk[a][q], s.bc[a][q]})
			}
		}
	}
	return xs, ins
}

// Input sample widths (see timeModel.width).
const (
	inWidthRoad   = 2 * nIn
	inWidthForced = 2*nIn + nDOF
)

// sampleRecorder receives the outputs at each recorded step, in a
// sample of its own (so that the hot loop allocates none).
type sampleRecorder interface {
	add(o *timeSample)
	buffer() *timeSample
}

func newTimeModel(v *Vehicle, s *Setup, op *OperatingPoint) *timeModel {
	m := &timeModel{sys: newSystem(v, &op.AeroStiffness), damp: v.dampers(s), static: op.TyreLoad,
		a: v.CGToFrontAxle, b: v.CGToRearAxle, tf: v.TrackFront, tr: v.TrackRear, width: inWidthRoad,
		heave: v.hasHeave(), mr3: v.heaveRatios(), packer: op.PackerGap, ka: op.AeroStiffness, axle: v.axleRows()}
	for ax := range m.kp {
		m.kp[ax] = v.Heave[ax].PackerRate
	}
	for i := range m.minv {
		m.minv[i] = 1 / m.sys.m[i]
	}
	m.xTerms, m.inTerms = sparseTerms(m.sys)
	for i := 0; i < 4; i++ {
		m.kt[i], m.ct[i] = v.Corners[i].TyreRate, v.Corners[i].TyreDamping
		m.mr[i] = v.Corners[i].DamperMotionRatio
		m.gap[i] = op.BumpStopGap[i]
		if b := &v.Corners[i].BumpStop; b.has() {
			m.stop[i] = b
		}
	}
	return m
}

// timeSample is what one evaluation of the equations of motion yields
// besides the accelerations.
type timeSample struct {
	out      [nOut]float64 // outputs in the frequency-domain order (outTyre...)
	packer   [2]bool       // the axle's heave element is on its packer
	force    [4]float64    // damper force at the wheel (N), + pushes apart
	stopF    [4]float64    // bump-stop force at the wheel (N)
	airborne [4]bool       // tyre carries no load
}

// accel evaluates M ẍ = -K x - C ẋ + Bk w + Bc ẇ - Σ_i D_iᵀ (F_i + B_i) + Σ_i e_i Δ_i
// at the state (x, ẋ) with the tyre inputs in = [w_0..w_3, ẇ_0..ẇ_3]:
// K, C, Bk, Bc are newSystem's (C holds the tyre damping only), F_i is
// the damper force wheelDamper.force(D_i ẋ), B_i the bump-stop force at
// compression D_i x - gap_i, and Δ_i = max(0, -(P_i + T_i)) puts back the
// part of the linear tyre force T_i = kt(w_i - zu_i) + ct(ẇ_i - żu_i)
// that would pull the tyre down (P_i its static load): the tyre force
// P_i + T_i is clipped at zero. An input sample of inWidthForced values
// carries generalised forces f_e after the road (a manoeuvre's inertial
// and link loads, see inertialLoads), added to the right-hand side, and
// one of inWidthSpeed also the speed ratio q whose aero stiffness
// q K_a adds its force (see aeroSpeed). When
// o is not nil it also receives the outputs, the heave acceleration
// included.
// A heave element adds R_hᵀ(F_h + P_h) to the sum, R_h = (D_L + D_R)/2
// its axle's mean travel: its damper force wheelDamper.force(R_h ẋ) and
// its packer's force MR3·k_p·(MR3 R_h x - gap) once the element travel
// passes the gap; half of each goes to each corner of the axle.
func (m *timeModel) accel(x, xd *[nDOF]float64, in []float64, acc *[nDOF]float64, o *timeSample) {
	s := m.sys
	var f [nDOF]float64
	if len(in) >= inWidthForced {
		copy(f[:], in[inWidthRoad:inWidthForced])
		if len(in) > inWidthForced {
			m.aeroSpeed(x, in, in[inWidthForced], &f)
		}
	}
	in = in[:inWidthRoad]
	for _, t := range m.xTerms {
		f[t.r] -= t.k*x[t.c] + t.d*xd[t.c]
	}
	for _, t := range m.inTerms {
		f[t.r] += t.k*in[t.c] + t.d*in[nIn+t.c]
	}
	var share [4]float64 // each corner's half of its axle's heave force
	if m.heave {
		m.heaveForces(x, xd, &share, o)
	}
	for i := 0; i < 4; i++ {
		d := &s.d[i]
		zu, zud := x[dofWheel+i], xd[dofWheel+i]
		travel := zu + d[0]*x[0] + d[1]*x[1] + d[2]*x[2]
		vel := zud + d[0]*xd[0] + d[1]*xd[1] + d[2]*xd[2]
		fd := m.damp[i].force(vel)
		fs := 0.0
		if st := m.stop[i]; st != nil {
			fs = st.force(travel - m.gap[i])
		}
		g := fd + fs
		if m.heave {
			g += share[i]
		}
		f[0] += g // -D_iᵀ g with D_i = [-1, -x_i, -y_i, e_i]
		f[1] -= d[1] * g
		f[2] -= d[2] * g
		f[dofWheel+i] -= g
		tyre := m.kt[i]*(in[i]-zu) + m.ct[i]*(in[4+i]-zud)
		air := m.static[i]+tyre < 0
		if air {
			f[dofWheel+i] -= m.static[i] + tyre
			tyre = -m.static[i]
		}
		if o != nil {
			o.out[outTyre+i] = tyre
			o.out[outTravel+i] = travel
			o.out[outWheelVel+i] = vel
			o.force[i] = fd
			o.stopF[i] = fs
			o.airborne[i] = air
		}
	}
	for a := 0; a < nDOF; a++ {
		acc[a] = f[a] * m.minv[a]
	}
	if o != nil {
		wf := (in[0] + in[1]) / 2
		wr := (in[2] + in[3]) / 2
		o.out[outRide] = x[0] + m.a*x[1] - wf
		o.out[outRide+1] = x[0] - m.b*x[1] - wr
		o.out[outPitch] = x[1] - (wf-wr)/(m.a+m.b)
		o.out[outRoll] = x[2] - ((in[0]-in[1])/m.tf+(in[2]-in[3])/m.tr)/2
		o.out[outHeaveAcc] = acc[0]
	}
}

// heaveForces writes each corner's half of its axle's heave damper and
// packer force (N, + pushes apart) to share, and the heave outputs to o
// when it is not nil.
func (m *timeModel) heaveForces(x, xd *[nDOF]float64, share *[4]float64, o *timeSample) {
	s := m.sys
	for ax := 0; ax < 2; ax++ {
		if m.mr3[ax] == 0 {
			continue
		}
		r := &s.r[dampHeave+ax]
		u, ud := 0.0, 0.0
		for a := 0; a < nDOF; a++ {
			u += r[a] * x[a]
			ud += r[a] * xd[a]
		}
		g := m.damp[dampHeave+ax].force(ud)
		contact := false
		if gap := m.packer[ax]; gap > 0 {
			if pen := m.mr3[ax]*u - gap; pen > 0 {
				contact = true
				g += m.mr3[ax] * m.kp[ax] * pen
			}
		}
		share[2*ax], share[2*ax+1] = g/2, g/2
		if o != nil {
			o.out[outWheelVel+dampHeave+ax] = ud
			o.out[outAxleHeave+ax] = u
			o.packer[ax] = contact
		}
	}
}

// integrate runs RK4 at step h over the periodic input (half-step
// samples of m.width values; 2·steps of them make one period = steps·h,
// and a buffer of 2·steps + 1 samples, not periodic, is read up to its
// last) from -settleSteps·h to steps·h and hands the outputs at each
// recorded step t_n = n·h, n in [0, steps), to rec. It allocates nothing
// (rec aside).
func (m *timeModel) integrate(in []float64, steps, settleSteps int, h float64, x0 [nDOF]float64, rec sampleRecorder) {
	w := m.width
	period := len(in) / w
	x, xd := x0, [nDOF]float64{}
	var k1x, k1v, k2x, k2v, k3x, k3v, k4x, k4v, xs, vs [nDOF]float64
	smp := rec.buffer()
	idx := ((-2*settleSteps)%period + period) % period
	for n := -settleSteps; n < steps; n++ {
		i1 := idx + 1
		i2 := idx + 2
		if i2 >= period {
			i2 -= period
		}
		var o *timeSample
		if n >= 0 {
			o = smp
		}
		// k1 at t_n
		m.accel(&x, &xd, in[w*idx:w*idx+w], &k1v, o)
		k1x = xd
		if o != nil {
			rec.add(o)
		}
		for a := range xs {
			xs[a] = x[a] + 0.5*h*k1x[a]
			vs[a] = xd[a] + 0.5*h*k1v[a]
		}
		m.accel(&xs, &vs, in[w*i1:w*i1+w], &k2v, nil)
		k2x = vs
		for a := range xs {
			xs[a] = x[a] + 0.5*h*k2x[a]
			vs[a] = xd[a] + 0.5*h*k2v[a]
		}
		m.accel(&xs, &vs, in[w*i1:w*i1+w], &k3v, nil)
		k3x = vs
		for a := range xs {
			xs[a] = x[a] + h*k3x[a]
			vs[a] = xd[a] + h*k3v[a]
		}
		m.accel(&xs, &vs, in[w*i2:w*i2+w], &k4v, nil)
		k4x = vs
		for a := range x {
			x[a] += h / 6 * (k1x[a] + 2*k2x[a] + 2*k3x[a] + k4x[a])
			xd[a] += h / 6 * (k1v[a] + 2*k2v[a] + 2*k3v[a] + k4v[a])
		}
		idx = i2
	}
}

// SimulateCase is the time-domain check of one setup on one road case.
// It synthesises a road realisation for the four tyres with the case's
// PSD, coherence and wheelbase delay (see SynthesiseProfile; the tyres
// follow it through their envelope filters exactly as in the frequency
// domain), integrates the nonlinear 7-DOF model (see timeModel.accel)
// with the classical fourth-order Runge-Kutta method at a fixed step, and
// returns the metrics of the recorded time history (see TimeMetrics).
//
// The road is periodic with the recorded duration T, so the settling run
// before t = 0 uses the end of the same road, and a linear car's response
// over [0, T) is exactly periodic once settled: its sample variance is the
// sum over the synthesised bins, free of the phase-to-phase scatter of a
// finite record except for the cross terms of the two random sources.
//
// Step rule. h = min(0.5/ρ, 1 ms), ρ the largest |λ| of the linear state
// matrix with every damper at its steepest slope and every bump stop at
// its stiffest, rounded down so that T/h is a whole number with prime
// factors 2, 3, 5 only (for the FFT). ρ is at least the wheel-hop angular
// frequency and, with heavy damping, the wheel's damper pole c/m_u; ρh =
// 0.5 lies well inside RK4's stability interval (|λh| < 2.78 on the
// negative real axis, < 2.83 on the imaginary axis), puts at least 12.6
// steps in a wheel-hop period, and keeps RK4's amplitude error per step
// below (ρh)⁶/144 ≈ 1e-4 (|R(iy)| = 1 - y⁶/144 + ..., R the RK4 stability
// polynomial; the local error on the real axis is |z|⁵/120 = 2.6e-4).
// The 1 ms cap keeps the road synthesised up to 1/h = 1 kHz
// in time, past the tyres' envelope cut-off V/ℓ for track speeds. The
// road's band is the rule's 1/h even when opt.Step is given finer, so that
// a finer step integrates the same road (a coarser one cuts the band at
// its own 1/h); a step with ρh > 2.5 is refused.
//
// Exporting the road. The tracks the tyres ran on (before their envelope
// and the rear delay) are SynthesiseProfile(rc, SynthOptions{Length: V·T,
// Spacing: V·h/2, MaxN: RoadMaxN, Track: (t_f + t_r)/2}, r) with T, h
// and RoadMaxN from the returned metrics and r a source seeded as rnd was.
//
// Settling. The start is the quasi-static state K x = Bk w(t_0); the
// settling time is ln(10⁴)/α, α the slowest decay rate -Re λ with every
// damper at its softest slope, within [1 s, 30 s].
func SimulateCase(v *Vehicle, rc *RoadCase, s *Setup, opt TimeOptions, rnd *rand.Rand) (*TimeMetrics, error) {
	var src roadInputSource
	if rnd != nil {
		src = func(steps, kmax int, length float64) []float64 {
			return caseTyreInputs(v, rc, length, steps, kmax, rnd)
		}
	}
	return simulateCase(v, rc, s, opt, src)
}

// roadInputSource gives the tyre inputs of a case's road realisation for
// a record of steps steps with kmax bins over length (see
// caseTyreInputs); the slice is only read.
type roadInputSource func(steps, kmax int, length float64) []float64

// caseTyreInputs synthesises the road realisation of a case from rnd
// (kmax bins over length) and samples the tyres' inputs at 2·steps
// half-steps over its period. It depends on the car, the case, the
// source's seed, the record length and the step counts only, never on
// the setup.
func caseTyreInputs(v *Vehicle, rc *RoadCase, length float64, steps, kmax int, rnd *rand.Rand) []float64 {
	track := (v.TrackFront + v.TrackRear) / 2
	rcf := newRoadCoefficients(rc, track, length, kmax, rnd)
	return rcf.tyreInputs(v, rc.Speed, 2*steps)
}

// simulateCase is SimulateCase with the road's tyre inputs from src (nil:
// no seeded source).
func simulateCase(v *Vehicle, rc *RoadCase, s *Setup, opt TimeOptions, src roadInputSource) (*TimeMetrics, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.merge("road_case.", rc.Validate())
	p.merge("setup.", s.Validate())
	p.merge("setup.", v.CheckSetup(s))
	if err := p.err(); err != nil {
		return nil, err
	}
	if err := opt.validate(); err != nil {
		return nil, err
	}
	if src == nil {
		return nil, &ValidationError{Problems: []FieldError{{Field: "seed", Reason: "a seeded random source is needed"}}}
	}
	op, err := v.operatingPoint(rc.Speed)
	if err != nil {
		return nil, fmt.Errorf("road case %q: %w", rc.Name, err)
	}
	m := newTimeModel(v, s, &op)
	hRule, settle, rho, err := m.timing()
	if err != nil {
		return nil, fmt.Errorf("road case %q: %w", rc.Name, err)
	}
	if opt.Settle > 0 {
		settle = opt.Settle
	}
	dur := opt.Duration
	if dur == 0 {
		dur = DefaultDuration
	}
	stepsRule := smoothAbove(int(math.Ceil(dur/hRule*(1-1e-12))), 16)
	steps := stepsRule
	if opt.Step > 0 {
		if opt.Step*rho > stepLimit {
			return nil, &ValidationError{Problems: []FieldError{{Field: "step_s", Reason: fmt.Sprintf(
				"%.3g s is beyond RK4's stability for this car (|λ|max·h = %.2f > %g): use at most %.3g s, or 0 to choose", opt.Step, opt.Step*rho, stepLimit, stepLimit/rho)}}}
		}
		steps = smoothAbove(int(math.Ceil(dur/opt.Step*(1-1e-12))), 16)
	}
	h := dur / float64(steps)
	settleSteps := int(math.Ceil(settle / h))
	if float64(steps) > maxRecord || float64(steps+settleSteps) > maxSteps {
		return nil, &ValidationError{Problems: []FieldError{{Field: "duration_s", Reason: fmt.Sprintf(
			"needs %d steps of %.3g s (%d recorded), more than %g (%g): shorten the record", steps+settleSteps, h, steps, float64(maxSteps), float64(maxRecord))}}}
	}
	// The road's band is set by the step rule, not by a step the caller
	// gives, so that a finer step integrates the same road.
	length := rc.Speed * dur
	kmax := min(steps, stepsRule) - 1
	in := src(steps, kmax, length)

	// Quasi-static start under the road at t_0 = -settle.
	start := ((-2*settleSteps)%(2*steps) + 2*steps) % (2 * steps)
	var f0 [nDOF]float64
	for a := 0; a < nDOF; a++ {
		for q := 0; q < nIn; q++ {
			f0[a] += m.sys.bk[a][q] * in[8*start+q]
		}
	}
	x0, err := m.sys.staticSolve(f0)
	if err != nil {
		return nil, err
	}
	stats := newTimeStats(m.gap, steps)
	m.integrate(in, steps, settleSteps, h, x0, stats)
	if !stats.finite() {
		return nil, fmt.Errorf("%w: road case %q: the time integration diverged at a step of %.3g s", ErrUnstable, rc.Name, h)
	}
	warn := opt.WarnThreshold
	if warn == 0 {
		warn = warnDefault
	}
	tm := stats.metrics(m, rc.Name, warn)
	tm.Step, tm.Settle, tm.Duration = h, settle, dur
	tm.RoadMaxN = float64(kmax) / length
	return tm, nil
}
