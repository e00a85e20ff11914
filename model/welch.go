package model

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Detrend selects what Welch removes from each segment before windowing.
type Detrend int

const (
	// DetrendLinear removes each segment's least-squares straight line
	// (the default: a road record carries grade and long waves that a
	// segment cannot resolve).
	DetrendLinear Detrend = iota
	// DetrendMean removes each segment's mean.
	DetrendMean
	// DetrendNone leaves the segments as they are.
	DetrendNone
)

// WelchOptions tune the spectral estimate. The zero value gives the
// defaults.
type WelchOptions struct {
	// SegmentLength is the length of one segment (m); the resolution is
	// its inverse. The sample count is rounded down to the nearest number
	// whose only prime factors are 2, 3 and 5 (the FFT is fast there); the
	// length used is in Spectrum.SegmentSamples. 0 means an eighth of the
	// record, which gives 15 segments at half overlap.
	SegmentLength float64
	// Overlap is the fraction of a segment shared with the next, in
	// [0, 0.9]; 0 means 0.5, negative means no overlap.
	Overlap float64
	// Detrend is applied to every segment.
	Detrend Detrend
}

// Spectrum is a Welch estimate of the one-sided spatial PSDs of one or two
// tracks and of their cross-spectrum, on the bins n_k = k/(N_s Δx),
// k = 0..N_s/2, N_s the segment length in samples.
type Spectrum struct {
	N     []float64 // spatial frequency of each bin (cycles/m)
	Left  []float64 // one-sided PSD of the left (or only) track (m³)
	Right []float64 // one-sided PSD of the right track (m³); nil for one track
	// Cross is the one-sided cross-spectrum G_LR (m³), with the
	// convention G_LR = 2 E[conj(X_L) X_R]/(U f_s) (see Welch); nil for one
	// track.
	Cross []complex128
	// Coherence is the normalised real cross-spectrum
	// Re G_LR/sqrt(G_LL G_RR), in [-1, 1]: the γ(n) of a RoadCase.
	Coherence []float64
	// MSCoherence is the magnitude-squared coherence |G_LR|²/(G_LL G_RR),
	// in [0, 1].
	MSCoherence []float64

	Spacing        float64 // sample spacing Δx of the record (m)
	SegmentSamples int     // N_s, samples per segment
	Hop            int     // samples between segment starts
	Segments       int     // K, segments averaged
	// EquivalentSegments is K_eff, the number of independent segments
	// that would give the same variance (see Welch): each PSD bin is
	// approximately χ² with 2·K_eff degrees of freedom, scaled.
	EquivalentSegments float64
}

// SegmentLength is N_s·Δx (m), the inverse of the resolution.
func (s *Spectrum) SegmentLength() float64 { return float64(s.SegmentSamples) * s.Spacing }

// Variance returns the discrete integral Σ_k G_k Δn of each track's PSD
// (m²), Δn = 1/(N_s Δx). By Parseval's theorem on each windowed segment
// it equals the mean over segments of Σ_j w_j² x_j² / Σ_j w_j², the
// window-weighted mean square of the detrended segments (see Welch).
func (s *Spectrum) Variance() (left, right float64) {
	dn := 1 / s.SegmentLength()
	for k := range s.Left {
		left += s.Left[k] * dn
		if s.Right != nil {
			right += s.Right[k] * dn
		}
	}
	return left, right
}

// EstimateSpectrum is Welch on a profile's tracks.
func EstimateSpectrum(p *Profile, opt WelchOptions) (*Spectrum, error) {
	return Welch(p.Left, p.Right, p.Spacing, opt)
}

// Welch estimates the one-sided PSDs of left and right (right may be nil)
// and their cross-spectrum by the averaged modified periodogram (Welch
// 1967, "The use of fast Fourier transform for the estimation of power
// spectra: a method based on time averaging over short, modified
// periodograms", IEEE Trans. Audio Electroacoust. 15(2):70-73,
// doi:10.1109/TAU.1967.1161901).
//
// The record is cut into K segments of N_s samples, each starting Hop
// samples after the last (samples beyond the last whole segment are not
// used). Each segment is detrended, multiplied by the periodic Hann window
// w_j = ½(1 - cos 2πj/N_s) and transformed (gonum's dsp/fourier, which is
// unnormalised: X_k = Σ_j w_j x_j e^(-2πijk/N_s)). With U = Σ_j w_j² and
// f_s = 1/Δx,
//
//	G_k = c_k/(K U f_s) Σ_segments |X_k|²,   c_k = 2 but 1 at k = 0 and k = N_s/2,
//
// in m³ (m² per cycle/m), and G_LR alike with conj(X_L) X_R. Dividing by
// U instead of N_s undoes the window's loss of power, so that by
// Parseval's theorem Σ_k G_k Δn is the mean over segments of the
// w²-weighted mean square Σ_j w_j² x_j²/U (see Variance).
//
// Variance of the estimate: for a Gaussian record whose spectrum is flat
// over a few bins, two segments whose starts are D samples apart give
// periodograms with correlation ρ(D) = (Σ_j w_j w_(j+D))²/U² (the
// covariance of |X|² is |E[X_s conj(X_t)]|²), so averaging K of them
// gives Var[G_k]/G_k² = (1/K)(1 + 2 Σ_(m=1)^(K-1) (1 - m/K) ρ(mD)) =
// 1/K_eff (Welch 1967 gives the same sum for overlapping segments; from
// memory). For the Hann window at half overlap ρ = (1/6)² = 1/36.
func Welch(left, right []float64, spacing float64, opt WelchOptions) (*Spectrum, error) {
	n := len(left)
	if !(spacing > 0) || math.IsInf(spacing, 0) {
		return nil, fmt.Errorf("model: welch: spacing must be a finite number > 0, got %g", spacing)
	}
	if right != nil && len(right) != n {
		return nil, fmt.Errorf("model: welch: the right track has %d samples, the left %d", len(right), n)
	}
	for name, x := range map[string][]float64{"left": left, "right": right} {
		for j, v := range x {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("model: welch: %s sample %d is %v", name, j, v)
			}
		}
	}
	overlap := opt.Overlap
	switch {
	case overlap == 0:
		overlap = 0.5
	case overlap < 0:
		overlap = 0
	case overlap > 0.9 || math.IsNaN(overlap):
		return nil, fmt.Errorf("model: welch: overlap must be at most 0.9, got %g", opt.Overlap)
	}
	if opt.Detrend < DetrendLinear || opt.Detrend > DetrendNone {
		return nil, fmt.Errorf("model: welch: unknown detrend %d", opt.Detrend)
	}
	record := float64(n) * spacing
	segLen := opt.SegmentLength
	if segLen == 0 {
		segLen = record / 8
	}
	if !(segLen > 0) {
		return nil, fmt.Errorf("model: welch: segment length must be > 0, got %g m", opt.SegmentLength)
	}
	if segLen > record*(1+1e-9) {
		return nil, fmt.Errorf("model: welch: the record is %.6g m long, too short for segments of %.6g m (a resolution of %.4g cycles/m): give a longer record or a shorter segment",
			record, segLen, 1/segLen)
	}
	ns := smoothBelow(int(math.Floor(segLen/spacing*(1+1e-12))), n)
	if ns < 8 {
		return nil, fmt.Errorf("model: welch: a segment of %.6g m holds %d samples of %.6g m, at least 8 are needed", segLen, ns, spacing)
	}
	hop := int(math.Round(float64(ns) * (1 - overlap)))
	if hop < 1 {
		hop = 1
	}
	k := 1 + (n-ns)/hop

	w := hannPeriodic(ns)
	u := 0.0
	for _, v := range w {
		u += v * v
	}
	fft := fourier.NewFFT(ns)
	nb := ns/2 + 1
	sll := make([]float64, nb)
	var srr []float64
	var slr []complex128
	if right != nil {
		srr = make([]float64, nb)
		slr = make([]complex128, nb)
	}
	buf := make([]float64, ns)
	xl := make([]complex128, nb)
	xr := make([]complex128, nb)
	for s := 0; s < k; s++ {
		start := s * hop
		prepareSegment(buf, left[start:start+ns], w, opt.Detrend)
		fft.Coefficients(xl, buf)
		if right != nil {
			prepareSegment(buf, right[start:start+ns], w, opt.Detrend)
			fft.Coefficients(xr, buf)
		}
		for b := range sll {
			sll[b] += abs2(xl[b])
			if right != nil {
				srr[b] += abs2(xr[b])
				slr[b] += cmplx.Conj(xl[b]) * xr[b]
			}
		}
	}
	out := &Spectrum{
		N: make([]float64, nb), Left: sll, Right: srr, Cross: slr,
		Spacing: spacing, SegmentSamples: ns, Hop: hop, Segments: k,
	}
	for b := range sll {
		c := 2.0
		if b == 0 || (ns%2 == 0 && b == ns/2) {
			c = 1
		}
		scale := c * spacing / (float64(k) * u)
		out.N[b] = float64(b) / (float64(ns) * spacing)
		sll[b] *= scale
		if right != nil {
			srr[b] *= scale
			slr[b] *= complex(scale, 0)
		}
	}
	if right != nil {
		out.Coherence = make([]float64, nb)
		out.MSCoherence = make([]float64, nb)
		for b := range sll {
			d := sll[b] * srr[b]
			if d <= 0 {
				continue
			}
			out.Coherence[b] = math.Max(-1, math.Min(1, real(slr[b])/math.Sqrt(d)))
			out.MSCoherence[b] = math.Min(1, abs2(slr[b])/d)
		}
	}
	out.EquivalentSegments = equivalentSegments(w, hop, k)
	return out, nil
}

// prepareSegment writes the detrended, windowed segment x into dst.
func prepareSegment(dst, x, w []float64, d Detrend) {
	n := len(x)
	var a, b float64 // trend a + b (j - jbar)
	switch d {
	case DetrendMean, DetrendLinear:
		jbar := float64(n-1) / 2
		var sy, sjy, sjj float64
		for j, v := range x {
			dj := float64(j) - jbar
			sy += v
			sjy += dj * v
			sjj += dj * dj
		}
		a = sy / float64(n)
		if d == DetrendLinear {
			b = sjy / sjj
		}
		for j, v := range x {
			dst[j] = w[j] * (v - a - b*(float64(j)-jbar))
		}
	default:
		for j, v := range x {
			dst[j] = w[j] * v
		}
	}
}

// hannPeriodic is w_j = ½(1 - cos 2πj/n), j < n (the "DFT-even" Hann
// window of Harris 1978, Proc. IEEE 66(1):51-83).
func hannPeriodic(n int) []float64 {
	w := make([]float64, n)
	for j := range w {
		w[j] = 0.5 * (1 - math.Cos(2*math.Pi*float64(j)/float64(n)))
	}
	return w
}

// equivalentSegments is K_eff = K / (1 + 2 Σ_(m=1)^(K-1) (1 - m/K) ρ(m·hop))
// with ρ(D) = (Σ_j w_j w_(j+D))²/(Σ_j w_j²)² (see Welch).
func equivalentSegments(w []float64, hop, k int) float64 {
	u := 0.0
	for _, v := range w {
		u += v * v
	}
	sum := 0.0
	for m := 1; m < k && m*hop < len(w); m++ {
		d := m * hop
		c := 0.0
		for j := 0; j+d < len(w); j++ {
			c += w[j] * w[j+d]
		}
		sum += (1 - float64(m)/float64(k)) * (c / u) * (c / u)
	}
	return float64(k) / (1 + 2*sum)
}

// smoothBelow returns the largest n' <= min(n, limit) whose only prime
// factors are 2, 3 and 5 (0 when n < 1).
func smoothBelow(n, limit int) int {
	if n > limit {
		n = limit
	}
	for ; n >= 1; n-- {
		if smooth235(n) {
			return n
		}
	}
	return 0
}

// Measured returns the bins of s with lo <= n <= hi (cycles/m) as the
// tabulated spectrum of a road case. The lowest bins are biased: the
// per-segment detrend removes most of bins 1 and 2, and the window's
// resolution bias raises bin k of an n^-w spectrum by w(w+1)/(6k²) (see
// Spectrum.FitISO), 4% at k = 5 for w = 2. lo = 0 therefore means bin 5,
// 5/L_s (L_s the segment length): choose L_s so that the lowest spatial
// frequency that matters (the body frequencies over the speed, about
// 0.02-0.05 cycles/m at track speeds) lies there or above. hi = 0 means
// the last bin.
func (s *Spectrum) Measured(lo, hi float64) (*MeasuredSpectrum, error) {
	if lo == 0 {
		lo = s.N[min(5, len(s.N)-1)]
	}
	if hi == 0 {
		hi = s.N[len(s.N)-1]
	}
	if !(lo > 0) || !(hi > lo) {
		return nil, fmt.Errorf("model: measured spectrum band must have 0 < lo < hi, got [%g, %g] cycles/m", lo, hi)
	}
	m := &MeasuredSpectrum{}
	for b, n := range s.N {
		if n < lo || n > hi || b == 0 {
			continue
		}
		if !(s.Left[b] > 0) || (s.Right != nil && !(s.Right[b] > 0)) {
			return nil, fmt.Errorf("model: measured spectrum: bin %d (%g cycles/m) has no power; narrow the band", b, n)
		}
		m.N = append(m.N, n)
		m.Left = append(m.Left, s.Left[b])
		if s.Right != nil {
			m.Right = append(m.Right, s.Right[b])
			m.Coherence = append(m.Coherence, s.Coherence[b])
		}
	}
	if len(m.N) < 2 {
		return nil, fmt.Errorf("model: measured spectrum: the band [%g, %g] cycles/m holds %d bins, at least 2 are needed", lo, hi, len(m.N))
	}
	return m, nil
}

// smooth235 reports whether n's only prime factors are 2, 3 and 5.
func smooth235(n int) bool {
	for _, p := range [...]int{2, 3, 5} {
		for n%p == 0 {
			n /= p
		}
	}
	return n == 1
}
