package model

import (
	"math"
	"testing"
)

// A table sampled from an ISO 8608 power law (ISO 8608:1995, Gd(n) =
// Gd(n0)(n/n0)^-w) extends itself beyond its ends exactly: the fitted
// end exponent is w. Tolerance: a least-squares fit to exact points,
// rounding only.
func TestMeasuredTableExtendsAPowerLaw(t *testing.T) {
	t.Parallel()
	const relTol = 1e-12
	for _, w := range []float64{1.5, 2, 2.5, 3.2} {
		iso := RoadCase{Speed: 30, Gd0: 5e-6, Waviness: w}
		var ns, gs []float64
		for n := 0.05; n < 3; n *= 1.3 {
			g, _ := iso.SpatialPSD(n)
			ns, gs = append(ns, n), append(gs, g)
		}
		rc := RoadCase{Speed: 30, Measured: &MeasuredSpectrum{N: ns, Left: gs}}
		for _, n := range []float64{0.001, 0.01, 0.049, 0.7, 3.5, 20} {
			got, _ := rc.SpatialPSD(n)
			want, _ := iso.SpatialPSD(n)
			if math.Abs(got-want) > relTol*want {
				t.Errorf("w=%g n=%g: %g, want %g", w, n, got, want)
			}
		}
	}
	// Noisy ends: the exponent is held in [1, 4] (a rising end is extended
	// as n^-1, a cliff as n^-4).
	rc := RoadCase{Speed: 30, Measured: &MeasuredSpectrum{
		N: []float64{0.1, 0.2, 0.4, 0.8, 1.6, 3.2}, Left: []float64{1e-6, 2e-6, 3e-7, 8e-8, 1e-9, 1e-12}}}
	lo, _ := rc.SpatialPSD(0.05)
	if r := lo / 1e-6; math.Abs(r-2) > 1e-12 {
		t.Errorf("rising bottom end extended by factor %g over an octave, want 2 (w = 1)", r)
	}
	hi, _ := rc.SpatialPSD(6.4)
	if r := hi / 1e-12; math.Abs(r-1.0/16) > 1e-12 {
		t.Errorf("cliff at the top extended by factor %g over an octave, want 1/16 (w = 4)", r)
	}
}

// Below its first point a coherence table rises to full coherence, the
// long-wavelength limit of every track model (Dodds & Robson 1973: γ -> 1
// as n·B -> 0), continuously at the first point.
func TestCoherenceTableLongWavelengths(t *testing.T) {
	t.Parallel()
	rc := RoadCase{Coherence: Coherence{Kind: CoherenceTable, N: []float64{0.05, 1}, Gamma: []float64{0.4, 0.1}}}
	if g := rc.CoherenceAt(0.05, 1.6); math.Abs(g-0.4) > 1e-15 {
		t.Errorf("at the first point γ = %g, want 0.4", g)
	}
	if g := rc.CoherenceAt(0.025, 1.6); math.Abs(g-(1-0.6/4)) > 1e-15 {
		t.Errorf("an octave below γ = %g, want 0.85", g)
	}
	if g := rc.CoherenceAt(1e-6, 1.6); math.Abs(g-1) > 1e-8 {
		t.Errorf("at very long wavelengths γ = %g, want 1", g)
	}
	if g := rc.CoherenceAt(5, 1.6); g != 0.1 {
		t.Errorf("above the table γ = %g, want its last value 0.1", g)
	}
}
