package model

import (
	"math"
	"math/cmplx"
	"testing"
)

// flatSpectrum is a two-track spectrum with bins n_k = k·0.01 cycles/m,
// k = 0..n-1, flat PSDs 1e-6 and 3e-6 m³ and a cross-spectrum of
// coherence 0.5 at every bin.
func flatSpectrum(n int, spacing float64) *Spectrum {
	s := &Spectrum{Spacing: spacing}
	for k := range n {
		s.N = append(s.N, 0.01*float64(k))
		s.Left = append(s.Left, 1e-6)
		s.Right = append(s.Right, 3e-6)
		s.Cross = append(s.Cross, cmplx.Rect(0.5*math.Sqrt(3e-12), 0))
	}
	return s
}

// Third-octave bands and the default fit band on a flat spectrum, worked
// by hand: the band centred on n0 = 0.1 cycles/m runs from
// 0.1·2^(-1/6) = 0.0891 to 0.1·2^(1/6) = 0.1122 cycles/m (ISO 266's
// base-2 third octaves, from memory) and so holds the bins 0.09, 0.10 and
// 0.11, whose mean is 0.1; band means of a flat PSD are the PSD, and of a
// constant coherence that coherence. Tolerance 1e-12 relative: sums of
// three to a few hundred doubles.
func TestThirdOctavesOfAFlatSpectrum(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	s := flatSpectrum(300, 0.05)
	bands := s.ThirdOctaves(0, 0)
	var at *ThirdOctave
	for i := range bands {
		b := &bands[i]
		if math.Abs(b.Left-1e-6) > tol*1e-6 || math.Abs(b.Right-3e-6) > tol*3e-6 || math.Abs(b.Coherence-0.5) > tol {
			t.Errorf("band at %g: %g, %g m³, coherence %g; want 1e-6, 3e-6, 0.5", b.Centre, b.Left, b.Right, b.Coherence)
		}
		if math.Abs(b.Centre-ISO8608N0) < tol {
			at = b
		}
	}
	if at == nil || at.Bins != 3 || math.Abs(at.Mean-0.1) > tol {
		t.Fatalf("band at n0: %+v; want 3 bins about 0.1 cycles/m", at)
	}
	// Limits cut bins, not bands: [0.095, 0.105] leaves 0.10 alone.
	if got := s.ThirdOctaves(0.095, 0.105); len(got) != 1 || got[0].Bins != 1 || got[0].Mean != 0.1 {
		t.Errorf("bands in [0.095, 0.105]: %+v; want one of one bin at 0.1", got)
	}
	m := s.MeasuredBands(0.095, 0.105)
	if len(m.N) != 1 || math.Abs(m.Left[0]-2e-6) > tol*2e-6 || m.Right != nil || m.Coherence != nil {
		t.Errorf("measured table %+v; want the mean PSD 2e-6 m³ at 0.1, one track, no coherence", m)
	}

	tests := []struct {
		name           string
		s              *Spectrum
		lo, hi         float64
		wantLo, wantHi float64
	}{
		// bin 5 at 0.05 cycles/m; Nyquist/2 = 0.25/0.05 = 5 > 2.83.
		{"defaults, fine record", s, 0, 0, 0.05, ISOBandTop},
		// Nyquist/2 = 0.25/0.2 = 1.25 < 2.83.
		{"coarse record", flatSpectrum(300, 0.2), 0, 0, 0.05, 1.25},
		// fewer than six bins: the ISO bottom.
		{"short spectrum", flatSpectrum(4, 0.05), 0, 0, ISOBandBottom, ISOBandTop},
		{"given ends kept", s, 0.2, 1, 0.2, 1},
	}
	for _, tt := range tests {
		if lo, hi := tt.s.FitBand(tt.lo, tt.hi); math.Abs(lo-tt.wantLo) > tol || math.Abs(hi-tt.wantHi) > tol {
			t.Errorf("%s: band [%g, %g], want [%g, %g]", tt.name, lo, hi, tt.wantLo, tt.wantHi)
		}
	}
}
