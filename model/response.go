package model

import (
	"fmt"
	"math"
)

// Outputs computed from the response, indices into an output vector.
const (
	outTyre     = 0  // dynamic tyre load, corners 0..3 (N)
	outTravel   = 4  // suspension travel at the wheel, corners 0..3 (m)
	outWheelVel = 8  // suspension velocity at the wheel, corners 0..3, then each axle's mean (heave) 4..5 (m/s)
	outRide     = 14 // ride height relative to the road, front, rear (m)
	outPitch    = 16 // pitch relative to the road (rad)
	outRoll     = 17 // roll relative to the road (rad)
	outHeaveAcc = 18 // heave acceleration of the sprung CG (m/s²)
	// Roll relative to the road of each axle, front, rear (rad): r_a =
	// φ - (w_aL - w_aR)/t_a.
	outRollAxle = 19
	// Variances of the sums g_i + g_j (i < j, in the order (0,1), (0,2),
	// (0,3), (1,2), (1,3), (2,3)) of the platform basis g = (h_f, h_r,
	// r_f, r_r) (m², r taken per metre of lateral offset): with the
	// variances of g they give its covariance (platformCovariance).
	outPlatformPair = 21
	// Each axle's mean wheel travel (s_L + s_R)/2, front, rear (m), where
	// its heave element strokes.
	outAxleHeave = 27
	nOut         = 29
	// nVelocityOut counts the velocity outputs the linearisation
	// iterates on, one per damper coordinate (outWheelVel+j).
	nVelocityOut = nDamp
)

// channel is an independent part of the response: a reduced system in
// coordinates y with x = P y (the whole system with P = I for an asymmetric
// car; the in-phase and anti-phase halves for a symmetric one), driven by
// uncorrelated unit-PSD sources whose input vectors the case gives.
type channel struct {
	n    int                 // reduced size
	p    [nDOF][nDOF]float64 // x = P y, columns 0..n-1 used
	m    [nDOF]float64       // reduced mass matrix (diagonal in both bases used)
	k    [nDOF][nDOF]float64 // Pᵀ K P
	c    [nDOF][nDOF]float64 // Pᵀ C P
	bk   [nDOF][nIn]float64  // Pᵀ Bk
	bc   [nDOF][nIn]float64  // Pᵀ Bc
	kind int                 // sourceInPhase, sourceAntiPhase or sourceGeneral
	// src maps y back to x: x_i = y_(src_i - 1) when src_i > 0,
	// -y_(-src_i - 1) when src_i < 0, 0 when src_i = 0 (every basis
	// used has at most one entry ±1 per row).
	src [nDOF]int8
}

const (
	sourceInPhase = iota
	sourceAntiPhase
	sourceGeneral
)

// project builds the channel Pᵀ(·)P of a full system for the basis p.
func project(s *system, n int, p *[nDOF][nDOF]float64, kind int) channel {
	ch := channel{n: n, p: *p, kind: kind}
	for i := 0; i < nDOF; i++ {
		for a := 0; a < n; a++ {
			switch {
			case p[i][a] == 0:
				continue
			case ch.src[i] != 0 || (p[i][a] != 1 && p[i][a] != -1):
				panic("model: basis row is not a signed unit vector")
			case p[i][a] == 1:
				ch.src[i] = int8(a + 1)
			default:
				ch.src[i] = int8(-a - 1)
			}
		}
	}
	for a := 0; a < n; a++ {
		for b := 0; b < n; b++ {
			var kk, cc, mm float64
			for i := 0; i < nDOF; i++ {
				if p[i][a] == 0 {
					continue
				}
				mm += p[i][a] * s.m[i] * p[i][b]
				for j := 0; j < nDOF; j++ {
					kk += p[i][a] * s.k[i][j] * p[j][b]
					cc += p[i][a] * s.c[i][j] * p[j][b]
				}
			}
			ch.k[a][b], ch.c[a][b] = kk, cc
			if a == b {
				ch.m[a] = mm
			}
		}
		for q := 0; q < nIn; q++ {
			var bk, bc float64
			for i := 0; i < nDOF; i++ {
				bk += p[i][a] * s.bk[i][q]
				bc += p[i][a] * s.bc[i][q]
			}
			ch.bk[a][q], ch.bc[a][q] = bk, bc
		}
	}
	return ch
}

// Bases of the symmetric split: in-phase y = [z, θ, u_f, u_r] with
// zu_FL = zu_FR = u_f, zu_RL = zu_RR = u_r; anti-phase y = [φ, a_f, a_r]
// with zu_FL = -zu_FR = a_f, zu_RL = -zu_RR = a_r. Both bases are
// M-orthogonal, so the projected mass matrices stay diagonal.
var (
	basisInPhase = [nDOF][nDOF]float64{
		{1, 0, 0, 0}, {0, 1, 0, 0}, {0, 0, 0, 0},
		{0, 0, 1, 0}, {0, 0, 1, 0}, {0, 0, 0, 1}, {0, 0, 0, 1},
	}
	basisAntiPhase = [nDOF][nDOF]float64{
		{0, 0, 0}, {0, 0, 0}, {1, 0, 0},
		{0, 1, 0}, {0, -1, 0}, {0, 0, 1}, {0, 0, -1},
	}
	basisFull = func() (p [nDOF][nDOF]float64) {
		for i := range p {
			p[i][i] = 1
		}
		return
	}()
)

// channels fills dst with the independent channels of a damped system
// and returns how many there are.
func channels(dst *[2]channel, s *system, symmetric bool) int {
	if symmetric {
		dst[0] = project(s, 4, &basisInPhase, sourceInPhase)
		dst[1] = project(s, 3, &basisAntiPhase, sourceAntiPhase)
		return 2
	}
	dst[0] = project(s, nDOF, &basisFull, sourceGeneral)
	return 1
}

// caseGrid is what a road case contributes at each grid frequency.
type caseGrid struct {
	// Filter of the front and rear tyres' enveloping times the wheelbase
	// delay for the rear: gf = G_f, gr = G_r·exp(-iωτ).
	gf, gr []complex128
	// Symmetric car: amplitudes sqrt(S_pf), sqrt(S_qf) of the in-phase
	// (w_L+w_R)/2 and anti-phase (w_L-w_R)/2 front inputs (m/sqrt(Hz)).
	ampIn, ampAnti []float64
	// General car: Cholesky factor of the left/right spectral matrix,
	// [[l11, 0], [l21, l22]] (m/sqrt(Hz)).
	l11, l21, l22 []float64
}

// sourceInputs writes the input vectors w (4 tyres) of a channel's sources
// at grid point k and returns how many there are.
func (cg *caseGrid) sourceInputs(kind, k int, w *[maxRHS][nIn]complex128) int {
	gf, gr := cg.gf[k], cg.gr[k]
	switch kind {
	case sourceInPhase:
		a := complex(cg.ampIn[k], 0)
		w[0] = [nIn]complex128{gf * a, gf * a, gr * a, gr * a}
		return 1
	case sourceAntiPhase:
		a := complex(cg.ampAnti[k], 0)
		w[0] = [nIn]complex128{gf * a, -gf * a, gr * a, -gr * a}
		return 1
	default:
		l11, l21, l22 := complex(cg.l11[k], 0), complex(cg.l21[k], 0), complex(cg.l22[k], 0)
		w[0] = [nIn]complex128{gf * l11, gf * l21, gr * l11, gr * l21}
		w[1] = [nIn]complex128{0, gf * l22, 0, gr * l22}
		return 2
	}
}

// outputGeometry holds what turns (x, w) into outputs.
type outputGeometry struct {
	d            [nIn][nDOF]float64 // travel rows
	kt, ct       [4]float64
	a, b, tf, tr float64
	yc           float64 // lateral position of the centre line from the sprung CG (m)
	// heave: the car has a heave element, and the axles' mean wheel
	// travel and velocity are computed (left 0 otherwise).
	heave bool
}

// responseSpectra computes, for every grid point, the output PSDs summed
// over channels and sources, and accumulates the weighted integrals into
// acc (grid part only) and the band integrals into band (see
// Grid.bandWeights). With velOnly only the wheel-velocity outputs are computed. psd,
// when not nil, receives the PSD of every output at every point
// (len(psd) = nOut·points). It allocates nothing.
//
// cache, when not nil, holds each channel's damper-independent parts at
// every grid point (fillCache); without it they are computed here, with
// the same operations, so both give the same bits.
func responseSpectra(chs []channel, cache []channelCache, cg *caseGrid, geo *outputGeometry, omega, wts []float64, bw *[4][]float64,
	velOnly bool, acc *[nOut]float64, band *[4][nOut]float64, psd []float64) bool {
	*acc = [nOut]float64{}
	*band = [4][nOut]float64{}
	var a [nDOF][nDOF]complex128
	var rhs [nDOF][maxRHS]complex128
	var w [maxRHS][nIn]complex128
	var kdBuf [nDOF * nDOF]float64
	var out [nOut]float64
	// The outputs computed: all, or the wheel velocities alone (the
	// others stay 0 and need no sums).
	lo, hi := 0, nOut
	if velOnly {
		lo, hi = outWheelVel, outWheelVel+nVelocityOut
	}
	for k, om := range omega {
		out = [nOut]float64{}
		jw := complex(0, om)
		for ci := range chs {
			ch := &chs[ci]
			n := ch.n
			ns := sourceCount(ch.kind)
			// The sources' inputs are read by the outputs other than
			// the velocities, and by the right-hand side when it is not
			// cached.
			if cache == nil || !velOnly {
				cg.sourceInputs(ch.kind, k, &w)
			}
			var kd []float64
			if cache != nil {
				cc := &cache[ci]
				kd = cc.kd[k*n*n : (k+1)*n*n]
				f := cc.rhs[k*n*ns : (k+1)*n*ns]
				for r := 0; r < n; r++ {
					for j := 0; j < ns; j++ {
						rhs[r][j] = f[r*ns+j]
					}
				}
			} else {
				kd = kdBuf[:n*n]
				ch.springMass(om, kd)
				ch.forcing(om, &w, ns, &rhs)
			}
			for r := 0; r < n; r++ {
				for c := 0; c < n; c++ {
					a[r][c] = complex(kd[r*n+c], om*ch.c[r][c])
				}
			}
			if !solveComplex(n, ns, &a, &rhs) {
				return false
			}
			for j := 0; j < ns; j++ {
				// x = P y: P's entries are 0 and ±1, one per row at
				// most, so x is a pick of ±y, the value the product
				// gives (up to the sign of a zero, which |·|² drops).
				var x [nDOF]complex128
				for i, sr := range ch.src {
					switch {
					case sr > 0:
						x[i] = rhs[sr-1][j]
					case sr < 0:
						x[i] = -rhs[-sr-1][j]
					}
				}
				geo.accumulate(&out, &x, &w[j], jw, om, velOnly)
			}
		}
		wk := wts[k]
		for o := lo; o < hi; o++ {
			acc[o] += wk * out[o]
		}
		for b := range bw {
			if wb := bw[b][k]; wb != 0 {
				for o := lo; o < hi; o++ {
					band[b][o] += wb * out[o]
				}
			}
		}
		if psd != nil {
			copy(psd[k*nOut:(k+1)*nOut], out[:])
		}
	}
	return true
}

// accumulate adds one source's output PSD contributions |y|² at one
// frequency (jw = iω).
func (g *outputGeometry) accumulate(out *[nOut]float64, x *[nDOF]complex128, w *[nIn]complex128, jw complex128, om float64, velOnly bool) {
	var travel [4]complex128
	for i := 0; i < 4; i++ {
		d := &g.d[i]
		s := x[dofWheel+i] + scale(d[0], x[0]) + scale(d[1], x[1]) + scale(d[2], x[2])
		travel[i] = s
		out[outWheelVel+i] += om * om * abs2(s)
		if velOnly {
			continue
		}
		out[outTravel+i] += abs2(s)
		defl := w[i] - x[dofWheel+i]
		out[outTyre+i] += abs2(complex(g.kt[i], om*g.ct[i]) * defl)
	}
	if g.heave {
		for ax := 0; ax < 2; ax++ {
			u := abs2(scale(0.5, travel[2*ax]+travel[2*ax+1]))
			out[outWheelVel+dampHeave+ax] += om * om * u
			if !velOnly {
				out[outAxleHeave+ax] += u
			}
		}
	}
	if velOnly {
		return
	}
	wf := scale(0.5, w[0]+w[1])
	wr := scale(0.5, w[2]+w[3])
	yc := scale(g.yc, x[2])
	var p [nPlatform]complex128
	p[0] = x[0] + scale(g.a, x[1]) + yc - wf
	p[1] = x[0] - scale(g.b, x[1]) + yc - wr
	p[2] = x[2] - over(w[0]-w[1], g.tf)
	p[3] = x[2] - over(w[2]-w[3], g.tr)
	out[outRide] += abs2(p[0])
	out[outRide+1] += abs2(p[1])
	out[outPitch] += abs2(x[1] - over(wf-wr, g.a+g.b))
	out[outRoll] += abs2(x[2] - scale(0.5, over(w[0]-w[1], g.tf)+over(w[2]-w[3], g.tr)))
	out[outHeaveAcc] += om * om * om * om * abs2(x[0])
	out[outRollAxle] += abs2(p[2])
	out[outRollAxle+1] += abs2(p[3])
	k := outPlatformPair
	for i := 0; i < nPlatform; i++ {
		for j := i + 1; j < nPlatform; j++ {
			out[k] += abs2(p[i] + p[j])
			k++
		}
	}
	_ = jw
}

// variances completes the grid integrals with the analytic tails.
func variances(acc *[nOut]float64, band *[4][nOut]float64, f []float64, velOnly bool) ([nOut]float64, error) {
	var v [nOut]float64
	for o := 0; o < nOut; o++ {
		if velOnly && (o < outWheelVel || o >= outWheelVel+nVelocityOut) {
			continue
		}
		lo, okLo := tail(band[0][o], band[1][o])
		hi, okHi := tail(band[3][o], band[2][o])
		if acc[o] < noiseFloor {
			// Rounding noise of an output the inputs do not excite (roll
			// under fully coherent tracks): no tail to speak of.
			lo, hi, okLo, okHi = 0, 0, true, true
		}
		if !okLo {
			return v, fmt.Errorf("the spectrum of %s does not fall off below %g Hz: its variance is not finite (lower grid.min_hz)", outputNames[o], f[0])
		}
		if !okHi {
			return v, fmt.Errorf("the spectrum of %s does not fall off above %g Hz: its variance is not finite (raise grid.max_hz, or set a tyre envelope length)", outputNames[o], f[len(f)-1])
		}
		v[o] = acc[o] + lo + hi
	}
	return v, nil
}

// noiseFloor is the variance (SI units squared, 1e-12 in standard
// deviation) below which an output counts as not excited.
const noiseFloor = 1e-24

// outputNames label the outputs in error messages.
var outputNames = [nOut]string{
	"FL tyre load", "FR tyre load", "RL tyre load", "RR tyre load",
	"FL travel", "FR travel", "RL travel", "RR travel",
	"FL wheel velocity", "FR wheel velocity", "RL wheel velocity", "RR wheel velocity",
	"front heave velocity", "rear heave velocity",
	"front ride height", "rear ride height", "pitch", "roll", "heave acceleration",
	"front roll", "rear roll",
	"front + rear ride height", "front ride height + front roll", "front ride height + rear roll",
	"rear ride height + front roll", "rear ride height + rear roll", "front + rear roll",
	"front heave travel", "rear heave travel",
}

// newCaseGrid tabulates a road case on the grid for a vehicle.
func newCaseGrid(v *Vehicle, rc *RoadCase, f []float64, symmetric bool) *caseGrid {
	n := len(f)
	cg := &caseGrid{gf: make([]complex128, n), gr: make([]complex128, n)}
	if symmetric {
		cg.ampIn, cg.ampAnti = make([]float64, n), make([]float64, n)
	} else {
		cg.l11, cg.l21, cg.l22 = make([]float64, n), make([]float64, n), make([]float64, n)
	}
	tau := v.Wheelbase() / rc.Speed
	track := (v.TrackFront + v.TrackRear) / 2
	lf, lr := v.Corners[FL].TyreEnvelopeLength, v.Corners[RL].TyreEnvelopeLength
	for k, fk := range f {
		nk := fk / rc.Speed
		om := 2 * math.Pi * fk
		cg.gf[k] = envelope(nk, lf)
		cg.gr[k] = envelope(nk, lr) * complex(math.Cos(om*tau), -math.Sin(om*tau))
		sl, sr := rc.SpatialPSD(nk)
		sl, sr = sl/rc.Speed, sr/rc.Speed
		gam := rc.CoherenceAt(nk, track)
		slr := gam * math.Sqrt(sl*sr)
		if symmetric {
			cg.ampIn[k] = math.Sqrt(math.Max(0, (sl+sr+2*slr)/4))
			cg.ampAnti[k] = math.Sqrt(math.Max(0, (sl+sr-2*slr)/4))
		} else {
			// Cholesky of [[S_LL, γ√(S_LL S_RR)], [·, S_RR]], written so
			// that γ = 1 gives l22 = 0 exactly.
			cg.l11[k] = math.Sqrt(sl)
			cg.l21[k] = gam * math.Sqrt(sr)
			cg.l22[k] = math.Sqrt(sr * math.Max(0, 1-gam*gam))
		}
	}
	return cg
}

// envelope is the tyre enveloping filter G(n) = 1/(1 + i n ℓ) (ℓ = 0: 1).
func envelope(n, l float64) complex128 {
	if l == 0 {
		return 1
	}
	return 1 / complex(1, n*l)
}
