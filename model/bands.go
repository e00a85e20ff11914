package model

import "math"

// Default fit band of FitBand. The upper end is 2.83 cycles/m, the top of
// the band over which ISO 8608:1995 reports road spectra (0.011-2.83
// cycles/m; from memory), or half the record's Nyquist frequency when that
// is lower (a profiler's anti-alias filter works near Nyquist: common
// practice). The lower end is the bin FirstGoodBin, 5/L_s, below which
// the per-segment detrend and the window's resolution bias distort the
// estimate (see Spectrum.Measured), and not below 0.011 cycles/m.
const (
	ISOBandTop    = 2.83  // cycles/m
	ISOBandBottom = 0.011 // cycles/m
	FirstGoodBin  = 5     // the first Welch bin the default band takes
)

// FitBand fills in the default ends of a fit band [lo, hi] (cycles/m): a
// zero lo becomes the bin FirstGoodBin, at least ISOBandBottom; a zero hi
// becomes ISOBandTop, at most half the Nyquist frequency 1/(4Δx).
func (s *Spectrum) FitBand(lo, hi float64) (float64, float64) {
	if lo == 0 {
		lo = ISOBandBottom
		if len(s.N) > FirstGoodBin {
			lo = math.Max(lo, s.N[FirstGoodBin])
		}
	}
	if hi == 0 {
		hi = math.Min(ISOBandTop, 0.25/s.Spacing) // half of Nyquist 1/(2Δx)
	}
	return lo, hi
}

// ThirdOctave is one third-octave band of a spectrum.
type ThirdOctave struct {
	Centre      float64 // nominal centre n0·2^(j/3) (cycles/m)
	Mean        float64 // mean spatial frequency of the bins averaged (cycles/m)
	Bins        int     // Welch bins averaged
	Left, Right float64 // mean PSDs (m³); Right is 0 for one track
	// Coherence is the real part of the summed cross-spectrum over the
	// root of the product of the summed PSDs (-), in [-1, 1]; 0 for one
	// track.
	Coherence float64
}

// ThirdOctaves averages the Welch bins k >= 1 with lo <= n_k <= hi in
// third-octave bands centred on n0·2^(j/3), n0 = 0.1 cycles/m, from
// n_c·2^(-1/6) up to n_c·2^(1/6) (the base-2 third octaves of ISO 266,
// referred to n0; from memory). hi = 0 means no upper limit; bands
// without a bin are left out.
//
// A band mean has the variance of one bin over the number of bins it
// holds (times the Hann window's bin correlation, see FitISO), and for
// G ∝ n^-w it stands for G at the bins' mean frequency with a bias of
// about w(w+1)/2 times the relative variance of n over a third octave
// (1/3 of (2^(1/6) - 1)², 0.4 %): 1.3 % at w = 2, well inside its
// scatter.
func (s *Spectrum) ThirdOctaves(lo, hi float64) []ThirdOctave {
	var out []ThirdOctave
	if len(s.N) < 2 {
		return nil
	}
	if hi == 0 {
		hi = math.Inf(1)
	}
	j0 := int(math.Floor(3 * math.Log2(s.N[1]/ISO8608N0)))
	j1 := int(math.Ceil(3 * math.Log2(s.N[len(s.N)-1]/ISO8608N0)))
	for j := j0; j <= j1; j++ {
		c := ISO8608N0 * math.Pow(2, float64(j)/3)
		bl, bh := c*math.Pow(2, -1.0/6), c*math.Pow(2, 1.0/6)
		b := ThirdOctave{Centre: c}
		var cross complex128
		for k := 1; k < len(s.N); k++ {
			if n := s.N[k]; n < bl || n >= bh || n < lo || n > hi {
				continue
			}
			b.Bins++
			b.Mean += s.N[k]
			b.Left += s.Left[k]
			if s.Right != nil {
				b.Right += s.Right[k]
				cross += s.Cross[k]
			}
		}
		if b.Bins == 0 {
			continue
		}
		if b.Left > 0 && b.Right > 0 {
			b.Coherence = math.Max(-1, math.Min(1, real(cross)/math.Sqrt(b.Left*b.Right)))
		}
		nb := float64(b.Bins)
		b.Mean, b.Left, b.Right = b.Mean/nb, b.Left/nb, b.Right/nb
		out = append(out, b)
	}
	return out
}

// MeasuredBands is a road case's measured table from the spectrum: the
// third-octave band means of the bins in [lo, hi] of the mean PSD of the
// tracks, ½(G_L + G_R), for both tracks, with no coherence of its own (so
// the model's isotropic coherence, which tends to 1 at long wavelengths).
//
// Why band means: the model extends a table beyond its first and last
// points with the slope of its end segments, and between two adjacent
// Welch bins, 1/L_s apart, that slope is mostly scatter (at 2.8
// cycles/m, bins 0.6 % apart with 10-30 % scatter give slopes of ±20);
// between band means a third octave apart it is within a few tenths of
// the road's. Why one PSD and no measured coherence: below the table the
// model holds the coherence at its first value and extends each track's
// PSD with its own slope, so the left-right difference of the tracks, and
// with it the warp input and the tyre loads, would grow without bound
// at long wavelengths, and the frequency-domain variance would not be
// finite (the model says so and refuses the case).
func (s *Spectrum) MeasuredBands(lo, hi float64) *MeasuredSpectrum {
	m := &MeasuredSpectrum{}
	for _, b := range s.ThirdOctaves(lo, hi) {
		g := b.Left
		if s.Right != nil {
			g = (b.Left + b.Right) / 2
		}
		m.N = append(m.N, b.Mean)
		m.Left = append(m.Left, g)
	}
	return m
}
