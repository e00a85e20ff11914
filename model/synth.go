package model

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"gonum.org/v1/gonum/dsp/fourier"
)

// SynthOptions describe a synthesised profile.
type SynthOptions struct {
	// Length is the record length (m), which is also the period of the
	// realisation: the road repeats after Length. The sample count
	// Length/Spacing is rounded up to the next whole number whose only
	// prime factors are 2, 3 and 5 (for the FFT), so the length used can
	// be slightly longer; Profile.Length reports it.
	Length  float64
	Spacing float64 // sample spacing Δx (m)
	// MaxN is the highest spatial frequency synthesised (cycles/m); 0, or
	// a value at or above the Nyquist frequency 1/(2Δx), means the last
	// bin below the Nyquist frequency.
	MaxN float64
	// Track is the lateral distance between the left and right tracks
	// (m), used by the coherence model; it must be > 0 unless OneTrack or
	// the case's coherence does not depend on it (full, table, measured).
	Track float64
	// OneTrack writes the left track only.
	OneTrack bool
}

// SynthesiseProfile returns a realisation of the road case's left and
// right tracks by the spectral representation method (Shinozuka & Deodatis
// 1991, "Simulation of stochastic processes by spectral representation",
// Appl. Mech. Rev. 44(4):191-204, doi:10.1115/1.3119501, DOI from
// memory), in its multivariate form with a Cholesky factor of the
// cross-spectral matrix (Shinozuka 1971, "Simulation of multivariate and multidimensional
// processes", J. Acoust. Soc. Am. 49(1B):357-368; citation from memory).
//
// On the bins n_k = k Δn, Δn = 1/L, k = 1..K (no mean), with the
// one-sided PSDs G_L, G_R and the coherence γ of the case,
//
//	[G_L, γ sqrt(G_L G_R); γ sqrt(G_L G_R), G_R] = [l11 0; l21 l22][l11 0; l21 l22]ᵀ
//	z_L(x) = Σ_k sqrt(2Δn) l11 cos(2π n_k x + φ1_k)
//	z_R(x) = Σ_k sqrt(2Δn) (l21 cos(2π n_k x + φ1_k) + l22 cos(2π n_k x + φ2_k))
//
// with the phases φ independent and uniform on [0, 2π) and drawn from rnd
// in the order φ1_1, φ2_1, φ1_2, ... (so a longer MaxN keeps the lower
// bins of the same seed). The amplitudes are deterministic: over one
// period each track's mean square is Σ_k G(n_k) Δn exactly, and the
// process is Gaussian only in the limit of many bins (Shinozuka &
// Deodatis 1991, sec. on the properties of the simulated process). The
// sum is evaluated by one inverse FFT per track (gonum dsp/fourier).
func SynthesiseProfile(rc *RoadCase, opt SynthOptions, rnd *rand.Rand) (*Profile, error) {
	var p problems
	p.merge("road_case.", rc.Validate())
	p.positive("length_m", opt.Length)
	p.positive("spacing_m", opt.Spacing)
	p.nonNegative("max_n_cycles_per_m", opt.MaxN)
	p.nonNegative("track_m", opt.Track)
	if !opt.OneTrack && opt.Track == 0 && coherenceNeedsTrack(rc) {
		p.add("track_m", "must be > 0: the case's coherence model depends on the distance between the tracks")
	}
	if rnd == nil {
		p.add("seed", "a seeded random source is needed")
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	m := smoothAbove(int(math.Ceil(opt.Length/opt.Spacing*(1-1e-12))), 16)
	if m > 1<<26 {
		return nil, &ValidationError{Problems: []FieldError{{Field: "length_m", Reason: fmt.Sprintf("gives %d samples, more than %d", m, 1<<26)}}}
	}
	length := float64(m) * opt.Spacing
	kmax := synthBins(m, length, opt.MaxN)
	rcf := newRoadCoefficients(rc, opt.Track, length, kmax, rnd)
	fft := fourier.NewFFT(m)
	coeff := make([]complex128, m/2+1)
	out := &Profile{Spacing: opt.Spacing, Left: make([]float64, m)}
	rcf.sample(fft, coeff, rcf.left, nil, out.Left)
	if !opt.OneTrack {
		out.Right = make([]float64, m)
		rcf.sample(fft, coeff, rcf.right, nil, out.Right)
	}
	out.Comments = []string{fmt.Sprintf("synthesised road %q: spectral representation, %d bins up to %.6g cycles/m, period %.6g m", rc.Name, kmax, float64(kmax)/length, length)}
	return out, nil
}

// coherenceNeedsTrack reports whether the case's γ(n) depends on the track.
func coherenceNeedsTrack(rc *RoadCase) bool {
	switch rc.Coherence.Kind {
	case CoherenceFull, CoherenceTable:
		return false
	case CoherenceAuto:
		return rc.Measured == nil || rc.Measured.Coherence == nil
	}
	return true
}

// synthBins returns the highest bin K below the Nyquist bin m/2 and not
// above maxN (0: no limit), for m samples over length.
func synthBins(m int, length, maxN float64) int {
	k := (m - 1) / 2
	if maxN > 0 {
		k = min(k, int(math.Floor(maxN*length*(1+1e-12))))
	}
	return k
}

// roadCoefficients are the Fourier coefficients of one road realisation
// of period length: track(x) = Σ_k 2 Re(c_k e^(2πi k x/length)), i.e.
// c_k = ½ sqrt(2Δn) (l11 e^(iφ1)) for the left track (see
// SynthesiseProfile); c_0 = 0.
type roadCoefficients struct {
	length      float64
	left, right []complex128 // k = 0..K
}

func newRoadCoefficients(rc *RoadCase, track, length float64, kmax int, rnd *rand.Rand) *roadCoefficients {
	r := &roadCoefficients{length: length, left: make([]complex128, kmax+1), right: make([]complex128, kmax+1)}
	dn := 1 / length
	a := 0.5 * math.Sqrt(2*dn)
	coherence := coherenceFunc(rc, track, dn, float64(kmax)*dn)
	for k := 1; k <= kmax; k++ {
		e1 := cmplx.Rect(1, 2*math.Pi*rnd.Float64())
		e2 := cmplx.Rect(1, 2*math.Pi*rnd.Float64())
		n := float64(k) * dn
		sl, sr := rc.SpatialPSD(n)
		gam := coherence(n)
		// Cholesky factor in closed form, l21 = γ sqrt(G_R) and
		// l22 = sqrt(G_R (1 - γ²)), which keeps l22 exactly 0 at γ = ±1.
		l11 := math.Sqrt(sl)
		l21 := gam * math.Sqrt(sr)
		l22 := math.Sqrt(math.Max(0, sr*(1-gam*gam)))
		r.left[k] = complex(a*l11, 0) * e1
		r.right[k] = complex(a*l21, 0)*e1 + complex(a*l22, 0)*e2
	}
	return r
}

// coherenceStep is the node spacing in ln n of the tabulated isotropic
// coherence: linear interpolation then errs by at most (h²/8)·max|γ_uu|,
// γ_uu = d²γ/du² with u = ln n; for w = 2, γ = x K_1(x) gives
// γ_uu = x³K_1(x) - 2x²K_0(x), at most about 0.5, so the error is < 1e-5.
const coherenceStep = 0.01

// coherenceFunc returns γ(n) on [nlo, nhi] for the case: CoherenceAt
// itself, except for the isotropic model (a Bessel-function quadrature of
// some microseconds a call), which it tabulates at nodes coherenceStep
// apart in ln n and interpolates linearly in ln n.
func coherenceFunc(rc *RoadCase, track, nlo, nhi float64) func(n float64) float64 {
	direct := func(n float64) float64 { return rc.CoherenceAt(n, track) }
	if !(nhi > nlo) || !(nlo > 0) {
		return direct
	}
	switch rc.Coherence.Kind {
	case CoherenceAuto:
		if rc.Measured != nil && rc.Measured.Coherence != nil {
			return direct
		}
	case CoherenceIsotropic:
	default:
		return direct
	}
	l0 := math.Log(nlo)
	nodes := int(math.Ceil((math.Log(nhi)-l0)/coherenceStep)) + 1
	if nodes < 2 {
		return direct
	}
	tab := make([]float64, nodes+1)
	for j := range tab {
		tab[j] = rc.CoherenceAt(math.Exp(l0+float64(j)*coherenceStep), track)
		if tab[j] < 1e-300 {
			// x^ν K_ν(x) falls monotonically (its derivative is
			// -x^ν K_(ν-1)(x)), so the rest of the table is 0 too.
			break
		}
	}
	return func(n float64) float64 {
		u := (math.Log(n) - l0) / coherenceStep
		j := int(u)
		if j < 0 {
			return tab[0]
		}
		if j >= nodes {
			return tab[nodes]
		}
		t := u - float64(j)
		return tab[j] + t*(tab[j+1]-tab[j])
	}
}

// sample writes the track with coefficients c, each multiplied by
// factor(n_k) when factor is not nil, at len(dst) points over one period.
// coeff is scratch of length len(dst)/2+1, fft of length len(dst); the
// highest bin of c must lie below len(dst)/2.
func (r *roadCoefficients) sample(fft *fourier.FFT, coeff, c []complex128, factor func(n float64) complex128, dst []float64) {
	clear(coeff)
	for k := 1; k < len(c); k++ {
		v := c[k]
		if factor != nil {
			v *= factor(float64(k) / r.length)
		}
		coeff[k] = v
	}
	fft.Sequence(dst, coeff)
}

// tyreInputs samples what the four tyres of v follow at speed on this
// road, at m instants over one period length/speed: for tyre i the
// enveloped road w_i (m) and its rate ẇ_i (m/s), interleaved as
// out[8j+i] = w_i(t_j), out[8j+4+i] = ẇ_i(t_j), t_j = j·length/(speed·m).
// The front tyres run on the tracks at x = V t, the rear ones a wheelbase
// behind, w_rear(t) = w_front(t - L/V), which multiplies the coefficient
// of n by e^(-2πi n L); each tyre's envelope multiplies it by
// 1/(1 + i n ℓ) and the rate by 2πi n V, as in the frequency-domain model.
func (r *roadCoefficients) tyreInputs(v *Vehicle, speed float64, m int) []float64 {
	fft := fourier.NewFFT(m)
	coeff := make([]complex128, m/2+1)
	tmp := make([]float64, m)
	out := make([]float64, 8*m)
	l := v.Wheelbase()
	for i := 0; i < 4; i++ {
		c := r.left
		if i%2 == 1 {
			c = r.right
		}
		env := v.Corners[i].TyreEnvelopeLength
		rear := i >= 2
		base := func(n float64) complex128 {
			g := envelope(n, env)
			if rear {
				g *= cmplx.Rect(1, -2*math.Pi*n*l)
			}
			return g
		}
		r.sample(fft, coeff, c, base, tmp)
		for j, x := range tmp {
			out[8*j+i] = x
		}
		r.sample(fft, coeff, c, func(n float64) complex128 {
			return base(n) * complex(0, 2*math.Pi*n*speed)
		}, tmp)
		for j, x := range tmp {
			out[8*j+4+i] = x
		}
	}
	return out
}

// smoothAbove returns the smallest n' >= max(n, lo) whose only prime
// factors are 2, 3 and 5.
func smoothAbove(n, lo int) int {
	n = max(n, lo)
	for ; ; n++ {
		if smooth235(n) {
			return n
		}
	}
}
