package plot

import (
	"errors"
	"math"
	"testing"

	"dampfront/model"
)

// testRoads are invented road cases: two smooth track surfaces below
// class A, a kerb-like rough case, and a measured table with a rougher
// right track.
func testRoads() []model.RoadCase {
	meas := &model.MeasuredSpectrum{}
	for k := range 30 {
		n := 0.02 * math.Pow(200, float64(k)/29) // 0.02 to 4 cycles/m
		g := 3e-6 * math.Pow(n/0.1, -2.3)
		meas.N = append(meas.N, n)
		meas.Left = append(meas.Left, g)
		meas.Right = append(meas.Right, 1.5*g)
	}
	return []model.RoadCase{
		{Name: "circuit, main straight", Speed: 70, Gd0: 1e-6},
		{Name: "circuit, slow corner", Speed: 25, Gd0: 2.5e-6, Waviness: 2.5},
		{Name: "kerbs", Speed: 30, Class: "C"},
		{Name: "street circuit survey", Speed: 40, Measured: meas},
	}
}

func TestRoadInputRenders(t *testing.T) {
	t.Parallel()
	fig, err := RoadInput(testRoads(), RoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r := render(t, "road", fig)
	checkLines(t, r, "A", "B", "C", "D", "E", "F", "G", "H", "0.01", "0.1", "1", "10", "1e-6")
	checkTexts(t, r, Caution, "Spatial frequency n (cycles/m)", "Displacement PSD Gd(n) (m³)",
		"kerbs, 30 m/s, ISO class C", "street circuit survey, 40 m/s, measured, right track",
		"circuit, main straight, 70 m/s, Gd(n0) = 1e-6 m³, w = 2", "1e-6", "0.01")
}

// TestISOClassLines checks the drawn class limits against ISO 8608:1995:
// the upper limit of class A at n0 = 0.1 cycles/m is 32e-6 m³, each class
// four times the one before, falling as n^-2 (waviness 2), so that the
// A/B limit at n = 1 cycle/m is 32e-6 / 100 = 3.2e-7 m³.
func TestISOClassLines(t *testing.T) {
	t.Parallel()
	const tol = 1e-12 // relative; the values are products of exact powers, so only rounding differs
	for _, tc := range []struct {
		class string
		n     float64
		want  float64 // ISO 8608:1995 class table, upper limit, at n0; then the n^-2 law
	}{
		{"A", 0.1, 32e-6},
		{"A", 1, 32e-8},
		{"B", 0.1, 128e-6},
		{"C", 0.01, 512e-6 * 100},
		{"H", 0.1, 32e-6 * math.Pow(4, 7)},
	} {
		_, _, upper, err := model.ISOClassGd0(tc.class)
		if err != nil {
			t.Fatal(err)
		}
		if got := isoPowerLaw(upper, tc.n); math.Abs(got-tc.want) > tol*tc.want {
			t.Errorf("class %s limit at n = %g: %g m³, want %g m³", tc.class, tc.n, got, tc.want)
		}
	}
}

func TestRoadInputInvalid(t *testing.T) {
	t.Parallel()
	bad := testRoads()
	bad[1].Gd0 = -1
	for _, tc := range []struct {
		name  string
		cases []model.RoadCase
		opt   RoadOptions
		field string
	}{
		{"none", nil, RoadOptions{}, "road_cases"},
		{"negative Gd0", bad, RoadOptions{}, "road_cases[1].gd0_m3"},
		{"range reversed", testRoads(), RoadOptions{MinN: 1, MaxN: 0.1}, "max_n"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := RoadInput(tc.cases, tc.opt)
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
