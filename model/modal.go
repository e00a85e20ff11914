package model

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Mode is one vibration mode of the linear car.
type Mode struct {
	// Name is heave, pitch, roll, front hop, front anti-phase hop, rear hop
	// or rear anti-phase hop: the coordinate holding most of the mode's
	// kinetic energy.
	Name string
	// FrequencyHz is the natural frequency ω_n/(2π): |λ|/(2π) for a complex
	// pair λ, sqrt(λ1 λ2)/(2π) for an overdamped pair of real roots.
	FrequencyHz float64
	// DampedFrequencyHz is Im(λ)/(2π); 0 when overdamped.
	DampedFrequencyHz float64
	// DampingRatio is ζ = -Re(λ)/|λ|, or -(λ1+λ2)/(2 sqrt(λ1 λ2)) when
	// overdamped (then ζ >= 1).
	DampingRatio float64
	Overdamped   bool
}

// modeNames are the coordinates modes are named after, in the order of
// modeShares.
var modeNames = [nDOF]string{"heave", "pitch", "roll", "front hop", "front anti-phase hop", "rear hop", "rear anti-phase hop"}

// ModalAnalysis returns the modes of the car with each damper replaced by
// its low-speed mean slope (c_bump + c_rebound)/2 at the wheel, at a speed
// (which sets the aero stiffness). The modes are the roots of
// det(λ² M + λ C + K) = 0, found as eigenvalues of the 14×14 state matrix
//
//	A = [[0, I], [-M⁻¹K, -M⁻¹C]]
//
// (gonum mat.Eigen), and named by where their kinetic energy lies.
func ModalAnalysis(v *Vehicle, s *Setup, speed float64) ([]Mode, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.merge("setup.", s.Validate())
	if err := p.err(); err != nil {
		return nil, err
	}
	d := v.wheelDampers(s)
	var c [4]float64
	for i := range c {
		c[i] = (d[i].cb + d[i].cr) / 2
	}
	op, err := v.operatingPoint(speed)
	if err != nil {
		return nil, err
	}
	base := newSystem(v, &op.AeroStiffness)
	sys := base.withDamping(c)
	return modes(&sys)
}

// modes computes and names the modes of a damped system.
func modes(s *system) ([]Mode, error) {
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
	type cand struct {
		roots  int
		lambda complex128
		share  [nDOF]float64
	}
	var cands []cand
	for k, l := range vals {
		if imag(l) < -1e-9*cmplx.Abs(l) {
			continue
		}
		cd := cand{roots: 2, lambda: l}
		if math.Abs(imag(l)) <= 1e-9*cmplx.Abs(l) {
			cd.roots = 1
			cd.lambda = complex(real(l), 0)
		}
		var x [nDOF]complex128
		for i := 0; i < nDOF; i++ {
			x[i] = vecs.At(i, k)
		}
		cd.share = modeShares(s, &x)
		cands = append(cands, cd)
	}
	// Greedy assignment by energy share, two roots per name: complex
	// pairs first, each to its own name, then the real roots of the
	// overdamped modes two by two to the names left. The capacities add
	// up (14 roots, 7 names), so every name ends with one pair.
	type pair struct {
		c, name int
		share   float64
	}
	var roots [nDOF][]complex128
	var nroots [nDOF]int
	assigned := make([]bool, len(cands))
	for _, wantRoots := range []int{2, 1} {
		var pairs []pair
		for ci, cd := range cands {
			if cd.roots != wantRoots {
				continue
			}
			for j := 0; j < nDOF; j++ {
				pairs = append(pairs, pair{ci, j, cd.share[j]})
			}
		}
		sort.SliceStable(pairs, func(i, j int) bool { return pairs[i].share > pairs[j].share })
		for _, pr := range pairs {
			cd := cands[pr.c]
			if assigned[pr.c] || nroots[pr.name]+cd.roots > 2 {
				continue
			}
			assigned[pr.c] = true
			nroots[pr.name] += cd.roots
			roots[pr.name] = append(roots[pr.name], cd.lambda)
		}
	}
	var out []Mode
	for j := 0; j < nDOF; j++ {
		r := roots[j]
		m := Mode{Name: modeNames[j]}
		switch {
		case len(r) == 1 && imag(r[0]) != 0:
			wn := cmplx.Abs(r[0])
			m.FrequencyHz = wn / (2 * math.Pi)
			m.DampedFrequencyHz = imag(r[0]) / (2 * math.Pi)
			m.DampingRatio = -real(r[0]) / wn
		case len(r) == 2:
			l1, l2 := real(r[0]), real(r[1])
			wn := math.Sqrt(l1 * l2)
			m.FrequencyHz = wn / (2 * math.Pi)
			m.DampingRatio = -(l1 + l2) / (2 * wn)
			m.Overdamped = true
		default:
			continue
		}
		out = append(out, m)
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
