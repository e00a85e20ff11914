package model

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"
)

// isoFitOf synthesises a profile of the case and fits it back.
func isoFitOf(t *testing.T, rc RoadCase, length float64, seed uint64, lo, hi float64) (ISOFit, *Spectrum) {
	t.Helper()
	p, err := SynthesiseProfile(&rc, SynthOptions{Length: length, Spacing: 0.05, Track: 1.6}, rand.New(rand.NewPCG(seed, 11)))
	if err != nil {
		t.Fatal(err)
	}
	s, err := EstimateSpectrum(p, WelchOptions{SegmentLength: 100})
	if err != nil {
		t.Fatal(err)
	}
	f, err := s.FitISO(lo, hi)
	if err != nil {
		t.Fatal(err)
	}
	return f, s
}

func TestFitISORecoversClassAndWaviness(t *testing.T) {
	t.Parallel()
	// ISO 8608:1995: a road of class X has Gd(n0) at the class's
	// geometric mean (16e-6 m³ for A, x4 per class) and, for the fitted
	// form, waviness w. A synthetic road of known Gd0 and w, estimated by
	// Welch (1967, IEEE Trans. Audio Electroacoust. 15(2):70-73) and
	// fitted in log-log, must give them back within 4 of the fit's
	// standard errors (FitISO: from ψ'(ν/2), ν = 2 K_eff, K_eff from the
	// number of averaged segments), and the same class.
	const sigmas = 4
	gdA, _, _, _ := ISOClassGd0("A")
	tests := []struct {
		name     string
		rc       RoadCase
		gd0, w   float64
		class    string
		lo, hi   float64
		length   float64
		segments int // expected K at half overlap
	}{
		{"class B, waviness 2", RoadCase{Speed: 30, Class: "B"}, 4 * gdA, 2, "B", 0.05, 5, 4000, 79},
		{"class D, waviness 2.5", RoadCase{Speed: 30, Class: "D", Waviness: 2.5}, 64 * gdA, 2.5, "D", 0.05, 5, 4000, 79},
		{"race track below class A, waviness 1.8", RoadCase{Speed: 50, Gd0: 2e-6, Waviness: 1.8}, 2e-6, 1.8, "A", 0.03, 8, 6000, 119},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			f, s := isoFitOf(t, tc.rc, tc.length, 1, tc.lo, tc.hi)
			if s.Segments != tc.segments {
				t.Errorf("%d segments, want %d", s.Segments, tc.segments)
			}
			dlog := math.Log(f.Gd0 / tc.gd0)
			if math.Abs(dlog) > sigmas*f.StdErrLogGd0 || math.Abs(f.Waviness-tc.w) > sigmas*f.StdErrWaviness || f.Class != tc.class {
				t.Errorf("fit Gd0 %.4g (ln error %.4f, se %.4f), w %.4f (error %.4f, se %.4f), class %s; want %.4g, %g, %s",
					f.Gd0, dlog, f.StdErrLogGd0, f.Waviness, f.Waviness-tc.w, f.StdErrWaviness, f.Class, tc.gd0, tc.w, tc.class)
			}
			t.Logf("class fit: Gd0 error %+.2f%% (se %.2f%%), waviness error %+.4f (se %.4f), %d bins, K_eff %.1f",
				100*(f.Gd0/tc.gd0-1), 100*f.StdErrLogGd0, f.Waviness-tc.w, f.StdErrWaviness, f.Points, s.EquivalentSegments)
		})
	}
}

func TestFitISOStandardErrorsMatchTheScatter(t *testing.T) {
	t.Parallel()
	// The fit's standard errors are derived for Gaussian data, not
	// measured; check them against the scatter of 24 seeded Gaussian
	// records. A random walk z_j = z_(j-1) + e_j, e ~ N(0, q), has the
	// one-sided PSD qΔx/(2 sin²(πnΔx)), a power law of waviness 2 within
	// 1% below n = 1 cycle/m at Δx = 0.05 m (sin x/x > 0.996), which is the
	// band fitted. With 24 samples the sample standard deviation is within
	// ±30% of the true one with probability about 0.95 (chi-squared with
	// 23 dof: sqrt([11.7, 38.1]/23) = [0.71, 1.29]): the ratio must lie in
	// [0.7, 1.3]. (The synthesis of SynthesiseProfile, with deterministic
	// amplitudes, scatters much less: about 0.3 of these errors.)
	const runs = 24
	var lg, wv []float64
	var se, sew float64
	for seed := uint64(0); seed < runs; seed++ {
		e := welchNoise(20000, 1e-4, 0, 200+seed)
		for j := 1; j < len(e); j++ {
			e[j] += e[j-1]
		}
		s, err := Welch(e, nil, 0.05, WelchOptions{SegmentLength: 100})
		if err != nil {
			t.Fatal(err)
		}
		f, err := s.FitISO(0.05, 1)
		if err != nil {
			t.Fatal(err)
		}
		lg = append(lg, math.Log(f.Gd0))
		wv = append(wv, f.Waviness)
		se, sew = f.StdErrLogGd0, f.StdErrWaviness
	}
	rl := stat.StdDev(lg, nil) / se
	rw := stat.StdDev(wv, nil) / sew
	t.Logf("scatter over standard error for Gaussian records: ln Gd0 %.2f, waviness %.2f", rl, rw)
	for name, r := range map[string]float64{"ln Gd0": rl, "waviness": rw} {
		if r < 0.7 || r > 1.3 {
			t.Errorf("%s: scatter is %.2f of the standard error, want 0.7..1.3", name, r)
		}
	}
}

func TestFitISOExactPowerLaw(t *testing.T) {
	t.Parallel()
	// Without noise (dof 0: no bias correction) a tabulated power law is
	// fitted exactly: rounding 1e-12.
	const rounding = 1e-12
	var n, g []float64
	for k := 1; k <= 200; k++ {
		nk := 0.01 * float64(k)
		n = append(n, nk)
		g = append(g, 7e-6*math.Pow(nk/ISO8608N0, -2.3))
	}
	f, err := FitISO(n, g, 0.02, 1.5, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinRel(f.Gd0, 7e-6, rounding) || !scalar.EqualWithinAbs(f.Waviness, 2.3, rounding) ||
		f.ResidualRMS > rounding || f.Points != 149 || f.MinN != 0.02 || f.Class != "A" {
		t.Errorf("got %+v", f)
	}
	rc := f.RoadCase("fitted", 40)
	if err := rc.Validate(); err != nil {
		t.Fatal(err)
	}
	if l, _ := rc.SpatialPSD(0.5); !scalar.EqualWithinRel(l, 7e-6*math.Pow(5, -2.3), rounding) {
		t.Errorf("road case PSD at 0.5 cycles/m %g", l)
	}
}

func TestFitISOBiasCorrection(t *testing.T) {
	t.Parallel()
	// E[ln(χ²_ν/ν)] = ψ(ν/2) - ln(ν/2): for ν = 2 (one periodogram,
	// exponential) it is -γ_E = -0.5772 (Euler's constant), so a power
	// law tabulated at G e^(-γ_E) and fitted with dof 2 gives Gd0 = G.
	const eulerGamma = 0.57721566490153286
	n := []float64{0.05, 0.1, 0.2, 0.4}
	g := []float64{1, 1, 1, 1}
	for k := range g {
		g[k] = 3e-6 * math.Pow(n[k]/ISO8608N0, -2) * math.Exp(-eulerGamma)
	}
	f, err := FitISO(n, g, 0.01, 1, 2, 1)
	if err != nil {
		t.Fatal(err)
	}
	// gonum's Digamma is accurate to about 1e-10.
	if !scalar.EqualWithinRel(f.Gd0, 3e-6, 1e-9) {
		t.Errorf("Gd0 %g, want 3e-6", f.Gd0)
	}
	// ψ'(1) = π²/6 is the variance of ln of an exponential variable.
	want := math.Sqrt(math.Pi * math.Pi / 6 / isoFitSxx(n))
	if !scalar.EqualWithinRel(f.StdErrWaviness, want, 1e-9) {
		t.Errorf("se(w) %g, want %g", f.StdErrWaviness, want)
	}
}

// isoFitSxx is Σ (u_k - ū)², u = ln(n/n0).
func isoFitSxx(n []float64) float64 {
	u := make([]float64, len(n))
	for k := range n {
		u[k] = math.Log(n[k] / ISO8608N0)
	}
	m := stat.Mean(u, nil)
	s := 0.0
	for _, v := range u {
		s += (v - m) * (v - m)
	}
	return s
}

func TestFitISORejectsBadInput(t *testing.T) {
	t.Parallel()
	n := []float64{0.1, 0.2, 0.3, 0.4}
	tests := []struct {
		name   string
		g      []float64
		lo, hi float64
	}{
		{"empty band", []float64{1, 1, 1, 1}, 1, 2},
		{"inverted band", []float64{1, 1, 1, 1}, 0.3, 0.1},
		{"zero PSD", []float64{1, 0, 1, 1}, 0.05, 1},
		{"length mismatch", []float64{1, 1}, 0.05, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			if _, err := FitISO(n, tc.g, tc.lo, tc.hi, 10, 1); err == nil {
				t.Error("no error")
			}
		})
	}
}
