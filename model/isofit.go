package model

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
)

// ISOFit is an ISO 8608 power law fitted to an estimated spectrum,
// Gd(n) = Gd0 (n/n0)^-w with n0 = 0.1 cycles/m (ISO 8608:1995,
// "Mechanical vibration - Road surface profiles - Reporting of measured
// data", the fitted displacement PSD).
type ISOFit struct {
	Gd0      float64 // Gd(n0) (m³ at n0 = 0.1 cycles/m)
	Waviness float64 // w (-)
	Class    string  // ISO 8608 class whose limits hold Gd0 (ClassifyISO)
	MinN     float64 // lowest bin fitted (cycles/m)
	MaxN     float64 // highest bin fitted (cycles/m)
	Points   int     // bins fitted

	// StdErrLogGd0 and StdErrWaviness are the standard errors of ln Gd0
	// and of w expected from the estimator's own scatter (see FitISO):
	// what a perfect power-law road measured this way would show.
	StdErrLogGd0   float64
	StdErrWaviness float64
	// ResidualRMS is the RMS of the fit's residuals in ln Gd (-); well
	// above sqrt(ψ'(ν/2)) the road is not a power law over the band.
	ResidualRMS float64
}

// RoadCase returns a road case with the fitted power law (not the class
// mean) at the given speed (m/s).
func (f ISOFit) RoadCase(name string, speed float64) RoadCase {
	return RoadCase{Name: name, Speed: speed, Gd0: f.Gd0, Waviness: f.Waviness}
}

// FitISO fits the ISO 8608 power law to the Welch spectrum's tracks over
// the band [lo, hi] (cycles/m); with two tracks it fits their mean PSD
// (½(G_L + G_R), which has at least the degrees of freedom of one track;
// the fit's standard errors assume only those). Start the band at the
// fourth bin or above: the per-segment detrend takes power from the
// first two or three.
//
// Resolution bias. The Hann window smooths the spectrum with its spectral
// window |W|², whose second moment is ∫|w'|²/(4π²∫w²) = 1/3 bin² for
// w = sin²(πt) (Parseval for w'), so E[Ĝ] ≈ G + ½(Δn²/3) d²G/dn² (the
// resolution bias of Bendat & Piersol, "Random Data", 4th ed., ch. 8,
// for a smoothing window of that second moment; from memory). For
// G ∝ n^-w at bin k this is the factor 1 + w(w+1)/(6k²), 4% at k = 5 for
// w = 2 and convex, so it raises the low bins and would steepen the fit.
// FitISO divides it out with the waviness of a first fit and fits again.
func (s *Spectrum) FitISO(lo, hi float64) (ISOFit, error) {
	g := s.Left
	if s.Right != nil {
		g = make([]float64, len(s.Left))
		for k := range g {
			g[k] = (s.Left[k] + s.Right[k]) / 2
		}
	}
	infl := hannBinInflation(s.SegmentSamples)
	dof := 2 * s.EquivalentSegments
	fit, err := FitISO(s.N, g, lo, hi, dof, infl)
	if err != nil {
		return fit, err
	}
	corrected := make([]float64, len(g))
	for k := range g {
		b := 1.0
		if k > 0 {
			b += fit.Waviness * (fit.Waviness + 1) / (6 * float64(k) * float64(k))
		}
		corrected[k] = g[k] / b
	}
	return FitISO(s.N, corrected, lo, hi, dof, infl)
}

// FitISO fits ln G_k = ln Gd0 - w ln(n_k/n0) + e_k by ordinary least
// squares over the bins with lo <= n_k <= hi, for a spectrum estimated
// with dof degrees of freedom per bin (2·K_eff for Welch; 0 means no
// correction), whose neighbouring bins are correlated so that the
// residual variance of a mean over bins is inflation times that of
// independent bins (1 for independent bins; see hannBinInflation).
//
// Each bin is G_k χ²_ν/ν with ν = dof, so ln Ĝ_k has the mean
// ln G_k + ψ(ν/2) - ln(ν/2) and the variance ψ'(ν/2) (ψ the digamma
// function; the log of a gamma variable, e.g. Johnson, Kotz &
// Balakrishnan, "Continuous Univariate Distributions", vol. 1, 2nd ed.,
// Wiley 1994, ch. 17; chapter from memory). The bias
// ψ(ν/2) - ln(ν/2) ≈ -1/ν is removed from ln Gd0. With u_k = ln(n_k/n0),
// ū their mean, S = Σ (u_k - ū)² and σ² = ψ'(ν/2)·inflation, the
// standard errors are
//
//	se(w) = σ/sqrt(S),   se(ln Gd0) = σ sqrt(1/M + ū²/S)
//
// (the textbook OLS formulas, M bins). The classes are those of ISO 8608
// (ClassifyISO).
func FitISO(n, g []float64, lo, hi, dof, inflation float64) (ISOFit, error) {
	if len(n) != len(g) {
		return ISOFit{}, fmt.Errorf("model: iso fit: %d frequencies but %d PSD values", len(n), len(g))
	}
	if !(lo > 0) || !(hi > lo) {
		return ISOFit{}, fmt.Errorf("model: iso fit: the band must have 0 < lo < hi, got [%g, %g] cycles/m", lo, hi)
	}
	if dof < 0 || inflation < 0 {
		return ISOFit{}, fmt.Errorf("model: iso fit: dof and inflation must be >= 0, got %g and %g", dof, inflation)
	}
	var su, sy float64
	m := 0
	fit := ISOFit{MinN: math.Inf(1)}
	for k, nk := range n {
		if nk < lo || nk > hi {
			continue
		}
		if !(g[k] > 0) {
			return ISOFit{}, fmt.Errorf("model: iso fit: the PSD at %g cycles/m is %g, it must be > 0", nk, g[k])
		}
		su += math.Log(nk / ISO8608N0)
		sy += math.Log(g[k])
		m++
		fit.MinN = math.Min(fit.MinN, nk)
		fit.MaxN = math.Max(fit.MaxN, nk)
	}
	if m < 3 {
		return ISOFit{}, fmt.Errorf("model: iso fit: the band [%g, %g] cycles/m holds %d bins, at least 3 are needed", lo, hi, m)
	}
	ub, yb := su/float64(m), sy/float64(m)
	var suu, suy float64
	for k, nk := range n {
		if nk < lo || nk > hi {
			continue
		}
		du := math.Log(nk/ISO8608N0) - ub
		suu += du * du
		suy += du * (math.Log(g[k]) - yb)
	}
	slope := suy / suu
	icpt := yb - slope*ub
	var ss float64
	for k, nk := range n {
		if nk < lo || nk > hi {
			continue
		}
		r := math.Log(g[k]) - icpt - slope*math.Log(nk/ISO8608N0)
		ss += r * r
	}
	bias, sigma2 := 0.0, 0.0
	if dof > 0 {
		bias = mathext.Digamma(dof/2) - math.Log(dof/2)
		sigma2 = mathext.Zeta(2, dof/2) * math.Max(inflation, 1) // ψ'(x) = ζ(2, x)
	}
	fit.Gd0 = math.Exp(icpt - bias)
	fit.Waviness = -slope
	fit.Class = ClassifyISO(fit.Gd0)
	fit.Points = m
	fit.ResidualRMS = math.Sqrt(ss / float64(m))
	fit.StdErrWaviness = math.Sqrt(sigma2 / suu)
	fit.StdErrLogGd0 = math.Sqrt(sigma2 * (1/float64(m) + ub*ub/suu))
	return fit, nil
}

// hannBinInflation is 1 + 2 Σ_m r_m for the periodic Hann window of n
// samples, r_m = |Σ_j w_j² e^(-2πijm/n)|²/(Σ_j w_j²)² the correlation of
// periodogram bins m apart for white Gaussian data (the same covariance
// argument as in Welch). For Hann, w² = 3/8 - ½cos + ⅛cos 2(·), so
// r_1 = (2/3)² and r_2 = (1/6)²: the inflation is 1 + 8/9 + 1/18 = 1.944.
// It is the factor by which the variance of a mean over many bins exceeds
// that of independent bins (a first-order approximation for the log
// periodogram).
func hannBinInflation(n int) float64 {
	w := hannPeriodic(n)
	u := 0.0
	for _, v := range w {
		u += v * v
	}
	infl := 1.0
	for m := 1; m <= 3 && m < n; m++ {
		var re, im float64
		for j, v := range w {
			a := 2 * math.Pi * float64(j*m) / float64(n)
			re += v * v * math.Cos(a)
			im -= v * v * math.Sin(a)
		}
		infl += 2 * (re*re + im*im) / (u * u)
	}
	return infl
}
