package model

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Coherence of two parallel tracks on an isotropic surface, by direct
// numerical integration of the 2-D spectrum (Dodds & Robson, "The
// description of road surface roughness", J. Sound Vib. 31(2), 1973,
// 175-183). For an isotropic 2-D PSD S2(κ), κ = sqrt(n² + m²) (n along the
// track, m across, cycles/m), the PSD of one track and the cross-spectrum
// of two tracks B apart are
//
//	S1(n)  = ∫ S2(sqrt(n² + m²)) dm
//	S_B(n) = ∫ S2(sqrt(n² + m²)) cos(2π m B) dm
//
// (the 2-D spectrum integrated over the lateral wavenumber, weighted by the
// phase of the lateral separation), and γ(n) = S_B/S1. A track PSD ∝ n^-w
// comes from S2 ∝ κ^-(w+1), which the test confirms numerically too.

// isoSurface is the 2-D spectrum κ^-(w+1) (any scale; it cancels).
func isoSurface(w float64) func(kappa float64) float64 {
	return func(kappa float64) float64 { return math.Pow(kappa, -(w + 1)) }
}

// legendre16 integrates f over [lo, hi] with 16-point Gauss-Legendre (gonum).
func legendre16(f func(float64) float64, lo, hi float64) float64 {
	return quad.Fixed(f, lo, hi, 16, quad.Legendre{}, 0)
}

// trackPSD is S1(n) = 2 ∫_0^∞ S2(sqrt(n² + m²)) dm, with m = n tan t.
func trackPSD(s2 func(float64) float64, n float64) float64 {
	f := func(t float64) float64 {
		c := math.Cos(t)
		if c <= 0 {
			return 0
		}
		m := n * math.Tan(t)
		return s2(math.Hypot(n, m)) * n / (c * c)
	}
	const panels = 64
	sum := 0.0
	for p := 0; p < panels; p++ {
		sum += legendre16(f, math.Pi/2*float64(p)/panels, math.Pi/2*float64(p+1)/panels)
	}
	return 2 * sum
}

// crossPSD is S_B(n) = 2 ∫_0^∞ S2(sqrt(n² + m²)) cos(2π m B) dm for
// S2 = κ^-(w+1), by Gauss-Legendre on panels no longer than a quarter
// period (and geometrically growing near m = 0 where S2 varies on the
// scale n), up to a cut-off M at a zero of the cosine with 2π M B ≥ 4000,
// plus the tail from two integrations by parts:
//
//	∫_M^∞ g cos(km) dm = −g(M) sin(kM)/k + g''(M) sin(kM)/k³ + O(g⁗/k⁵).
func crossPSD(w, n, b float64) float64 {
	p := (w + 1) / 2
	g := func(m float64) float64 { return math.Pow(n*n+m*m, -p) }
	gpp := func(m float64) float64 {
		q := n*n + m*m
		return -2*p*math.Pow(q, -p-1) + 4*p*(p+1)*m*m*math.Pow(q, -p-2)
	}
	k := 2 * math.Pi * b
	quarter := math.Pi / (2 * k)
	cut := (math.Ceil(4000/(math.Pi)) + 0.5) * math.Pi / k
	f := func(m float64) float64 { return g(m) * math.Cos(k*m) }
	sum := 0.0
	for lo := 0.0; lo < cut; {
		hi := math.Min(cut, lo+math.Min(quarter, 0.25*(n+lo)))
		sum += legendre16(f, lo, hi)
		lo = hi
	}
	s := math.Sin(k * cut)
	sum += -g(cut)*s/k + gpp(cut)*s/(k*k*k)
	return 2 * sum
}

// TestIsotropicCoherence compares IsotropicCoherence with the direct
// integration above for waviness 1, 2, 2.5 and 3 over x = 2π n B from 1e-3
// to 20. Tolerance absolute 1e-9 (γ lies in [0, 1]): the direct
// integration is good to about 1e-12, and the model's trapezoid rule on
// the integral of K_ν to better than that.
func TestIsotropicCoherence(t *testing.T) {
	t.Parallel()
	const tol = 1e-9
	const b = 1.6 // track (m)
	for _, w := range []float64{1, 2, 2.5, 3} {
		w := w
		t.Run(fmt.Sprintf("w=%g", w), func(t *testing.T) {
			t.Parallel()
			s2 := isoSurface(w)
			// The track PSD of S2 = κ^-(w+1) falls as n^-w.
			r := trackPSD(s2, 0.2) / trackPSD(s2, 0.1)
			if e := relErr(r, math.Pow(2, -w)); e > 1e-10 {
				t.Errorf("track PSD ratio S1(0.2)/S1(0.1) = %.12g, want 2^-w = %.12g", r, math.Pow(2, -w))
			}
			worst := 0.0
			for _, x := range []float64{1e-3, 1e-2, 0.1, 0.3, 1, 2, 4, 8, 20} {
				n := x / (2 * math.Pi * b)
				want := crossPSD(w, n, b) / trackPSD(s2, n)
				got := IsotropicCoherence(n, b, w)
				worst = math.Max(worst, math.Abs(got-want))
				if math.Abs(got-want) > tol {
					t.Errorf("x = %g: IsotropicCoherence %.12g, 2-D integral %.12g, diff %.2g", x, got, want, got-want)
				}
			}
			t.Logf("worst absolute difference %.2g", worst)
		})
	}
}

// TestIsotropicCoherenceHalfInteger checks the closed forms at half-integer
// order, K_½(x) = sqrt(π/2x) e^-x and K_{3/2}(x) = sqrt(π/2x) e^-x (1 + 1/x)
// (Abramowitz & Stegun 10.2.17): γ = e^-x for w = 1 and (1 + x) e^-x for
// w = 3. Tolerance absolute 1e-12, relative 1e-9 where γ is tiny.
func TestIsotropicCoherenceHalfInteger(t *testing.T) {
	t.Parallel()
	for _, x := range []float64{1e-4, 0.01, 0.2, 0.7, 1, 3, 10, 30} {
		for _, tc := range []struct {
			w    float64
			want float64
		}{{1, math.Exp(-x)}, {3, (1 + x) * math.Exp(-x)}} {
			n := x / (2 * math.Pi * 1.5)
			got := IsotropicCoherence(n, 1.5, tc.w)
			if math.Abs(got-tc.want) > 1e-12 && relErr(got, tc.want) > 1e-9 {
				t.Errorf("w = %g, x = %g: γ = %.15g, closed form %.15g", tc.w, x, got, tc.want)
			}
		}
	}
	// γ → 1 as the tracks merge and falls monotonically with n.
	prev := 1.0
	for _, n := range []float64{1e-6, 1e-3, 0.01, 0.1, 0.5, 2} {
		g := IsotropicCoherence(n, 1.6, 2.4)
		if g > prev+1e-15 || g < 0 {
			t.Errorf("γ(%g) = %g not in [0, γ(previous) = %g]", n, g, prev)
		}
		prev = g
	}
}
