package model

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// profileCSV writes n samples of a smooth two-track record, Δx apart,
// with an optional header, and lets edit change line l (1-based, the
// header is line 1) before joining.
func profileCSV(n int, dx float64, edit func(lines []string) []string) string {
	lines := []string{"distance_m,left_m,right_m"}
	for j := 0; j < n; j++ {
		x := float64(j) * dx
		lines = append(lines, fmt.Sprintf("%g,%g,%g", x, 1e-3*math.Sin(x), -1e-3*math.Cos(x)))
	}
	if edit != nil {
		lines = edit(lines)
	}
	return strings.Join(lines, "\n") + "\n"
}

func TestReadProfileErrorsNameLineAndColumn(t *testing.T) {
	t.Parallel()
	set := func(l int, s string) func([]string) []string {
		return func(lines []string) []string { lines[l-1] = s; return lines }
	}
	tests := []struct {
		name       string
		text       string
		opt        ProfileOptions
		line, col  int
		colName    string
		reasonPart string
	}{
		{"empty file", "", ProfileOptions{}, 0, 0, "", "no header"},
		{"no header", profileCSV(40, 0.1, func(l []string) []string { return l[1:] }), ProfileOptions{}, 1, 0, "", "header"},
		{"header of four columns", profileCSV(40, 0.1, set(1, "d,a,b,c")), ProfileOptions{}, 1, 0, "", "4 fields"},
		{"missing field", profileCSV(40, 0.1, set(5, "0.4,0.001")), ProfileOptions{}, 5, 0, "", "2 fields"},
		{"not a number", profileCSV(40, 0.1, set(7, "0.6,0.001,abc")), ProfileOptions{}, 7, 3, "right_m", `"abc" is not a number`},
		{"NaN", profileCSV(40, 0.1, set(8, "0.7,NaN,0")), ProfileOptions{}, 8, 2, "left_m", "not a finite number"},
		{"infinity", profileCSV(40, 0.1, set(9, "0.8,0,+Inf")), ProfileOptions{}, 9, 3, "right_m", "not a finite number"},
		{"duplicate distance", profileCSV(40, 0.1, set(11, "0.8,0,0")), ProfileOptions{}, 11, 1, "distance_m", "repeats line 10"},
		{"unsorted", profileCSV(40, 0.1, set(11, "0.75,0,0")), ProfileOptions{}, 11, 1, "distance_m", "sorted"},
		{"too few samples", profileCSV(10, 0.1, nil), ProfileOptions{}, 11, 0, "", "at least 16"},
		// 100 samples of 0.1 m cover 10 m; 0.05 cycles/m needs 20 m.
		{"too short for the resolution", profileCSV(100, 0.1, nil), ProfileOptions{Resolution: 0.05}, 101, 0, "", "needs at least 20 m"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := ReadProfile(strings.NewReader(tc.text), tc.opt)
			var pe *ProfileError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v, want a *ProfileError", err)
			}
			if pe.Line != tc.line || pe.Column != tc.col || pe.Name != tc.colName || !strings.Contains(pe.Reason, tc.reasonPart) {
				t.Errorf("got line %d column %d (%q): %q; want line %d column %d (%q) containing %q",
					pe.Line, pe.Column, pe.Name, pe.Reason, tc.line, tc.col, tc.colName, tc.reasonPart)
			}
		})
	}
}

func TestReadProfileAcceptsCommentsAndOneTrack(t *testing.T) {
	t.Parallel()
	var b strings.Builder
	b.WriteString("# measured on the invented Ashgrove Ring\n\ndistance_m,elevation_m\n")
	for j := 0; j < 32; j++ {
		fmt.Fprintf(&b, "%g, %g\n", 10+0.25*float64(j), 1e-4*float64(j%3))
	}
	p, err := ReadProfile(strings.NewReader(b.String()), ProfileOptions{Resolution: 0.125})
	if err != nil {
		t.Fatal(err)
	}
	if p.Right != nil || p.Len() != 32 || p.Start != 10 || p.Spacing != 0.25 || p.Length() != 8 {
		t.Errorf("got right %v, %d samples, start %g, spacing %g, length %g; want nil, 32, 10, 0.25, 8", p.Right, p.Len(), p.Start, p.Spacing, p.Length())
	}
	if len(p.Comments) != 1 || p.Comments[0] != "measured on the invented Ashgrove Ring" || len(p.Warnings) != 0 {
		t.Errorf("comments %q, warnings %q", p.Comments, p.Warnings)
	}
}

func TestProfileRoundTrip(t *testing.T) {
	t.Parallel()
	rc := RoadCase{Name: "Ashgrove Ring", Speed: 50, Class: "A"}
	tests := []struct {
		name     string
		oneTrack bool
		decimals int
	}{
		{"two tracks, exact", false, -1},
		{"one track, exact", true, -1},
		{"two tracks, micrometres", false, 6},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			p, err := SynthesiseProfile(&rc, SynthOptions{Length: 200, Spacing: 0.05, Track: 1.6, OneTrack: tc.oneTrack}, rand.New(rand.NewPCG(3, 4)))
			if err != nil {
				t.Fatal(err)
			}
			p.Start = 125.5
			var buf bytes.Buffer
			if err := WriteProfile(&buf, p, tc.decimals); err != nil {
				t.Fatal(err)
			}
			q, err := ReadProfile(&buf, ProfileOptions{})
			if err != nil {
				t.Fatal(err)
			}
			// The distances are written as Start + jΔx and the spacing read
			// back as their mean step: equal to Δx up to rounding of the
			// printed sums (relative 1e-12 is a few hundred ulps).
			const spacingTol = 1e-12
			if q.Start != p.Start || math.Abs(q.Spacing-p.Spacing) > spacingTol*p.Spacing || q.Len() != p.Len() {
				t.Fatalf("got start %v spacing %v n %d, want %v %v %d", q.Start, q.Spacing, q.Len(), p.Start, p.Spacing, p.Len())
			}
			if (q.Right == nil) != tc.oneTrack || len(q.Warnings) != 0 || len(q.Comments) != len(p.Comments) {
				t.Fatalf("right nil %v, warnings %q, comments %q", q.Right == nil, q.Warnings, q.Comments)
			}
			for c, pair := range [][2][]float64{{p.Left, q.Left}, {p.Right, q.Right}} {
				for j := range pair[1] {
					// Exact to the printed precision: what was printed parses
					// back to the same float64 the reader holds.
					want := pair[0][j]
					if tc.decimals >= 0 {
						want, _ = strconv.ParseFloat(strconv.FormatFloat(want, 'f', tc.decimals, 64), 64)
					}
					if pair[1][j] != want {
						t.Fatalf("track %d sample %d: read %v, want %v", c, j, pair[1][j], want)
					}
				}
			}
		})
	}
}

func TestReadProfileResamplesNonUniformSpacing(t *testing.T) {
	t.Parallel()
	// A straight grade z = 0.02 x + 0.003 sampled at jittered distances:
	// linear interpolation reproduces a straight line exactly, so the
	// resampled record must lie on it to rounding.
	const rounding = 1e-12
	tests := []struct {
		name     string
		jitter   float64 // fraction of the spacing
		resample bool
	}{
		{"within tolerance", 0.004, false},
		{"beyond tolerance", 0.2, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			rnd := rand.New(rand.NewPCG(5, 6))
			var b strings.Builder
			b.WriteString("distance_m,left_m\n")
			for j := 0; j < 200; j++ {
				x := 0.1 * float64(j)
				if j > 0 && j < 199 {
					x += tc.jitter * 0.1 * (rnd.Float64() - 0.5)
				}
				fmt.Fprintf(&b, "%.17g,%.17g\n", x, 0.02*x+0.003)
			}
			p, err := ReadProfile(strings.NewReader(b.String()), ProfileOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if got := len(p.Warnings) == 1 && strings.Contains(p.Warnings[0], "resampled"); got != tc.resample {
				t.Fatalf("warnings %q, want a resampling warning: %v", p.Warnings, tc.resample)
			}
			if !tc.resample {
				return
			}
			if !strings.Contains(p.Warnings[0], "line ") {
				t.Errorf("the warning should name a line: %q", p.Warnings[0])
			}
			for j, z := range p.Left {
				x := p.Start + float64(j)*p.Spacing
				if math.Abs(z-(0.02*x+0.003)) > rounding {
					t.Fatalf("sample %d at %g m: %v, want %v", j, x, z, 0.02*x+0.003)
				}
			}
		})
	}
}

func TestReadProfileWarnsOfMillimetres(t *testing.T) {
	t.Parallel()
	// ISO 8608:1995 classes A (16e-6 m³) and H (16e-6·4⁷ m³) at n0: a
	// class A road in m must pass, the same numbers read as mm (x1000) must
	// warn, and even class H in m must pass (it is the roughest class).
	tests := []struct {
		name  string
		class string
		scale float64
		names string
		warn  bool
	}{
		{"class A in metres", "A", 1, "distance_m,left_m,right_m", false},
		{"class H in metres", "H", 1, "distance_m,left_m,right_m", false},
		{"class A in millimetres", "A", 1000, "distance_m,left_m,right_m", true},
		{"a column named in mm", "A", 1, "distance_m,left_mm,right_m", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			rc := RoadCase{Speed: 40, Class: tc.class}
			p, err := SynthesiseProfile(&rc, SynthOptions{Length: 500, Spacing: 0.1, Track: 1.6}, rand.New(rand.NewPCG(7, 8)))
			if err != nil {
				t.Fatal(err)
			}
			for j := range p.Left {
				p.Left[j] *= tc.scale
				p.Right[j] *= tc.scale
			}
			p.Names = strings.Split(tc.names, ",")
			var buf bytes.Buffer
			if err := WriteProfile(&buf, p, -1); err != nil {
				t.Fatal(err)
			}
			q, err := ReadProfile(&buf, ProfileOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if got := len(q.Warnings) > 0; got != tc.warn {
				t.Errorf("warnings %q, want some: %v", q.Warnings, tc.warn)
			}
		})
	}
}

func TestSuspectMillimetresStructureFunction(t *testing.T) {
	t.Parallel()
	// The increment variance of a waviness-2 road is 2π² Gd(n0) n0² Δx
	// for an unbounded band (suspectMillimetres). A synthesised record
	// stops at the Nyquist frequency 1/(2Δx) and lacks
	// 2∫_(1/2Δx)^∞ Gd0 n0² n^-2 (1 - cos 2πnΔx) dn; with u = 2πnΔx and
	// ∫_π^∞ (1 - cos u)/u² du = 2/π + π/2 - Si(π) (by parts), the implied
	// Gd(n0) is the fraction 1 - (2/π)(2/π + π/2 - Si(π)) = 0.7737 of the
	// true one. Si(π) by gonum's Gauss-Legendre quadrature.
	//
	// Over one period of the deterministic-amplitude synthesis the mean
	// square of the increments is the bin sum exactly; it differs from the
	// integral only by the band below 1/L and the Riemann-sum error, both
	// well below 0.5% here, which is the tolerance.
	const discretisation = 0.005
	si := quad.Fixed(func(u float64) float64 { return math.Sin(u) / u }, 0, math.Pi, 32, nil, 0)
	retained := 1 - (2/math.Pi)*(2/math.Pi+math.Pi/2-si)
	rc := RoadCase{Speed: 40, Gd0: 5e-6}
	p, err := SynthesiseProfile(&rc, SynthOptions{Length: 2000, Spacing: 0.1, OneTrack: true}, rand.New(rand.NewPCG(9, 10)))
	if err != nil {
		t.Fatal(err)
	}
	gd, suspect := suspectMillimetres(p.Left, p.Spacing)
	want := 5e-6 * retained
	t.Logf("implied Gd0 %g, want %g: ratio %.5f", gd, want, gd/want)
	if suspect || math.Abs(gd/want-1) > discretisation {
		t.Errorf("implied Gd0 %g (suspect %v), want %g within %g (retained fraction %.4f)", gd, suspect, want, discretisation, retained)
	}
}
