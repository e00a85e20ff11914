package model

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Mode is one vibration mode of the linear car: an undamped mode shape
// with its natural frequency and modal damping ratio, and what the damped
// car's roots make of it.
//
// The undamped modes solve K φ = ω² M φ. The modal damping ratio is
//
//	ζ_j = φ_jᵀ C φ_j / (2 ω_j φ_jᵀ M φ_j)
//
// (classical modal damping: exact when C is a combination of M and K,
// Caughey & O'Kelly 1965, J. Appl. Mech. 32(3):583-588; otherwise the
// usual figure that leaves out the coupling through C). The damped car's
// roots λ solve det(λ² M + λ C + K) = 0; each complex pair or real root is
// given to the undamped mode its shape projects on most (mass-weighted).
type Mode struct {
	// Name is heave, pitch, roll, front hop, front anti-phase hop, rear
	// hop or rear anti-phase hop: the coordinate holding most of the
	// undamped mode's kinetic energy (ModeNames).
	Name string
	// UndampedFrequencyHz is ω_j/(2π) of the undamped car.
	UndampedFrequencyHz float64
	// DampingRatio is the modal damping ratio ζ_j (-); above 1 the mode
	// is overdamped in the classical sense.
	DampingRatio float64
	// Overdamped: no complex pair of the damped car belongs to this
	// mode; its roots are real (DecayRates), and it does not oscillate.
	Overdamped bool
	// DampedFrequencyHz is Im(λ)/(2π) of the mode's complex pair; 0 when
	// overdamped.
	DampedFrequencyHz float64
	// PairDampingRatio is -Re(λ)/|λ| of the complex pair (-); 0 when
	// overdamped. It equals DampingRatio for proportional damping.
	PairDampingRatio float64
	// DecayRates are -λ (1/s) of the real roots given to an overdamped
	// mode, slowest first. They are never combined into a frequency.
	DecayRates []float64
}

// ModeNames are the names of the modes, in the order of the rows of
// CaseMetrics.ModalDampingRatio.
var ModeNames = [nDOF]string{"heave", "pitch", "roll", "front hop", "front anti-phase hop", "rear hop", "rear anti-phase hop"}

// Mode indices into ModeNames.
const (
	ModeHeave = 0
	ModePitch = 1
	ModeRoll  = 2
)

// ModalAnalysis returns the modes of the car with each damper replaced by
// its low-speed mean slope (c_bump + c_rebound)/2 at the wheel, at a speed
// (which sets the aero stiffness): the hand method's view.
func ModalAnalysis(v *Vehicle, s *Setup, speed float64) ([]Mode, error) {
	var p problems
	p.merge("setup.", s.Validate())
	p.merge("setup.", v.CheckSetup(s))
	if err := p.err(); err != nil {
		return nil, err
	}
	d := v.dampers(s)
	var c [nDamp]float64
	for i := range c {
		c[i] = (d[i].cb + d[i].cr) / 2
	}
	return ModesAtHeave(v, speed, [4]float64(c[:4]), [2]float64(c[dampHeave:]))
}

// ModesAt returns the modes of the car at a speed with linear dampers of
// slopes c at the wheel (N s/m per corner), e.g. a road case's
// equivalent slopes (CaseMetrics.EquivalentDamping).
func ModesAt(v *Vehicle, speed float64, c [4]float64) ([]Mode, error) {
	return ModesAtHeave(v, speed, c, [2]float64{})
}

// ModesAtHeave is ModesAt with heave dampers of slopes heave (N s/m on
// each axle's mean wheel travel, CaseMetrics.HeaveEquivalentDamping; 0 =
// none) besides the corner dampers.
func ModesAtHeave(v *Vehicle, speed float64, c [4]float64, heave [2]float64) ([]Mode, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	for i, ci := range c {
		p.nonNegative(fmt.Sprintf("wheel_damping_n_s_per_m[%d]", i), ci)
	}
	for ax, ci := range heave {
		p.nonNegative(fmt.Sprintf("heave_damping_n_s_per_m[%d]", ax), ci)
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	op, err := v.operatingPoint(speed)
	if err != nil {
		return nil, err
	}
	base := newSystem(v, &op.AeroStiffness)
	sys := base.withDamping([nDamp]float64{c[0], c[1], c[2], c[3], heave[0], heave[1]})
	um, err := undampedModes(base)
	if err != nil {
		return nil, err
	}
	return modes(&sys, &um)
}

// undamped are the undamped modes of a system, mass-normalised
// (φᵀ M φ = 1), one per name: shape[j] belongs to ModeNames[j].
type undamped struct {
	omega [nDOF]float64
	shape [nDOF][nDOF]float64
}

// undampedModes solves K φ = ω² M φ through the symmetric
// M^{-1/2} K M^{-1/2} (M is diagonal) and names each mode.
func undampedModes(s *system) (undamped, error) {
	var u undamped
	a := mat.NewSymDense(nDOF, nil)
	for i := 0; i < nDOF; i++ {
		for j := i; j < nDOF; j++ {
			a.SetSym(i, j, s.k[i][j]/math.Sqrt(s.m[i]*s.m[j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(a, true) {
		return u, fmt.Errorf("model: eigen decomposition of the stiffness failed")
	}
	w2 := eig.Values(nil)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	var shares [nDOF][nDOF]float64
	var shapes [nDOF][nDOF]float64
	for k := 0; k < nDOF; k++ {
		var x [nDOF]complex128
		for i := 0; i < nDOF; i++ {
			shapes[k][i] = vecs.At(i, k) / math.Sqrt(s.m[i])
			x[i] = complex(shapes[k][i], 0)
		}
		shares[k] = modeShares(s, &x)
	}
	for k, name := range assignByShare(shares[:], nil) {
		u.omega[name] = math.Sqrt(math.Max(w2[k], 0))
		u.shape[name] = shapes[k]
	}
	return u, nil
}

// assignByShare gives each candidate (row of share) to a name, greedily by
// the largest share, each name taking at most its capacity (2 roots, one
// per candidate unless weight says otherwise); weight nil means every
// candidate weighs 1 and every name takes one.
func assignByShare(share [][nDOF]float64, weight []int) []int {
	type pair struct {
		c, name int
		share   float64
	}
	var pairs []pair
	for c := range share {
		for j := 0; j < nDOF; j++ {
			pairs = append(pairs, pair{c, j, share[c][j]})
		}
	}
	sort.SliceStable(pairs, func(i, j int) bool { return pairs[i].share > pairs[j].share })
	out := make([]int, len(share))
	for i := range out {
		out[i] = -1
	}
	capacity, w := 1, func(int) int { return 1 }
	if weight != nil {
		capacity, w = 2, func(c int) int { return weight[c] }
	}
	var used [nDOF]int
	for _, pr := range pairs {
		if out[pr.c] >= 0 || used[pr.name]+w(pr.c) > capacity {
			continue
		}
		out[pr.c] = pr.name
		used[pr.name] += w(pr.c)
	}
	return out
}

// ratio returns the modal damping ratio of undamped mode j under C.
func (u *undamped) ratio(j int, c *[nDOF][nDOF]float64) float64 {
	if u.omega[j] == 0 {
		return math.NaN()
	}
	q := 0.0
	for a := 0; a < nDOF; a++ {
		for b := 0; b < nDOF; b++ {
			q += u.shape[j][a] * c[a][b] * u.shape[j][b]
		}
	}
	return q / (2 * u.omega[j])
}

// modes computes the damped roots of s, gives each to an undamped mode of
// u by the mass-weighted projection |φ_jᵀ M x|² of its shape x, and
// returns the seven modes in ModeNames order.
func modes(s *system, u *undamped) ([]Mode, error) {
	const n = 2 * nDOF
	a := mat.NewDense(n, n, nil)
	for i := 0; i < nDOF; i++ {
		a.Set(i, nDOF+i, 1)
		for j := 0; j < nDOF; j++ {
			a.Set(nDOF+i, j, -s.k[i][j]/s.m[i])
			a.Set(nDOF+i, nDOF+j, -s.c[i][j]/s.m[i])
		}
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenRight) {
		return nil, fmt.Errorf("model: eigen decomposition of the state matrix failed")
	}
	vals := eig.Values(nil)
	var vecs mat.CDense
	eig.VectorsTo(&vecs)

	// Candidates: one per complex pair (Im > 0), one per real root.
	var lambdas []complex128
	var weights []int
	var proj [][nDOF]float64
	for k, l := range vals {
		if imag(l) < -1e-9*cmplx.Abs(l) {
			continue
		}
		w := 2
		if math.Abs(imag(l)) <= 1e-9*cmplx.Abs(l) {
			w, l = 1, complex(real(l), 0)
		}
		var p [nDOF]float64
		total := 0.0
		for j := 0; j < nDOF; j++ {
			var dot complex128
			for i := 0; i < nDOF; i++ {
				dot += complex(u.shape[j][i]*s.m[i], 0) * vecs.At(i, k)
			}
			p[j] = abs2(dot)
			total += p[j]
		}
		for j := range p {
			p[j] /= total
		}
		lambdas, weights, proj = append(lambdas, l), append(weights, w), append(proj, p)
	}
	// Complex pairs are placed first (each fills a mode), then the real
	// roots take the places left; the capacities add up (14 roots, 7
	// modes of 2).
	owner := make([]int, len(lambdas))
	for i := range owner {
		owner[i] = -1
	}
	var used [nDOF]int
	for _, want := range []int{2, 1} {
		var sub [][nDOF]float64
		var idx, wts []int
		for c := range lambdas {
			if weights[c] == want {
				p := proj[c]
				for j := range p {
					if used[j]+want > 2 {
						p[j] = -1 // full
					}
				}
				sub, idx, wts = append(sub, p), append(idx, c), append(wts, want)
			}
		}
		for k, name := range assignByShare(sub, wts) {
			if name >= 0 {
				owner[idx[k]] = name
				used[name] += want
			}
		}
	}
	out := make([]Mode, nDOF)
	for j := range out {
		out[j] = Mode{Name: ModeNames[j], UndampedFrequencyHz: u.omega[j] / (2 * math.Pi), DampingRatio: u.ratio(j, &s.c), Overdamped: true}
	}
	for c, l := range lambdas {
		j := owner[c]
		if j < 0 {
			continue
		}
		m := &out[j]
		if weights[c] == 2 {
			m.Overdamped = false
			m.DampedFrequencyHz = imag(l) / (2 * math.Pi)
			m.PairDampingRatio = -real(l) / cmplx.Abs(l)
			continue
		}
		m.DecayRates = append(m.DecayRates, -real(l))
	}
	for j := range out {
		sort.Float64s(out[j].DecayRates)
	}
	return out, nil
}

// modeShares returns the kinetic-energy share of a mode shape x in the
// coordinates heave, pitch, roll and the in-phase and anti-phase wheel
// motions of each axle (each wheel pair's energy split by
// |x_L ± x_R|²/2).
func modeShares(s *system, x *[nDOF]complex128) [nDOF]float64 {
	var e [nDOF]float64
	e[0] = s.m[0] * abs2(x[0])
	e[1] = s.m[1] * abs2(x[1])
	e[2] = s.m[2] * abs2(x[2])
	for ax := 0; ax < 2; ax++ {
		l, r := x[dofWheel+2*ax], x[dofWheel+2*ax+1]
		mu := (s.m[dofWheel+2*ax] + s.m[dofWheel+2*ax+1]) / 2
		e[3+2*ax] = mu * abs2(l+r) / 2
		e[4+2*ax] = mu * abs2(l-r) / 2
	}
	total := 0.0
	for _, v := range e {
		total += v
	}
	if total > 0 {
		for i := range e {
			e[i] /= total
		}
	}
	return e
}

// modalRatios holds what the modal damping ratios of a road case need,
// so that Evaluate finds them without a factorisation or an allocation:
// ζ_j = base_j + Σ_i c_i·travel_ji with c_i the slopes on the damper
// coordinates (corners, then heave).
type modalRatios struct {
	base   [nDOF]float64        // φ_jᵀ C_tyre φ_j / (2 ω_j)
	travel [nDOF][nDamp]float64 // (R_i φ_j)² / (2 ω_j)
}

// newModalRatios prepares the modal damping ratios of the undamped modes
// of s (a system without suspension damping).
func newModalRatios(s *system) (modalRatios, error) {
	var r modalRatios
	u, err := undampedModes(s)
	if err != nil {
		return r, err
	}
	for j := 0; j < nDOF; j++ {
		r.base[j] = u.ratio(j, &s.c)
		for i := 0; i < nDamp; i++ {
			t := 0.0
			for a := 0; a < nDOF; a++ {
				t += s.r[i][a] * u.shape[j][a]
			}
			r.travel[j][i] = t * t / (2 * u.omega[j])
		}
	}
	return r, nil
}

// fill writes the modal damping ratios at damper slopes c to dst.
func (r *modalRatios) fill(c *[nDamp]float64, dst *[nDOF]float64) {
	for j := range dst {
		z := r.base[j]
		for i := 0; i < nDamp; i++ {
			if c[i] != 0 {
				z += c[i] * r.travel[j][i]
			}
		}
		dst[j] = z
	}
}
