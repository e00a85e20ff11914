package model

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"
)

// welchNoise returns n seeded Gaussian samples of standard deviation sd
// plus a straight grade (so that detrending has work to do).
func welchNoise(n int, sd, grade float64, seed uint64) []float64 {
	rnd := rand.New(rand.NewPCG(seed, 99))
	x := make([]float64, n)
	for j := range x {
		x[j] = sd*rnd.NormFloat64() + grade*float64(j)
	}
	return x
}

// welchDetrendRef detrends a segment with gonum's stat.LinearRegression
// (or its mean), independently of prepareSegment.
func welchDetrendRef(x []float64, d Detrend) []float64 {
	out := make([]float64, len(x))
	idx := make([]float64, len(x))
	for j := range idx {
		idx[j] = float64(j)
	}
	var a, b float64
	switch d {
	case DetrendLinear:
		a, b = stat.LinearRegression(idx, x, nil, false)
	case DetrendMean:
		a = stat.Mean(x, nil)
	}
	for j := range x {
		out[j] = x[j] - a - b*idx[j]
	}
	return out
}

func TestWelchParsevalExact(t *testing.T) {
	t.Parallel()
	// Parseval's theorem for each windowed segment (the DFT is unitary up
	// to N_s): Σ_k G_k Δn = (1/K) Σ_s Σ_j w_j² y_sj²/Σ_j w_j², y the
	// detrended segment (Welch 1967, IEEE Trans. Audio Electroacoust.
	// 15(2):70-73: the modified periodogram normalised by U). Exact up to
	// the rounding of O(N_s K) sums: relative 1e-12.
	const rounding = 1e-12
	x := welchNoise(3000, 2e-3, 1e-5, 1)
	y := welchNoise(3000, 1e-3, -2e-5, 2)
	tests := []struct {
		name    string
		segment float64 // samples (spacing 1 m)
		overlap float64
		detrend Detrend
	}{
		{"linear, half overlap, even", 256, 0, DetrendLinear},
		{"mean, no overlap, even", 256, -1, DetrendMean},
		{"none, three-quarter overlap, even", 240, 0.75, DetrendNone},
		{"linear, half overlap, odd", 225, 0.5, DetrendLinear},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			s, err := Welch(x, y, 1, WelchOptions{SegmentLength: tc.segment, Overlap: tc.overlap, Detrend: tc.detrend})
			if err != nil {
				t.Fatal(err)
			}
			if s.SegmentSamples != int(tc.segment) {
				t.Fatalf("segment %d samples, want %g", s.SegmentSamples, tc.segment)
			}
			w := hannPeriodic(s.SegmentSamples)
			u := 0.0
			for _, v := range w {
				u += v * v
			}
			for track, rec := range [][]float64{x, y} {
				want := 0.0
				for k := 0; k < s.Segments; k++ {
					seg := welchDetrendRef(rec[k*s.Hop:k*s.Hop+s.SegmentSamples], tc.detrend)
					for j, v := range seg {
						want += w[j] * w[j] * v * v / u
					}
				}
				want /= float64(s.Segments)
				l, r := s.Variance()
				got := [2]float64{l, r}[track]
				if !scalar.EqualWithinRel(got, want, rounding) {
					t.Errorf("track %d: ∫G dn = %.15g, Parseval %.15g", track, got, want)
				}
			}
		})
	}
}

func TestWelchAgainstDirectDFT(t *testing.T) {
	t.Parallel()
	// A textbook DFT sum, X_k = Σ_j w_j x_j e^(-2πijk/N), independent of
	// gonum's FFT, checks the transform, the one-sided factor (1 at DC
	// and Nyquist) and the cross-spectrum's convention conj(X_L) X_R.
	const rounding = 1e-10
	const n, ns, dx = 96, 32, 0.25
	x := welchNoise(n, 1, 0, 3)
	y := welchNoise(n, 1, 0, 4)
	s, err := Welch(x, y, dx, WelchOptions{SegmentLength: ns * dx, Detrend: DetrendNone})
	if err != nil {
		t.Fatal(err)
	}
	w := hannPeriodic(ns)
	u := 0.0
	for _, v := range w {
		u += v * v
	}
	k := 1 + (n-ns)/(ns/2)
	for b := 0; b <= ns/2; b++ {
		var gl, gr float64
		var glr complex128
		for seg := 0; seg < k; seg++ {
			var xl, xr complex128
			for j := 0; j < ns; j++ {
				e := cmplx.Rect(1, -2*math.Pi*float64(j*b)/ns)
				xl += complex(w[j]*x[seg*ns/2+j], 0) * e
				xr += complex(w[j]*y[seg*ns/2+j], 0) * e
			}
			gl += abs2(xl)
			gr += abs2(xr)
			glr += cmplx.Conj(xl) * xr
		}
		c := 2.0
		if b == 0 || b == ns/2 {
			c = 1
		}
		scale := c * dx / (float64(k) * u)
		if !scalar.EqualWithinAbsOrRel(s.Left[b], scale*gl, 1e-300, rounding) ||
			!scalar.EqualWithinAbsOrRel(s.Right[b], scale*gr, 1e-300, rounding) ||
			cmplx.Abs(s.Cross[b]-complex(scale, 0)*glr) > rounding*scale*math.Sqrt(gl*gr) {
			t.Errorf("bin %d: got %g %g %v, direct %g %g %v", b, s.Left[b], s.Right[b], s.Cross[b], scale*gl, scale*gr, complex(scale, 0)*glr)
		}
		if want := float64(b) / (ns * dx); s.N[b] != want {
			t.Errorf("bin %d at %g cycles/m, want %g", b, s.N[b], want)
		}
	}
}

func TestWelchToneStaysInTheMainLobe(t *testing.T) {
	t.Parallel()
	// A tone at a whole bin k0 under the periodic Hann window puts all its
	// power into bins k0-1, k0, k0+1 (w = ½ - ¼e^(iθ) - ¼e^(-iθ); Harris
	// 1978, Proc. IEEE 66(1):51-83), and those three bins integrate to
	// the tone's mean square A²/2. Rounding: 1e-12 relative; power
	// elsewhere below 1e-24 of the peak.
	const rounding = 1e-12
	const ns, k0, amp, dx = 128, 10, 3e-3, 0.1
	x := make([]float64, 8*ns)
	for j := range x {
		x[j] = amp * math.Cos(2*math.Pi*k0*float64(j)/ns+0.7)
	}
	s, err := Welch(x, nil, dx, WelchOptions{SegmentLength: ns * dx, Detrend: DetrendMean})
	if err != nil {
		t.Fatal(err)
	}
	dn := 1 / (ns * dx)
	lobe := (s.Left[k0-1] + s.Left[k0] + s.Left[k0+1]) * dn
	if !scalar.EqualWithinRel(lobe, amp*amp/2, rounding) {
		t.Errorf("main lobe holds %g, want A²/2 = %g", lobe, amp*amp/2)
	}
	for b, g := range s.Left {
		if (b < k0-1 || b > k0+1) && g > 1e-24*s.Left[k0] {
			t.Errorf("bin %d holds %g outside the main lobe", b, g)
		}
	}
	// The side bins are (¼/½)² = ¼ of the centre bin.
	if r := s.Left[k0+1] / s.Left[k0]; !scalar.EqualWithinRel(r, 0.25, rounding) {
		t.Errorf("side/centre bin ratio %g, want 0.25", r)
	}
}

func TestWelchVarianceOfWhiteNoise(t *testing.T) {
	t.Parallel()
	// Parseval against the whole record: for white Gaussian noise of
	// variance σ², ∫G dn is Σ_j W_j y_j² with W_j = (1/K) Σ_s w²_(j-sD)/U,
	// the record variance is Σ_j y_j²/N. Their expected difference is the
	// power the per-segment linear detrend removes, σ² Σ_j w_j² h_j/U with
	// h_j = 1/N_s + (j - j̄)²/Σ(j - j̄)² the fit's leverage (the window's
	// known loss), and the difference scatters with the standard deviation
	// σ² sqrt(2 Σ_j (W_j - 1/N)²) (Var y² = 2σ⁴). Tolerance: 4 of those.
	const sigmas = 4
	const n, ns, sd = 1 << 15, 512, 1e-3
	x := welchNoise(n, sd, 0, 5)
	s, err := Welch(x, nil, 0.05, WelchOptions{SegmentLength: ns * 0.05})
	if err != nil {
		t.Fatal(err)
	}
	w := hannPeriodic(ns)
	u, loss := 0.0, 0.0
	jbar, sjj := float64(ns-1)/2, 0.0
	for j := range w {
		sjj += (float64(j) - jbar) * (float64(j) - jbar)
	}
	for j, v := range w {
		u += v * v
		loss += v * v * (1/float64(ns) + (float64(j)-jbar)*(float64(j)-jbar)/sjj)
	}
	loss /= u
	weights := make([]float64, n)
	for k := 0; k < s.Segments; k++ {
		for j, v := range w {
			weights[k*s.Hop+j] += v * v / u / float64(s.Segments)
		}
	}
	spread := 0.0
	for _, wj := range weights {
		spread += (wj - 1/float64(n)) * (wj - 1/float64(n))
	}
	tol := sigmas * sd * sd * math.Sqrt(2*spread)
	got, _ := s.Variance()
	want := stat.Variance(x, nil) * (1 - loss)
	if math.Abs(got-want) > tol {
		t.Errorf("∫G dn = %g, record variance less the detrend loss (%.4f) = %g: differ by %g, tolerance %g", got, loss, want, got-want, tol)
	}
	t.Logf("Parseval on white noise: relative difference %.2e, tolerance %.2e, detrend loss %.2e", (got-want)/want, tol/want, loss)
}

func TestWelchCoherenceOfIdenticalAndIndependentTracks(t *testing.T) {
	t.Parallel()
	// Identical tracks: coherence 1 to rounding. Independent Gaussian
	// tracks, K segments without overlap: |γ̂|² ~ Beta(1, K-1), mean 1/K
	// and variance (K-1)/(K²(K+1)) (Carter, Knapp & Nuttall 1973, IEEE
	// Trans. Audio Electroacoust. 21(4):337-344; from memory), and Re γ̂
	// has mean 0 and variance about 1/(2K). The means over M interior bins
	// are tested with 4 standard errors, inflated by hannBinInflation for
	// the correlation of neighbouring Hann bins.
	const rounding, sigmas = 1e-12, 4
	const n, ns = 1 << 15, 256
	x := welchNoise(n, 1e-3, 0, 6)
	y := welchNoise(n, 1e-3, 0, 7)

	same, err := Welch(x, x, 0.05, WelchOptions{SegmentLength: ns * 0.05})
	if err != nil {
		t.Fatal(err)
	}
	for b := 1; b < len(same.N); b++ {
		if math.Abs(same.Coherence[b]-1) > rounding || math.Abs(same.MSCoherence[b]-1) > rounding {
			t.Fatalf("bin %d: identical tracks give γ %v, |γ|² %v", b, same.Coherence[b], same.MSCoherence[b])
		}
	}

	ind, err := Welch(x, y, 0.05, WelchOptions{SegmentLength: ns * 0.05, Overlap: -1})
	if err != nil {
		t.Fatal(err)
	}
	k := float64(ind.Segments)
	if ind.EquivalentSegments != k {
		t.Fatalf("without overlap K_eff = %g, want K = %g", ind.EquivalentSegments, k)
	}
	var msc, re float64
	m := 0
	for b := 2; b < len(ind.N)-1; b++ {
		msc += ind.MSCoherence[b]
		re += ind.Coherence[b]
		m++
	}
	msc /= float64(m)
	re /= float64(m)
	infl := hannBinInflation(ns)
	seMSC := math.Sqrt(infl * (k - 1) / (k * k * (k + 1)) / float64(m))
	seRe := math.Sqrt(infl / (2 * k) / float64(m))
	if math.Abs(msc-1/k) > sigmas*seMSC {
		t.Errorf("mean |γ̂|² = %g, want 1/K = %g within %g", msc, 1/k, sigmas*seMSC)
	}
	if math.Abs(re) > sigmas*seRe {
		t.Errorf("mean Re γ̂ = %g, want 0 within %g", re, sigmas*seRe)
	}
}

func TestWelchEquivalentSegmentsHannHalfOverlap(t *testing.T) {
	t.Parallel()
	// For the Hann window at half overlap the segments share half their
	// samples: Σ_(j<N/2) sin²·cos² = N/16 against Σ_j sin⁴ = 3N/8, so the
	// amplitude correlation is 1/6 (the 16.7% "overlap correlation" of
	// Harris 1978, Proc. IEEE 66(1):51-83, table 1) and ρ = 1/36:
	// K_eff = K/(1 + (1/18)(1 - 1/K)). Rounding 1e-12.
	for _, k := range []int{2, 7, 31} {
		got := equivalentSegments(hannPeriodic(512), 256, k)
		want := float64(k) / (1 + 2.0/36*(1-1/float64(k)))
		if !scalar.EqualWithinRel(got, want, 1e-12) {
			t.Errorf("K = %d: K_eff %g, want %g", k, got, want)
		}
	}
	// Neighbouring-bin correlation of Hann: 1 + 2((2/3)² + (1/6)²) = 35/18.
	if got := hannBinInflation(512); !scalar.EqualWithinRel(got, 35.0/18, 1e-12) {
		t.Errorf("bin inflation %g, want 35/18", got)
	}
}

func TestWelchRejectsBadInput(t *testing.T) {
	t.Parallel()
	x := welchNoise(400, 1e-3, 0, 8)
	bad := append([]float64(nil), x...)
	bad[17] = math.NaN()
	tests := []struct {
		name  string
		left  []float64
		right []float64
		dx    float64
		opt   WelchOptions
	}{
		{"segment longer than the record", x, nil, 0.1, WelchOptions{SegmentLength: 50}},
		{"NaN sample", bad, nil, 0.1, WelchOptions{}},
		{"tracks of different length", x, x[:300], 0.1, WelchOptions{}},
		{"zero spacing", x, nil, 0, WelchOptions{}},
		{"overlap too large", x, nil, 0.1, WelchOptions{Overlap: 0.95}},
		{"segment of too few samples", x, nil, 0.1, WelchOptions{SegmentLength: 0.5}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			if _, err := Welch(tc.left, tc.right, tc.dx, tc.opt); err == nil {
				t.Error("no error")
			}
		})
	}
}

func TestSpectrumMeasuredFeedsARoadCase(t *testing.T) {
	t.Parallel()
	// A measured spectrum used as a road case must reproduce the table at
	// its own bins (RoadCase.SpatialPSD interpolates in log-log through
	// them) and pass the road case's validation.
	const rounding = 1e-12
	x := welchNoise(1<<13, 1e-3, 0, 9)
	y := welchNoise(1<<13, 1e-3, 0, 10)
	s, err := Welch(x, y, 0.05, WelchOptions{SegmentLength: 25.6})
	if err != nil {
		t.Fatal(err)
	}
	m, err := s.Measured(0, 4)
	if err != nil {
		t.Fatal(err)
	}
	if m.N[0] != s.N[5] || m.N[len(m.N)-1] > 4 {
		t.Errorf("band %g..%g, want from bin 5 (%g) to at most 4", m.N[0], m.N[len(m.N)-1], s.N[5])
	}
	rc := RoadCase{Name: "measured", Speed: 40, Measured: m}
	if err := rc.Validate(); err != nil {
		t.Fatal(err)
	}
	for b := range m.N {
		l, r := rc.SpatialPSD(m.N[b])
		if !scalar.EqualWithinRel(l, m.Left[b], rounding) || !scalar.EqualWithinRel(r, m.Right[b], rounding) ||
			!scalar.EqualWithinAbs(rc.CoherenceAt(m.N[b], 1.6), m.Coherence[b], rounding) {
			t.Fatalf("bin %d: road case gives %g %g %g, table %g %g %g", b, l, r, rc.CoherenceAt(m.N[b], 1.6), m.Left[b], m.Right[b], m.Coherence[b])
		}
	}
}
