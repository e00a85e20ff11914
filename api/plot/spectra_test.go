package plot

import (
	"errors"
	"io"
	"math"
	"strings"
	"testing"

	"dampfront/model"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
)

// testCar is the invented GT car of the demo (testdata/quillon-gt.yaml);
// with asymmetric set, its right rear spring is stiffer and its CG 2 cm
// left of the centre line, so that the sides of each axle differ.
func testCar(asymmetric bool) model.Vehicle {
	front := model.Corner{SpringRate: 160e3, SpringMotionRatio: 0.80, DamperMotionRatio: 0.80,
		UnsprungMass: 45, TyreRate: 320e3, TyreDamping: 150, TyreEnvelopeLength: 0.18, BumpStopGap: 0.030}
	rear := model.Corner{SpringRate: 180e3, SpringMotionRatio: 0.78, DamperMotionRatio: 0.78,
		UnsprungMass: 50, TyreRate: 340e3, TyreDamping: 150, TyreEnvelopeLength: 0.18, BumpStopGap: 0.035}
	v := model.Vehicle{
		Name: "Quillon GT (invented demo car)", SprungMass: 1150, PitchInertia: 1800, RollInertia: 450,
		CGToFrontAxle: 1.378, CGToRearAxle: 1.272, TrackFront: 1.65, TrackRear: 1.62,
		Corners:  [4]model.Corner{front, front, rear, rear},
		AntiRoll: [2]model.AntiRollBar{{WheelRate: 60e3}, {WheelRate: 30e3}},
		Aero:     model.Aero{ReferenceSpeed: 50, Downforce: [2]float64{2600, 3400}, Stiffness: [2]float64{40e3, 30e3}},
	}
	if asymmetric {
		v.CGLateral = 0.02
		v.Corners[model.RR].SpringRate = 190e3
	}
	return v
}

// testSpectra are the spectra and modes of the candidate setup of
// testdata/candidate-setup.yaml on an invented fast circuit.
func testSpectra(t testing.TB, asymmetric bool) (*model.Spectra, []model.Mode) {
	t.Helper()
	v := testCar(asymmetric)
	rc := model.RoadCase{Name: "Ashgrove Ring, fast sweepers", Speed: 55, Gd0: 2e-6}
	e, err := model.NewEvaluator(v, []model.RoadCase{rc}, model.EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ax := func(bump, rebound float64) model.AxleDamping {
		return model.AxleDamping{BumpRatio: bump, ReboundRatio: rebound, KneeBump: 0.05, KneeRebound: 0.05,
			HighSpeedBump: 0.5, HighSpeedRebound: 0.5}
	}
	s := model.Setup{Axles: [2]model.AxleDamping{ax(0.55, 0.85), ax(0.50, 0.80)}}
	sp, _, err := e.Spectra(s, 0)
	if err != nil {
		t.Fatal(err)
	}
	modes, err := model.ModalAnalysis(&v, &s, rc.Speed)
	if err != nil {
		t.Fatal(err)
	}
	return sp, modes
}

func TestSpectraRenders(t *testing.T) {
	t.Parallel()
	sp, modes := testSpectra(t, false)
	fig, err := Spectra(sp, modes, SpectraOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r := render(t, "spectra", fig)
	want := []string{Caution, "Output spectra, Ashgrove Ring, fast sweepers", "Dynamic tyre load", "Ride height relative to the road",
		"Tyre load PSD (N²/Hz)", "Ride-height PSD (mm²/Hz)", "Frequency (Hz)", "mode, natural frequency",
		"the area under a curve is the variance"}
	// The seven modes of a car on four posts, each named once.
	if len(modes) != 7 {
		t.Fatalf("%d modes, want 7", len(modes))
	}
	for _, m := range modes {
		want = append(want, modeLabel(m))
	}
	checkTexts(t, r, want...)
	checkLines(t, r, "front", "rear", "0.1", "1", "10", "100")
	if text := svgText(t, r.svg); strings.Contains(text, "front left") || strings.Contains(text, "Dashed: right side") {
		t.Errorf("a symmetric car's sides are drawn apart:\n%s", text)
	}
	for _, m := range modes {
		if m.Overdamped {
			checkTexts(t, r, "overdamped mode")
			break
		}
	}
}

func TestSpectraAsymmetric(t *testing.T) {
	t.Parallel()
	sp, modes := testSpectra(t, true)
	fig, err := Spectra(sp, modes, SpectraOptions{Title: "Asymmetric car"})
	if err != nil {
		t.Fatal(err)
	}
	r := render(t, "spectra-asymmetric", fig)
	checkTexts(t, r, "Asymmetric car", "Dashed: right side.")
	checkLines(t, r, "front left", "front right", "rear left", "rear right")
}

// TestSpectraTradeUnits checks the points drawn: log10 of the PSD in
// trade units, 1 m² = 10⁶ mm² (SI prefixes), so 2e-7 m²/Hz is drawn at
// log10(0.2 mm²/Hz) = -0.69897; a zero value leaves a gap, and a point
// alone between gaps has no line.
func TestSpectraTradeUnits(t *testing.T) {
	t.Parallel()
	const tol = 1e-12 // log10 of products of exact decimals: rounding only
	f := []float64{1, 2, 4, 8, 16, 32}
	runs := logRuns(f, []float64{2e-7, 1e-7, 0, 3e-7, 0, 0}, qRideHeightPSD)
	if len(runs) != 1 || len(runs[0]) != 2 {
		t.Fatalf("runs %v, want one run of the first two points", runs)
	}
	for k, want := range []struct{ x, y float64 }{{0, math.Log10(0.2)}, {math.Log10(2), math.Log10(0.1)}} {
		if got := runs[0][k]; math.Abs(got.X-want.x) > tol || math.Abs(got.Y-want.y) > tol {
			t.Errorf("point %d at (%v, %v), want (%v, %v)", k, got.X, got.Y, want.x, want.y)
		}
	}
	if math.Abs(math.Log10(0.2)-(-0.69897)) > 1e-5 {
		t.Errorf("log10(0.2) = %v, want -0.69897 (five places, from tables)", math.Log10(0.2))
	}
}

// TestSpectraDecades checks that a PSD axis ends at the panel's peak and
// spans at most spectraDecades below it, and less when the data do.
func TestSpectraDecades(t *testing.T) {
	t.Parallel()
	f := []float64{1, 10, 100}
	for _, tc := range []struct {
		name     string
		psd      []float64
		min, max float64 // log10 of N²/Hz
	}{
		{"ten decades", []float64{1e4, 1, 1e-6}, -2, 4},
		{"two decades", []float64{100, 10, 1}, 0, 2},
		{"flat", []float64{10, 10, 10}, 0.5, 1.5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			p := plot.New()
			if _, err := addAxleSpectra(p, nil, qTyreLoadPSD, f, [2][][]float64{{tc.psd}, {tc.psd}}); err != nil {
				t.Fatal(err)
			}
			if p.Y.Min != tc.min || p.Y.Max != tc.max {
				t.Errorf("axis %v to %v, want %v to %v", p.Y.Min, p.Y.Max, tc.min, tc.max)
			}
		})
	}
}

// TestSpreadLabels checks the placement against what it must satisfy:
// order kept, no two labels closer than the width, inside the bounds, a
// label with room left where it is, and a cluster centred on the mean of
// its wanted places, the least-squares placement: for two labels wanted
// at 10 and 12, 6 apart, the first at p minimises (p-10)² + (p+6-12)²,
// so p = 8 and the second sits at 14.
func TestSpreadLabels(t *testing.T) {
	t.Parallel()
	const width = 6
	for _, tc := range []struct {
		name   string
		want   []vg.Length
		lo, hi vg.Length
		exact  []vg.Length // nil: check the laws only
	}{
		{"apart", []vg.Length{10, 30, 50}, 0, 100, []vg.Length{10, 30, 50}},
		{"pair", []vg.Length{10, 12}, 0, 100, []vg.Length{8, 14}},
		{"pair at the left edge", []vg.Length{1, 2}, 0, 100, []vg.Length{0, 6}},
		{"pair at the right edge", []vg.Length{99, 100}, 0, 100, []vg.Length{94, 100}},
		{"chain", []vg.Length{10, 12, 14, 20, 40}, 0, 100, nil},
		{"hop cluster", []vg.Length{50, 53.5, 56, 70}, 0, 100, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := spreadLabels(tc.want, width, tc.lo, tc.hi)
			if len(got) != len(tc.want) {
				t.Fatalf("%d places for %d labels", len(got), len(tc.want))
			}
			const tol = 1e-9 // points; sums of a few lengths
			for k := range got {
				if got[k] < tc.lo-tol || got[k] > tc.hi+tol {
					t.Errorf("label %d at %v, outside [%v, %v]", k, got[k], tc.lo, tc.hi)
				}
				if k > 0 && got[k]-got[k-1] < width-tol {
					t.Errorf("labels %d and %d %v apart, want at least %v", k-1, k, got[k]-got[k-1], width)
				}
				if tc.exact != nil && math.Abs(float64(got[k]-tc.exact[k])) > tol {
					t.Errorf("label %d at %v, want %v", k, got[k], tc.exact[k])
				}
			}
		})
	}
}

func TestSpectraInvalid(t *testing.T) {
	t.Parallel()
	good, modes := testSpectra(t, false)
	edit := func(change func(sp *model.Spectra)) *model.Spectra {
		sp := *good
		sp.FrequencyHz = append([]float64(nil), good.FrequencyHz...)
		sp.TyreLoad[2] = append([]float64(nil), good.TyreLoad[2]...)
		sp.RideHeight = [2][]float64{make([]float64, len(good.FrequencyHz)), make([]float64, len(good.FrequencyHz))}
		copy(sp.RideHeight[0], good.RideHeight[0])
		copy(sp.RideHeight[1], good.RideHeight[1])
		change(&sp)
		return &sp
	}
	badMode := append([]model.Mode(nil), modes...)
	badMode[1].UndampedFrequencyHz = -2
	for _, tc := range []struct {
		name  string
		sp    *model.Spectra
		modes []model.Mode
		field string
	}{
		{"none", nil, modes, "spectra"},
		{"frequencies not increasing", edit(func(sp *model.Spectra) { sp.FrequencyHz[3] = sp.FrequencyHz[2] }), modes, "spectra.frequency_hz[3]"},
		{"NaN tyre load", edit(func(sp *model.Spectra) { sp.TyreLoad[2][5] = math.NaN() }), modes, "spectra.tyre_load[2][5]"},
		{"short tyre load", edit(func(sp *model.Spectra) { sp.TyreLoad[2] = sp.TyreLoad[2][:4] }), modes, "spectra.tyre_load[2]"},
		{"zero ride height", edit(func(sp *model.Spectra) { clear(sp.RideHeight[0]); clear(sp.RideHeight[1]) }), modes, "spectra.ride_height"},
		{"negative mode", good, badMode, "modes[1].undamped_frequency_hz"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := Spectra(tc.sp, tc.modes, SpectraOptions{})
			var ve *model.ValidationError
			if !errors.As(err, &ve) {
				t.Fatalf("error %v, want a *model.ValidationError", err)
			}
			found := false
			for _, p := range ve.Problems {
				found = found || p.Field == tc.field
			}
			if !found {
				t.Errorf("error %v does not name %q", err, tc.field)
			}
		})
	}
}

// TestModeLabel checks the labels' three significant figures (the
// rounding of strconv's 'g' format, then trailing zeros kept).
func TestModeLabel(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		f    float64
		want string
	}{
		{2.876, "heave 2.88 Hz"},
		{16.04, "heave 16.0 Hz"},
		{9.996, "heave 10.0 Hz"},
		{112.4, "heave 112 Hz"},
		{0.5, "heave 0.500 Hz"},
	} {
		if got := modeLabel(model.Mode{Name: "heave", UndampedFrequencyHz: tc.f}); got != tc.want {
			t.Errorf("label of %v Hz: %q, want %q", tc.f, got, tc.want)
		}
	}
}

// TestSpectraEdgeCases draws spectra without modes, with a mode beyond
// the grid (left out) and with flat spectra.
func TestSpectraEdgeCases(t *testing.T) {
	t.Parallel()
	sp, modes := testSpectra(t, false)
	flat := *sp
	for i := range flat.TyreLoad {
		flat.TyreLoad[i] = make([]float64, len(sp.FrequencyHz))
		for k := range flat.TyreLoad[i] {
			flat.TyreLoad[i][k] = 100
		}
	}
	beyond := model.Mode{Name: "far mode", UndampedFrequencyHz: 10 * sp.FrequencyHz[len(sp.FrequencyHz)-1]}
	for _, tc := range []struct {
		name    string
		sp      *model.Spectra
		modes   []model.Mode
		want    []string
		lacking []string
	}{
		{"no modes", sp, nil, []string{"front", "rear"}, []string{"mode, natural frequency", "heave"}},
		{"mode beyond the grid", sp, append([]model.Mode{beyond}, modes[:1]...), []string{modeLabel(modes[0])}, []string{"far mode"}},
		{"flat tyre load", &flat, modes, []string{"100"}, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			fig, err := Spectra(tc.sp, tc.modes, SpectraOptions{})
			if err != nil {
				t.Fatal(err)
			}
			r := render(t, "", fig)
			checkTexts(t, r, append(tc.want, Caution)...)
			text := svgText(t, r.svg)
			for _, l := range tc.lacking {
				if strings.Contains(text, l) {
					t.Errorf("SVG text has %q:\n%s", l, text)
				}
			}
		})
	}
}

// BenchmarkSpectra measures building and writing the spectra chart of
// the demo car's 300-point grid.
func BenchmarkSpectra(b *testing.B) {
	sp, modes := testSpectra(b, false)
	for _, format := range []Format{SVG, PNG} {
		b.Run(string(format), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				fig, err := Spectra(sp, modes, SpectraOptions{})
				if err != nil {
					b.Fatal(err)
				}
				if err := fig.Write(io.Discard, format); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
