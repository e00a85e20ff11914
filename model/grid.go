package model

import (
	"math"
)

// Grid is the log-spaced frequency grid on which output spectra are
// integrated.
//
// Variances are ∫_0^∞ S(f) df. On the grid the integral is taken in
// u = ln f, ∫ S(f) f du, by Simpson's rule (Points must be odd), and the
// parts below MinHz and above MaxHz are added analytically from the local
// power law of each output spectrum at the grid's ends: with S ∝ f^-p at
// the top (p > 1), ∫_fmax^∞ S df = S(fmax) fmax/(p-1); with S ∝ f^q at the
// bottom (q > -1), ∫_0^fmin S df = S(fmin) fmin/(q+1). The tails matter:
// on an n^-2 road the tyre-force spectrum falls only as f^-2 above wheel
// hop, and a grid cut at 50 Hz without the tail loses a few per cent of
// the tyre-load standard deviation.
type Grid struct {
	MinHz  float64 // lowest frequency (Hz)
	MaxHz  float64 // highest frequency (Hz)
	Points int     // number of points, odd, >= 5
}

// DefaultGrid is the grid used when none is given.
var DefaultGrid = Grid{MinHz: 0.1, MaxHz: 250, Points: 241}

// Validate checks the grid and names every bad field.
func (g Grid) Validate() error {
	var p problems
	p.in("min_hz", g.MinHz, "Grid.min_hz")
	p.in("max_hz", g.MaxHz, "Grid.max_hz")
	if len(p.list) == 0 && g.MaxHz <= 2*g.MinHz {
		p.add("max_hz", "must be more than twice min_hz (%g Hz), got %g", g.MinHz, g.MaxHz)
	}
	if g.Points < 5 || g.Points%2 == 0 || g.Points > 20001 {
		p.add("points", "must be odd and in [5, 20001] for Simpson's rule, got %d", g.Points)
	}
	return p.err()
}

// Frequencies returns the grid's frequencies (Hz).
func (g Grid) Frequencies() []float64 {
	f := make([]float64, g.Points)
	l0, l1 := math.Log(g.MinHz), math.Log(g.MaxHz)
	for k := range f {
		f[k] = math.Exp(l0 + (l1-l0)*float64(k)/float64(g.Points-1))
	}
	f[0], f[g.Points-1] = g.MinHz, g.MaxHz
	return f
}

// weights returns w_k with ∫_fmin^fmax S df ≈ Σ w_k S(f_k) (Simpson in ln f).
func (g Grid) weights(f []float64) []float64 {
	h := (math.Log(g.MaxHz) - math.Log(g.MinHz)) / float64(g.Points-1)
	w := make([]float64, len(f))
	for k := range f {
		c := 2.0
		switch {
		case k == 0 || k == len(f)-1:
			c = 1
		case k%2 == 1:
			c = 4
		}
		w[k] = c * h / 3 * f[k]
	}
	return w
}

// bandWeights returns trapezoid weights (in f, via ln f) of four bands
// of equal width in ln f at the ends of the grid, each about one octave:
// bands 0 and 1 at the bottom (0 lowest), 2 and 3 at the top (3 highest).
// The band integrals I_k ≈ Σ_j band[k][j] S(f_j) fix the local power law
// used for the tails without being misled by ripple (the wheelbase delay
// makes pitch and ride-height spectra oscillate with period V/L in f).
func (g Grid) bandWeights(f []float64) (bands [4][]float64, width float64) {
	h := (math.Log(g.MaxHz) - math.Log(g.MinHz)) / float64(g.Points-1)
	m := int(math.Round(math.Ln2 / h))
	if m < 1 {
		m = 1
	}
	if 2*m > g.Points-1 {
		m = (g.Points - 1) / 2
	}
	n := len(f)
	for b := range bands {
		bands[b] = make([]float64, n)
	}
	fill := func(w []float64, lo, hi int) {
		for k := lo; k <= hi; k++ {
			c := 1.0
			if k == lo || k == hi {
				c = 0.5
			}
			w[k] = c * h * f[k]
		}
	}
	fill(bands[0], 0, m)
	fill(bands[1], m, 2*m)
	fill(bands[2], n-1-2*m, n-1-m)
	fill(bands[3], n-1-m, n-1)
	return bands, float64(m) * h
}

// tail extrapolates a spectrum beyond a grid end from the integrals over
// the outermost band (edge) and the band next to it (next), both of width
// W in ln f. For a power law the ratio R = edge/next is e^(-W α) with α > 0
// for an integrable tail (α = p - 1 above, q + 1 below), and the tail is
//
//	∫ beyond the end = edge · R/(1 - R).
//
// R >= 1 means the spectrum does not fall off beyond the end.
func tail(edge, next float64) (float64, bool) {
	if edge <= 0 {
		return 0, true
	}
	r := edge / next
	if !(r < 1) {
		return 0, false
	}
	return edge * r / (1 - r), true
}
