package model

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/floats/scalar"
)

// synthCases are road cases with each kind of spectrum and coherence.
func synthCases() []RoadCase {
	measured := &MeasuredSpectrum{
		N:         []float64{0.01, 0.1, 1, 10},
		Left:      []float64{4e-4, 4e-6, 4e-8, 4e-10},
		Right:     []float64{8e-4, 8e-6, 6e-8, 4e-10},
		Coherence: []float64{0.9, 0.6, 0.2, 0},
	}
	return []RoadCase{
		{Name: "ISO class B, isotropic", Speed: 40, Class: "B"},
		{Name: "power law w 2.5, table coherence", Speed: 40, Gd0: 8e-6, Waviness: 2.5,
			Coherence: Coherence{Kind: CoherenceTable, N: []float64{0.05, 0.5, 5}, Gamma: []float64{0.8, 0.3, -0.2}}},
		{Name: "measured, unequal tracks", Speed: 40, Measured: measured},
	}
}

func TestSynthesisPeriodogramIsThePSD(t *testing.T) {
	t.Parallel()
	// Over one period the spectral representation's amplitudes come back
	// exactly from the record's DFT (Shinozuka & Deodatis 1991, Appl.
	// Mech. Rev. 44(4):191-204: the amplitudes are deterministic): with
	// X_k = Σ_j z_j e^(-2πijk/M), z = Σ sqrt(2G_kΔn) cos(2πn_k x + φ_k),
	// |X_k|² = M² G_k Δn/2, i.e. G_k = 2|X_k|²/(M² Δn), for the left
	// track; the mean is 0 and bins above MaxN are empty. Rounding 1e-9
	// (FFT of 2^14 points).
	const rounding = 1e-9
	for _, rc := range synthCases() {
		t.Run(rc.Name, func(t *testing.T) {
			t.Parallel()
			const length, dx, maxN = 819.2, 0.05, 8.0
			p, err := SynthesiseProfile(&rc, SynthOptions{Length: length, Spacing: dx, MaxN: maxN, Track: 1.6}, rand.New(rand.NewPCG(1, 2)))
			if err != nil {
				t.Fatal(err)
			}
			m := p.Len()
			if m != 16384 || p.Length() != length {
				t.Fatalf("%d samples over %g m, want 16384 over %g", m, p.Length(), length)
			}
			x := fourier.NewFFT(m).Coefficients(nil, p.Left)
			dn := 1 / length
			peak := 0.0
			for k := range x {
				peak = math.Max(peak, abs2(x[k]))
			}
			for k := range x {
				n := float64(k) * dn
				got := 2 * abs2(x[k]) / (float64(m) * float64(m) * dn)
				want := 0.0
				if k > 0 && n <= maxN {
					want, _ = rc.SpatialPSD(n)
				}
				if math.Abs(got-want) > rounding*math.Max(want, 2*peak/(float64(m)*float64(m)*dn)) {
					t.Fatalf("bin %d (%g cycles/m): periodogram %g, PSD %g", k, n, got, want)
				}
			}
		})
	}
}

func TestSynthesisFullCoherenceCopiesTheTrack(t *testing.T) {
	t.Parallel()
	// γ = 1 makes the Cholesky factor's l22 zero: right = left for equal
	// PSDs, bit for bit up to the FFT's rounding.
	rc := RoadCase{Speed: 40, Class: "C", Coherence: Coherence{Kind: CoherenceFull}}
	p, err := SynthesiseProfile(&rc, SynthOptions{Length: 100, Spacing: 0.05}, rand.New(rand.NewPCG(3, 4)))
	if err != nil {
		t.Fatal(err)
	}
	for j := range p.Left {
		if !scalar.EqualWithinAbs(p.Left[j], p.Right[j], 1e-15) {
			t.Fatalf("sample %d: left %g right %g", j, p.Left[j], p.Right[j])
		}
	}
}

func TestSynthesisMatchesTheCaseSpectraAndCoherence(t *testing.T) {
	t.Parallel()
	// The Welch estimate of a synthesised pair (Welch 1967) must match
	// the case's G_L, G_R and γ. Averaged over the bins of each band
	// (a factor of 4 in n) the ratio Ĝ/G has the standard error
	// sqrt(F/(K_eff M)) and γ̂ - γ the standard error
	// (1 - γ²) sqrt(F/(2 K_eff M)) (large-K Gaussian approximation for the
	// coherency; Bendat & Piersol, "Random Data", 4th ed., ch. 9, from
	// memory), F = hannBinInflation; γ̂ is biased by O(1/K_eff), which is
	// added. Tolerance: 4 standard errors plus that bias, and the
	// resolution bias w(w+1)/(6k²) of FitISO for the PSD.
	const sigmas = 4
	for _, rc := range synthCases() {
		t.Run(rc.Name, func(t *testing.T) {
			t.Parallel()
			const track = 1.6
			p, err := SynthesiseProfile(&rc, SynthOptions{Length: 6000, Spacing: 0.05, Track: track}, rand.New(rand.NewPCG(5, 6)))
			if err != nil {
				t.Fatal(err)
			}
			s, err := EstimateSpectrum(p, WelchOptions{SegmentLength: 60})
			if err != nil {
				t.Fatal(err)
			}
			infl := hannBinInflation(s.SegmentSamples)
			keff := s.EquivalentSegments
			worst := [3]float64{}
			for lo := 0.1; lo < 8; lo *= 4 {
				var rl, rr, dg, gm float64
				m := 0
				for b, n := range s.N {
					if n < lo || n >= 4*lo {
						continue
					}
					gl, gr := rc.SpatialPSD(n)
					g := rc.CoherenceAt(n, track)
					rl += s.Left[b] / gl
					rr += s.Right[b] / gr
					dg += s.Coherence[b] - g
					gm += g
					m++
				}
				fm := float64(m)
				rl, rr, dg, gm = rl/fm, rr/fm, dg/fm, gm/fm
				w := 3.0 // steepest slope of these cases, for the resolution bias
				k0 := lo * s.SegmentLength()
				tolG := sigmas*math.Sqrt(infl/(keff*fm)) + w*(w+1)/(6*k0*k0)
				tolC := sigmas*(1-gm*gm)*math.Sqrt(infl/(2*keff*fm)) + 1/keff
				if math.Abs(rl-1) > tolG || math.Abs(rr-1) > tolG || math.Abs(dg) > tolC {
					t.Errorf("band %g..%g cycles/m (%d bins): Ĝ_L/G_L %.4f, Ĝ_R/G_R %.4f (tolerance %.4f), γ̂ - γ %.4f at γ ≈ %.2f (tolerance %.4f)",
						lo, 4*lo, m, rl, rr, tolG, dg, gm, tolC)
				}
				worst[0] = math.Max(worst[0], math.Abs(rl-1))
				worst[1] = math.Max(worst[1], math.Abs(rr-1))
				worst[2] = math.Max(worst[2], math.Abs(dg))
			}
			t.Logf("worst band: |Ĝ_L/G_L - 1| %.4f, |Ĝ_R/G_R - 1| %.4f, |γ̂ - γ| %.4f (K_eff %.0f)", worst[0], worst[1], worst[2], keff)
		})
	}
}

func TestSynthesisSeedAndBand(t *testing.T) {
	t.Parallel()
	rc := RoadCase{Speed: 40, Class: "B"}
	gen := func(seed uint64, maxN float64) *roadCoefficients {
		return newRoadCoefficients(&rc, 1.6, 500, int(maxN*500), rand.New(rand.NewPCG(seed, 1)))
	}
	a, b, c, wide := gen(1, 2), gen(1, 2), gen(2, 2), gen(1, 4)
	for k := range a.left {
		if a.left[k] != b.left[k] || a.right[k] != b.right[k] {
			t.Fatalf("bin %d: the same seed gives different roads", k)
		}
		// A wider band keeps the lower bins of the same seed.
		if a.left[k] != wide.left[k] || a.right[k] != wide.right[k] {
			t.Fatalf("bin %d: a wider band changed a lower bin", k)
		}
	}
	if a.left[10] == c.left[10] {
		t.Error("different seeds give the same road")
	}
}

func TestTyreInputsDelayEnvelopeAndRate(t *testing.T) {
	t.Parallel()
	// One bin k on the left track, c_k = ½: z(x) = cos(2π n x). The front
	// left tyre at speed V follows G·z with G = 1/(1 + i n ℓ), the rear
	// left G·z delayed by L/V, and the rates are d/dt = V d/dx. Closed
	// form: Re(G e^(2πi n (V t - d))) and Re(2πi n V G e^(...)), d = 0 or
	// L. Rounding 1e-12 of the unit amplitude.
	const rounding = 1e-12
	v := demoCar()
	v.Corners[RL].TyreEnvelopeLength = 0.25
	v.Corners[RR].TyreEnvelopeLength = 0.25
	const length, speed, m, k = 300.0, 40.0, 1200, 37
	r := &roadCoefficients{length: length, left: make([]complex128, k+1), right: make([]complex128, k+1)}
	r.left[k] = 0.5
	r.right[k] = 0.25i // right: z = -½ sin(2π n x)
	in := r.tyreInputs(&v, speed, m)
	n := k / length
	for j := 0; j < m; j++ {
		x := speed * float64(j) * length / (speed * m)
		for i := 0; i < 4; i++ {
			c := complex(1, 0)
			if i%2 == 1 {
				c = 0.5i
			}
			d := 0.0
			if i >= 2 {
				d = v.Wheelbase()
			}
			g := 1 / complex(1, n*v.Corners[i].TyreEnvelopeLength)
			e := c * g * cmplx.Rect(1, 2*math.Pi*n*(x-d))
			w, wd := real(e), real(complex(0, 2*math.Pi*n*speed)*e)
			if math.Abs(in[8*j+i]-w) > rounding || math.Abs(in[8*j+4+i]-wd) > rounding*2*math.Pi*n*speed {
				t.Fatalf("sample %d tyre %s: w %g ẇ %g, want %g %g", j, CornerNames[i], in[8*j+i], in[8*j+4+i], w, wd)
			}
		}
	}
}

func TestSynthesiseProfileRejectsBadOptions(t *testing.T) {
	t.Parallel()
	rc := RoadCase{Speed: 40, Class: "B"}
	tests := []struct {
		name  string
		rc    RoadCase
		opt   SynthOptions
		field string
	}{
		{"no length", rc, SynthOptions{Spacing: 0.1, Track: 1.6}, "length_m"},
		{"no spacing", rc, SynthOptions{Length: 10, Track: 1.6}, "spacing_m"},
		{"isotropic coherence without a track", rc, SynthOptions{Length: 10, Spacing: 0.1}, "track_m"},
		{"bad road case", RoadCase{Speed: 40, Class: "Z"}, SynthOptions{Length: 10, Spacing: 0.1, Track: 1.6}, "road_case.iso_class"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := SynthesiseProfile(&tc.rc, tc.opt, rand.New(rand.NewPCG(1, 1)))
			synthWantField(t, err, tc.field)
		})
	}
	if _, err := SynthesiseProfile(&rc, SynthOptions{Length: 10, Spacing: 0.1, Track: 1.6}, nil); err == nil {
		t.Error("no error without a random source")
	}
}

// synthWantField requires a *ValidationError naming field.
func synthWantField(t *testing.T, err error, field string) {
	t.Helper()
	ve, ok := err.(*ValidationError)
	if !ok {
		t.Fatalf("got %v, want a *ValidationError", err)
	}
	for _, p := range ve.Problems {
		if p.Field == field {
			return
		}
	}
	t.Errorf("got %v, want a problem with %s", err, field)
}

func TestCoherenceTableMatchesTheModel(t *testing.T) {
	t.Parallel()
	// The tabulated isotropic coherence used by the synthesis must agree
	// with IsotropicCoherence to its stated interpolation error (1e-5,
	// see coherenceStep) everywhere in its range, also between nodes.
	const interpolation = 1e-5
	rc := RoadCase{Speed: 40, Class: "B", Waviness: 2.2}
	f := coherenceFunc(&rc, 1.6, 1e-4, 20)
	for n := 1e-4; n < 20; n *= 1.0013 {
		if d := math.Abs(f(n) - IsotropicCoherence(n, 1.6, 2.2)); d > interpolation {
			t.Fatalf("at %g cycles/m the table is off by %g", n, d)
		}
	}
}

func TestTheCheckedRoadCanBeExported(t *testing.T) {
	t.Parallel()
	// SimulateCase documents how to write out the road it drove on:
	// SynthesiseProfile with Length V·T, Spacing V·h/2, MaxN RoadMaxN, the
	// mean track and the same seeded source gives the front tyres' input
	// before their envelope, sample for sample (the same coefficients and
	// FFT); here with the road's band below the samples' Nyquist frequency,
	// as when a finer step than the rule's is given.
	v := demoCar()
	v.Corners[FL].TyreEnvelopeLength, v.Corners[FR].TyreEnvelopeLength = 0, 0
	v.Corners[FL].TyreDamping, v.Corners[FR].TyreDamping = 0, 0
	rc := demoCases()[1]
	const steps, h = 3000, 1e-3
	track := (v.TrackFront + v.TrackRear) / 2
	length := rc.Speed * steps * h
	const bins = 2000
	in := newRoadCoefficients(&rc, track, length, bins, rand.New(rand.NewPCG(8, 1))).tyreInputs(&v, rc.Speed, 2*steps)
	p, err := SynthesiseProfile(&rc, SynthOptions{Length: length, Spacing: rc.Speed * h / 2, MaxN: bins / length, Track: track}, rand.New(rand.NewPCG(8, 1)))
	if err != nil {
		t.Fatal(err)
	}
	if p.Len() != 2*steps {
		t.Fatalf("%d samples, want %d", p.Len(), 2*steps)
	}
	for j := 0; j < p.Len(); j++ {
		if in[8*j+FL] != p.Left[j] || in[8*j+FR] != p.Right[j] {
			t.Fatalf("sample %d: tyres %g %g, profile %g %g", j, in[8*j+FL], in[8*j+FR], p.Left[j], p.Right[j])
		}
	}
}
