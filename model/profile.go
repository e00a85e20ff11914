package model

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Profile is a road elevation record along distance, sampled uniformly:
// sample j lies at distance Start + j·Spacing.
//
// The profile file is plain CSV, one sample a line, in metres:
//
//	# optional comment lines
//	distance_m,left_m,right_m
//	0,0.00012,-0.00031
//	0.05,0.00015,-0.00029
//
// A one-track file has two columns (distance_m,elevation_m). The first
// non-comment line is the header; the column names are free, but the
// values are read as metres whatever the names say.
type Profile struct {
	Start   float64   // distance of the first sample (m)
	Spacing float64   // distance between samples Δx (m)
	Left    []float64 // left-track (or only) elevation (m), up positive
	Right   []float64 // right-track elevation (m); nil for a one-track profile
	// Names are the header's column names; WriteProfile uses them when
	// they have the right count, and the defaults otherwise.
	Names []string
	// Comments are the file's comment lines without the leading "#".
	Comments []string
	// Warnings say what the reader changed (resampling) or suspects
	// (units); the record is usable, but look at them.
	Warnings []string
}

// Len is the number of samples.
func (p *Profile) Len() int { return len(p.Left) }

// Length is the length the record covers, N·Δx (m): each sample stands
// for one spacing, so a Welch segment of N samples has the resolution
// 1/(N·Δx).
func (p *Profile) Length() float64 { return float64(len(p.Left)) * p.Spacing }

// ProfileOptions tune ReadProfile. The zero value gives the defaults.
type ProfileOptions struct {
	// SpacingTolerance is the largest deviation of a distance step from
	// the nominal spacing, relative to it, still taken as uniform; a
	// record beyond it is resampled by linear interpolation at the median
	// step and a warning says so. 0 means 0.01.
	SpacingTolerance float64
	// Resolution (cycles/m), when > 0, is the spectral resolution the
	// record is meant for: a record shorter than 1/Resolution is an error.
	Resolution float64
}

// minProfileSamples is the fewest samples a profile may have: fewer cannot
// hold even one Welch segment worth estimating a spectrum from.
const minProfileSamples = 16

// ProfileError is a problem in a profile file, tied to its place.
type ProfileError struct {
	Line   int    // 1-based line of the file; 0 when not tied to one line
	Column int    // 1-based column; 0 for the whole line
	Name   string // the column's header name, when known
	Reason string // what is wrong and what is expected
}

func (e *ProfileError) Error() string {
	var b strings.Builder
	b.WriteString("profile")
	if e.Line > 0 {
		fmt.Fprintf(&b, " line %d", e.Line)
	}
	if e.Column > 0 {
		fmt.Fprintf(&b, ", column %d", e.Column)
		if e.Name != "" {
			fmt.Fprintf(&b, " (%s)", e.Name)
		}
	}
	b.WriteString(": ")
	b.WriteString(e.Reason)
	return b.String()
}

// ReadProfile reads a profile file (see Profile for the format). It
// rejects, naming line and column: a missing header, a wrong number of
// fields, text that is not a number, NaN and infinities, distances that
// repeat or go backwards, and a record too short (fewer than 16 samples,
// or shorter than 1/opt.Resolution). It accepts with a warning: spacing
// that is not uniform within opt.SpacingTolerance (the record is resampled
// by linear interpolation, which attenuates wavelengths near twice the
// spacing), and elevations that look like millimetres (see
// suspectMillimetres).
func ReadProfile(r io.Reader, opt ProfileOptions) (*Profile, error) {
	if opt.SpacingTolerance == 0 {
		opt.SpacingTolerance = 0.01
	}
	if !(opt.SpacingTolerance > 0) || opt.Resolution < 0 || math.IsNaN(opt.Resolution) {
		return nil, &ProfileError{Reason: fmt.Sprintf("options: spacing tolerance must be > 0 and resolution >= 0, got %g and %g", opt.SpacingTolerance, opt.Resolution)}
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 1024*1024)
	p := &Profile{}
	var dist []float64
	var lines []int // file line of each sample
	cols := 0
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if line == 1 {
			text = strings.TrimPrefix(text, "\ufeff")
		}
		if text == "" {
			continue
		}
		if strings.HasPrefix(text, "#") {
			p.Comments = append(p.Comments, strings.TrimSpace(strings.TrimPrefix(text, "#")))
			continue
		}
		fields := strings.Split(text, ",")
		if cols == 0 {
			if err := p.readHeader(fields, line); err != nil {
				return nil, err
			}
			cols = len(fields)
			continue
		}
		if len(fields) != cols {
			return nil, &ProfileError{Line: line, Reason: fmt.Sprintf("has %d fields, the header has %d", len(fields), cols)}
		}
		var vals [3]float64
		for c, f := range fields {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				return nil, &ProfileError{Line: line, Column: c + 1, Name: p.Names[c], Reason: fmt.Sprintf("%q is not a number", strings.TrimSpace(f))}
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &ProfileError{Line: line, Column: c + 1, Name: p.Names[c], Reason: fmt.Sprintf("%v is not a finite number (fill or cut out gaps before reading)", v)}
			}
			vals[c] = v
		}
		if n := len(dist); n > 0 {
			prev := dist[n-1]
			switch {
			case vals[0] == prev:
				return nil, &ProfileError{Line: line, Column: 1, Name: p.Names[0], Reason: fmt.Sprintf("distance %g m repeats line %d: distances must increase strictly", vals[0], lines[n-1])}
			case vals[0] < prev:
				return nil, &ProfileError{Line: line, Column: 1, Name: p.Names[0], Reason: fmt.Sprintf("distance %g m is less than %g m on line %d: the file must be sorted by distance", vals[0], prev, lines[n-1])}
			}
		}
		dist = append(dist, vals[0])
		lines = append(lines, line)
		p.Left = append(p.Left, vals[1])
		if cols == 3 {
			p.Right = append(p.Right, vals[2])
		}
	}
	if err := sc.Err(); err != nil {
		return nil, &ProfileError{Line: line + 1, Reason: err.Error()}
	}
	if cols == 0 {
		return nil, &ProfileError{Reason: "no header line: expected distance_m,left_m,right_m or distance_m,elevation_m"}
	}
	if len(dist) < minProfileSamples {
		return nil, &ProfileError{Line: line, Reason: fmt.Sprintf("has %d samples, at least %d are needed", len(dist), minProfileSamples)}
	}
	if err := p.uniform(dist, lines, opt.SpacingTolerance); err != nil {
		return nil, err
	}
	if p.Len() < minProfileSamples {
		return nil, &ProfileError{Line: line, Reason: fmt.Sprintf("has %d samples after resampling at the median step, at least %d are needed", p.Len(), minProfileSamples)}
	}
	if opt.Resolution > 0 && p.Length() < 1/opt.Resolution {
		return nil, &ProfileError{Line: lines[len(lines)-1], Reason: fmt.Sprintf(
			"the record is %.6g m long (lines %d to %d): a resolution of %g cycles/m needs at least %.6g m",
			p.Length(), lines[0], lines[len(lines)-1], opt.Resolution, 1/opt.Resolution)}
	}
	for c, track := range [][]float64{p.Left, p.Right} {
		if track == nil {
			continue
		}
		if gd, suspect := suspectMillimetres(track, p.Spacing); suspect {
			p.Warnings = append(p.Warnings, fmt.Sprintf(
				"column %d (%s): the elevations look like millimetres: their increments imply Gd(n0) ≈ %.3g m³, rougher than ISO 8608 class H; the file must give metres",
				c+2, p.Names[c+1], gd))
		}
	}
	return p, nil
}

// readHeader checks the header line and stores its names.
func (p *Profile) readHeader(fields []string, line int) error {
	if len(fields) != 2 && len(fields) != 3 {
		return &ProfileError{Line: line, Reason: fmt.Sprintf("the header has %d fields: expected distance_m,left_m,right_m or distance_m,elevation_m", len(fields))}
	}
	numeric := 0
	for c, f := range fields {
		name := strings.Trim(strings.TrimSpace(f), `"`)
		if _, err := strconv.ParseFloat(name, 64); err == nil {
			numeric++
		}
		if name == "" {
			return &ProfileError{Line: line, Column: c + 1, Reason: "empty column name in the header"}
		}
		p.Names = append(p.Names, name)
		if c > 0 && strings.HasSuffix(strings.ToLower(name), "_mm") {
			p.Warnings = append(p.Warnings, fmt.Sprintf("column %d is named %q, but elevations are read as metres", c+1, name))
		}
	}
	if numeric == len(fields) {
		return &ProfileError{Line: line, Reason: "expected a header line such as distance_m,left_m,right_m before the data"}
	}
	return nil
}

// uniform sets Start and Spacing from the distances, resampling the
// tracks by linear interpolation when a step departs from the nominal
// spacing (the mean step) by more than tol of it.
func (p *Profile) uniform(dist []float64, lines []int, tol float64) error {
	n := len(dist)
	span := dist[n-1] - dist[0]
	if math.IsInf(span, 0) {
		return &ProfileError{Line: lines[n-1], Column: 1, Name: p.Names[0], Reason: fmt.Sprintf("the distances span from %g m to %g m, beyond the range of a float64", dist[0], dist[n-1])}
	}
	nominal := span / float64(n-1)
	worst, at := 0.0, 0
	for j := 1; j < n; j++ {
		if d := math.Abs(dist[j]-dist[j-1]-nominal) / nominal; d > worst {
			worst, at = d, j
		}
	}
	p.Start = dist[0]
	if worst <= tol {
		p.Spacing = nominal
		return nil
	}
	steps := make([]float64, n-1)
	for j := range steps {
		steps[j] = dist[j+1] - dist[j]
	}
	sort.Float64s(steps)
	h := steps[len(steps)/2]
	mf := math.Floor(span/h*(1+1e-12)) + 1
	if !(mf <= maxResampleFactor*float64(n)) {
		return &ProfileError{Line: lines[at], Column: 1, Name: p.Names[0], Reason: fmt.Sprintf(
			"the distance step ending here is %.4g m, %.3g times the median step of %.4g m: resampling at the median step would make %.4g samples of %d; look for a gap or a mistyped distance",
			dist[at]-dist[at-1], (dist[at]-dist[at-1])/h, h, mf, n)}
	}
	m := int(mf)
	p.Warnings = append(p.Warnings, fmt.Sprintf(
		"distance steps are not uniform: the step ending on line %d is %.4g m against a mean of %.4g m (%.1f%% off, tolerance %.1f%%); resampled by linear interpolation to %d samples %.4g m apart",
		lines[at], dist[at]-dist[at-1], nominal, 100*worst, 100*tol, m, h))
	p.Spacing = h
	p.Left = resampleLinear(dist, p.Left, p.Start, h, m)
	if p.Right != nil {
		p.Right = resampleLinear(dist, p.Right, p.Start, h, m)
	}
	return nil
}

// maxResampleFactor bounds the resampled record at this many times the
// samples read: more means a gap or a mistyped distance, not jitter.
const maxResampleFactor = 4

// resampleLinear interpolates y(x) linearly at x0 + j h, j < m (x increasing).
func resampleLinear(x, y []float64, x0, h float64, m int) []float64 {
	out := make([]float64, m)
	i := 0
	for j := range out {
		xj := x0 + float64(j)*h
		for i < len(x)-2 && x[i+1] <= xj {
			i++
		}
		t := (xj - x[i]) / (x[i+1] - x[i])
		t = math.Max(0, math.Min(1, t))
		out[j] = y[i] + t*(y[i+1]-y[i])
	}
	return out
}

// suspectMillimetres reports elevations too rough to be metres. For an
// ISO 8608 road of waviness 2, Gd(n) = Gd(n0)(n0/n)², the increment
// Δz = z(x+Δx) - z(x) has the variance (structure function)
//
//	E[Δz²] = 2 ∫_0^∞ Gd(n) (1 - cos 2πnΔx) dn = 2π² Gd(n0) n0² Δx
//
// by ∫_0^∞ (1 - cos ax)/x² dx = πa/2 (a > 0; integrate by parts to
// Dirichlet's ∫_0^∞ sin(ax)/x dx = π/2), so
// Gd(n0) ≈ Var(Δz)/(2π² n0² Δx). The record is suspect when this exceeds
// the upper limit of ISO 8608 class H (2·16e-6·4⁷ m³, ISO 8608:1995): a
// class A road written in mm reads as about 16 m³, a thousand times that
// limit. A steady grade barely matters, since the mean increment is
// removed first. It returns the implied Gd(n0) (m³).
func suspectMillimetres(z []float64, dx float64) (gd0 float64, suspect bool) {
	n := len(z) - 1
	mean := (z[n] - z[0]) / float64(n)
	ss := 0.0
	for j := 1; j <= n; j++ {
		d := z[j] - z[j-1] - mean
		ss += d * d
	}
	gd0 = ss / float64(n) / (2 * math.Pi * math.Pi * ISO8608N0 * ISO8608N0 * dx)
	_, _, upperH, _ := ISOClassGd0("H")
	return gd0, gd0 > upperH
}

// WriteProfile writes p in the profile file format. Elevations are
// written with the given number of decimals (of metres); decimals < 0
// writes the shortest text that reads back to the same float64, so that
// a round trip is exact. Distances are written as Start + j·Spacing with
// the shortest exact text.
func WriteProfile(w io.Writer, p *Profile, decimals int) error {
	if p.Right != nil && len(p.Right) != len(p.Left) {
		return fmt.Errorf("model: profile has %d left and %d right samples", len(p.Left), len(p.Right))
	}
	if !(p.Spacing > 0) {
		return fmt.Errorf("model: profile spacing must be > 0, got %g", p.Spacing)
	}
	bw := bufio.NewWriter(w)
	for _, c := range p.Comments {
		for _, l := range strings.Split(c, "\n") {
			bw.WriteString("# ")
			bw.WriteString(l)
			bw.WriteByte('\n')
		}
	}
	names := p.Names
	want := 2
	if p.Right != nil {
		want = 3
	}
	if len(names) != want {
		names = []string{"distance_m", "elevation_m"}
		if want == 3 {
			names = []string{"distance_m", "left_m", "right_m"}
		}
	}
	bw.WriteString(strings.Join(names, ","))
	bw.WriteByte('\n')
	prec := decimals
	format := byte('f')
	if decimals < 0 {
		prec, format = -1, 'g'
	}
	buf := make([]byte, 0, 96)
	for j := range p.Left {
		buf = buf[:0]
		buf = strconv.AppendFloat(buf, p.Start+float64(j)*p.Spacing, 'g', -1, 64)
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, p.Left[j], format, prec, 64)
		if p.Right != nil {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, p.Right[j], format, prec, 64)
		}
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}
