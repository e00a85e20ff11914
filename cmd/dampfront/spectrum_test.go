package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"flag"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"dampfront/model"
)

var updateProfile = flag.Bool("update-profile", false, "write testdata/profiles/ashgrove-ring-sector.csv again from inventedSector")

// inventedSector is the generator of testdata/profiles/ashgrove-ring-sector.csv,
// invented data: a synthetic two-track profile of the invented Ashgrove
// Ring circuit, an ISO 8608 power law realised by model.SynthesiseProfile
// from a seeded source. Nothing was measured on any real track.
var inventedSector = struct {
	file     string
	road     model.RoadCase
	synth    model.SynthOptions
	seed     [2]uint64 // rand.NewPCG(seed[0], seed[1])
	decimals int       // of metres in the file (micrometres)
}{
	file:     "profiles/ashgrove-ring-sector.csv",
	road:     model.RoadCase{Name: "Ashgrove Ring sector (invented)", Speed: 55, Gd0: 2.5e-6, Waviness: 2.15},
	synth:    model.SynthOptions{Length: 500, Spacing: 0.05, Track: 1.635},
	seed:     [2]uint64{8608, 3},
	decimals: 6,
}

// generateInventedSector writes the invented profile file.
func generateInventedSector() ([]byte, error) {
	g := inventedSector
	p, err := model.SynthesiseProfile(&g.road, g.synth, rand.New(rand.NewPCG(g.seed[0], g.seed[1])))
	if err != nil {
		return nil, err
	}
	p.Comments = append([]string{
		"Invented data: a synthetic road profile of the invented Ashgrove Ring circuit; no real track was measured.",
		"Two tracks 1.635 m apart, 500 m at 0.05 m, elevations in metres rounded to micrometres.",
		"ISO 8608 power law Gd(n) = 2.5e-6 m^3 (n/0.1)^-2.15 with the isotropic left-right coherence,",
		"realised by model.SynthesiseProfile from rand.NewPCG(8608, 3). Written by inventedSector in",
		"cmd/dampfront/spectrum_test.go: go test ./cmd/dampfront -run TestInventedProfileMatchesItsGenerator -update-profile",
	}, p.Comments...)
	// The file format of model.WriteProfile, with the distances written
	// to the centimetre as a measuring system would give them.
	var b bytes.Buffer
	for _, c := range p.Comments {
		b.WriteString("# " + c + "\n")
	}
	b.WriteString("distance_m,left_m,right_m\n")
	for j := range p.Left {
		b.WriteString(strconv.FormatFloat(float64(j)*p.Spacing, 'f', 2, 64) + "," +
			strconv.FormatFloat(p.Left[j], 'f', g.decimals, 64) + "," + strconv.FormatFloat(p.Right[j], 'f', g.decimals, 64) + "\n")
	}
	return b.Bytes(), nil
}

// The committed profile is what its generator writes: comments, header
// and distances as text, elevations to one unit of the sixth decimal (a
// platform whose FFT differs in the last bits of a float64 may round a
// value the other way).
func TestInventedProfileMatchesItsGenerator(t *testing.T) {
	t.Parallel()
	const lastDecimal = 1e-6 + 1e-12 // m
	want, err := generateInventedSector()
	if err != nil {
		t.Fatal(err)
	}
	path := testdataPath(inventedSector.file)
	if *updateProfile {
		if err := os.WriteFile(path, want, 0o644); err != nil {
			t.Fatal(err)
		}
		t.Logf("wrote %s (%d bytes)", path, len(want))
		return
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	gl, wl := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
	if len(gl) != len(wl) {
		t.Fatalf("%s has %d lines, its generator writes %d: run with -update-profile", path, len(gl), len(wl))
	}
	for i := range wl {
		if gl[i] == wl[i] {
			continue
		}
		g, w := strings.Split(gl[i], ","), strings.Split(wl[i], ",")
		ok := len(g) == len(w) && len(g) == 3 && g[0] == w[0]
		for c := 1; ok && c < 3; c++ {
			a, err1 := strconv.ParseFloat(g[c], 64)
			b, err2 := strconv.ParseFloat(w[c], 64)
			ok = err1 == nil && err2 == nil && math.Abs(a-b) <= lastDecimal
		}
		if !ok {
			t.Fatalf("%s line %d is %q, its generator writes %q: run with -update-profile", path, i+1, gl[i], wl[i])
		}
	}
}

// spectrumOf runs "spectrum --format json" and decodes it.
func spectrumOf(t *testing.T, args ...string) (spectrumJSON, result) {
	t.Helper()
	r := mustRun(t, exitOK, nil, append([]string{"spectrum", "--format", "json"}, args...)...)
	var s spectrumJSON
	if err := json.Unmarshal([]byte(r.stdout), &s); err != nil {
		t.Fatalf("spectrum --format json: %v\n%s", err, r.stdout)
	}
	return s, r
}

// The invented profile's spectrum gives back the power law it was made
// from: Gd(n0) and waviness within 4 of the fit's own standard errors
// (model.ISOFit, derived for a Gaussian record estimated by Welch 1967,
// IEEE Trans. Audio Electroacoust. 15(2):70-73; the synthesis scatters
// less, so they are upper bounds), and the class of ISO 8608:1995 Table 1
// whose limits hold 2.5e-6 m³: A (below 32e-6 m³, twice the class mean
// 16e-6 m³).
func TestSpectrumRecoversTheInventedTrack(t *testing.T) {
	t.Parallel()
	const sigmas = 4
	path := testdataPath(inventedSector.file)
	s, r := spectrumOf(t, path)
	if r.stderr != "" {
		t.Errorf("warnings for a clean profile:\n%s", r.stderr)
	}
	g := inventedSector
	wantSamples := int(g.synth.Length / g.synth.Spacing) // 10000 = 2^4 5^4, no rounding up
	// The spacing is read back as the mean step of the printed distances,
	// equal to 0.05 m up to their rounding (relative 1e-12, a few hundred
	// ulps).
	const spacingTol = 1e-12
	if s.Profile.Samples != wantSamples || math.Abs(s.Profile.Spacing-g.synth.Spacing) > spacingTol*g.synth.Spacing || s.Profile.Tracks != 2 {
		t.Errorf("profile %+v, want %d samples %g m apart on two tracks", s.Profile, wantSamples, g.synth.Spacing)
	}
	// Default Welch segments: an eighth of the 500 m record, 1250 samples
	// (2·5^4, so not shortened), 15 segments at half overlap.
	if s.Welch.SegmentSamples != 1250 || s.Welch.Segments != 15 {
		t.Errorf("welch %+v, want 15 segments of 1250 samples", s.Welch)
	}
	// Default band: the fifth bin, 5/62.5 m = 0.08 cycles/m, to 2.83 cycles/m.
	f := s.Fit
	if math.Abs(f.MinN-0.08) > 1e-12 || f.MaxN > model.ISOBandTop || f.MaxN < model.ISOBandTop-1/62.5 {
		t.Errorf("fit band [%g, %g] cycles/m, want [0.08, 2.83]", f.MinN, f.MaxN)
	}
	dlog := math.Log(f.Gd0 / g.road.Gd0)
	if math.Abs(dlog) > sigmas*f.StdErrLogGd0 {
		t.Errorf("Gd(n0) = %.4g m³, %.2f%% from %.4g (standard error %.2f%%)", f.Gd0, 100*dlog, g.road.Gd0, 100*f.StdErrLogGd0)
	}
	if math.Abs(f.Waviness-g.road.Waviness) > sigmas*f.StdErrWaviness {
		t.Errorf("waviness %.4f, want %g within %d x %.4f", f.Waviness, g.road.Waviness, sigmas, f.StdErrWaviness)
	}
	if f.Class != "A" {
		t.Errorf("class %s, want A", f.Class)
	}
	t.Logf("fit: Gd0 %.4g m³ (%+.2f%%, se %.2f%%), waviness %.4f (%+.4f, se %.4f), %d bins",
		f.Gd0, 100*dlog, 100*f.StdErrLogGd0, f.Waviness, f.Waviness-g.road.Waviness, f.StdErrWaviness, f.Points)
	// Bins 1 to N_s/2 of the segment, each track and the coherence.
	nb := s.Welch.SegmentSamples / 2
	sp := s.Spectrum
	if len(sp.N) != nb || len(sp.Left) != nb || len(sp.Right) != nb || len(sp.Coherence) != nb {
		t.Errorf("spectrum has %d/%d/%d/%d values, want %d bins", len(sp.N), len(sp.Left), len(sp.Right), len(sp.Coherence), nb)
	}

	table := mustRun(t, exitOK, nil, "spectrum", path)
	for _, want := range []string{"Profile " + path + ": 10000 samples 0.05 m apart (500 m), left and right tracks",
		"ISO 8608 fit over 0.08-", "class A", "n cycles/m", "Gd left m³", "Gd right m³", "coherence", "ISO fit m³", "Third-octave band means"} {
		if !strings.Contains(table.stdout, want) {
			t.Errorf("table lacks %q:\n%s", want, table.stdout)
		}
	}
	rows, err := csv.NewReader(strings.NewReader(mustRun(t, exitOK, nil, "spectrum", path, "--format", "csv").stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != nb+1 || strings.Join(rows[0], ",") != "n_cycles_per_m,left_m3,right_m3,coherence,ms_coherence" {
		t.Errorf("csv has %d rows, header %v; want %d bins and the SI header", len(rows), rows[0], nb)
	}
}

// What the reader changes or suspects is said on standard error, and the
// estimate still comes out: distances off the uniform step by 20 % are
// resampled; elevations written in millimetres are flagged (an ISO class
// A road in mm reads a thousand times rougher than class H, ISO 8608).
func TestSpectrumWarnsOfResamplingAndMillimetres(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(testdataPath(inventedSector.file))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	var uneven, mm []string
	data := 0
	for _, l := range lines {
		if strings.HasPrefix(l, "#") || strings.HasPrefix(l, "distance") {
			uneven, mm = append(uneven, l), append(mm, l)
			continue
		}
		f := strings.Split(l, ",")
		x, _ := strconv.ParseFloat(f[0], 64)
		if data%100 == 50 {
			x += 0.01 // 20 % of the 0.05 m step
		}
		uneven = append(uneven, strconv.FormatFloat(x, 'g', -1, 64)+","+f[1]+","+f[2])
		l1, _ := strconv.ParseFloat(f[1], 64)
		l2, _ := strconv.ParseFloat(f[2], 64)
		mm = append(mm, f[0]+","+strconv.FormatFloat(1000*l1, 'f', 3, 64)+","+strconv.FormatFloat(1000*l2, 'f', 3, 64))
		data++
	}
	dir := t.TempDir()
	tests := []struct {
		name  string
		lines []string
		want  string
	}{
		{"uneven steps", uneven, "resampled by linear interpolation"},
		{"millimetres", mm, "look like millimetres"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			p := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "-")+".csv")
			if err := os.WriteFile(p, []byte(strings.Join(tc.lines, "\n")+"\n"), 0o644); err != nil {
				t.Fatal(err)
			}
			s, r := spectrumOf(t, p)
			if !strings.Contains(r.stderr, "warning: "+p) || !strings.Contains(r.stderr, tc.want) {
				t.Errorf("stderr lacks the warning %q:\n%s", tc.want, r.stderr)
			}
			if len(s.Profile.Warnings) == 0 || !strings.Contains(s.Profile.Warnings[0], tc.want) {
				t.Errorf("json warnings %q lack %q", s.Profile.Warnings, tc.want)
			}
		})
	}
}

// Usage and input errors of spectrum exit with code 2 and say what is wrong.
func TestSpectrumUsageErrors(t *testing.T) {
	t.Parallel()
	path := testdataPath(inventedSector.file)
	dir := t.TempDir()
	unsorted := filepath.Join(dir, "unsorted.csv")
	var b strings.Builder
	b.WriteString("distance_m,left_m,right_m\n")
	for j := 0; j < 40; j++ {
		x := 0.05 * float64(j)
		if j == 20 {
			x = 0.5 // goes back
		}
		b.WriteString(strconv.FormatFloat(x, 'g', -1, 64) + ",0.001,0.002\n")
	}
	if err := os.WriteFile(unsorted, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		args []string
		want string
	}{
		{"no profile", []string{"spectrum"}, "missing argument\nUsage: dampfront spectrum [flags] PROFILE.csv\n"},
		{"two profiles", []string{"spectrum", path, path}, "unexpected argument"},
		{"missing file", []string{"spectrum", "no-such-profile.csv"}, "no-such-profile.csv"},
		{"not a profile", []string{"spectrum", testdataPath("demo-job.yaml")}, "profile line"},
		{"unsorted", []string{"spectrum", unsorted}, "profile line 22, column 1 (distance_m): distance 0.5 m is less than"},
		{"segment longer than the record", []string{"spectrum", path, "--segment", "1000"}, "the record is 500 m long (lines"},
		{"negative segment", []string{"spectrum", path, "--segment", "-5"}, "--segment must be"},
		{"reversed band", []string{"spectrum", path, "--band-min", "2", "--band-max", "1"}, "--band-max (1) must be above --band-min (2)"},
		{"band with too few bins", []string{"spectrum", path, "--band-min", "2", "--band-max", "2.02"}, "at least 3 are needed"},
		{"speed without road case", []string{"spectrum", path, "--speed", "50"}, "--speed, --fitted and --out need --road-case"},
		{"road case without speed", []string{"spectrum", path, "--road-case", "x"}, "--road-case needs --speed"},
		{"bad format", []string{"spectrum", path, "--format", "xml"}, `"xml" is not one of table, csv, json`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			r := mustRun(t, exitUsage, nil, tc.args...)
			if !strings.Contains(r.stderr, tc.want) {
				t.Errorf("stderr lacks %q:\n%s", tc.want, r.stderr)
			}
		})
	}
}

// The road cases spectrum writes are accepted where road cases go: as a
// --roads file and pasted under a spec's road_cases, by eval on a server
// (the API's own checks of a RoadCase) and by the local time-domain
// check. The fitted case carries the fit's values, the measured one a
// table over the band.
func TestSpectrumRoadCaseRoundTrip(t *testing.T) {
	t.Parallel()
	path := testdataPath(inventedSector.file)
	dir := t.TempDir()
	s, _ := spectrumOf(t, path)

	measured := filepath.Join(dir, "measured.yaml")
	r := mustRun(t, exitOK, nil, "spectrum", path, "--road-case", "Ashgrove Ring sector, measured", "--speed", "55", "--out", measured)
	if !strings.Contains(r.stdout, "ISO 8608 fit over") || !strings.Contains(r.stdout, "Wrote road case \"Ashgrove Ring sector, measured\" to "+measured) {
		t.Errorf("spectrum --out: stdout lacks the table or the note:\n%s", r.stdout)
	}
	if !strings.Contains(r.stderr, "the measured table starts at 0.08 cycles/m, 4.4 Hz at 55 m/s") {
		t.Errorf("no warning that the table starts above the body modes:\n%s", r.stderr)
	}
	// Without --out, standard output is the road case alone.
	r = mustRun(t, exitOK, nil, "spectrum", path, "--road-case", "Ashgrove Ring sector, fitted", "--speed", "55", "--fitted")
	if !strings.HasPrefix(r.stdout, "# Road case from ") || strings.Contains(r.stdout, "ISO 8608 fit over") || !strings.Contains(r.stderr, "ISO 8608 fit over") {
		t.Errorf("spectrum --road-case to stdout: stdout\n%s\nstderr\n%s", r.stdout, r.stderr)
	}
	fitted := filepath.Join(dir, "fitted.yaml")
	if err := os.WriteFile(fitted, []byte(r.stdout), 0o644); err != nil {
		t.Fatal(err)
	}

	// Read back as the CLI reads --roads files: six significant digits
	// of the fit (relative 5e-6) and every band of the table.
	const sixDigits = 5e-6
	fc, err := readRoadCases(&env{}, fitted)
	if err != nil {
		t.Fatal(err)
	}
	pl := fc[0].GetPowerLaw()
	if len(fc) != 1 || fc[0].GetName() != "Ashgrove Ring sector, fitted" || fc[0].GetSpeedMPerS() != 55 ||
		math.Abs(pl.GetGd0M3()/s.Fit.Gd0-1) > sixDigits || math.Abs(pl.GetWaviness()/s.Fit.Waviness-1) > sixDigits {
		t.Errorf("fitted road case %v, want the fit Gd0 %g, w %g", fc, s.Fit.Gd0, s.Fit.Waviness)
	}
	mc, err := readRoadCases(&env{}, measured)
	if err != nil {
		t.Fatal(err)
	}
	m := mc[0].GetMeasured()
	// Third-octave bands from the one holding 0.08 cycles/m to the one
	// holding 2.83: 0.1·2^(j/3) for j = -1..14, 16 bands.
	if len(mc) != 1 || len(m.GetNCyclesPerM()) != 16 || len(m.GetLeftM3()) != 16 || m.GetRightM3() != nil || m.GetCoherence() != nil {
		t.Errorf("measured road case %v, want 16 bands of one PSD", mc)
	}

	srv := startServer(t, filepath.Join(t.TempDir(), "roads.db"), nil)
	setup := testdataPath("candidate-setup.yaml")
	demo, err := os.ReadFile(testdataPath("demo-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	mb, err := os.ReadFile(measured)
	if err != nil {
		t.Fatal(err)
	}
	start, end := strings.Index(string(demo), "road_cases:"), strings.Index(string(demo), "design_space:")
	pasted := filepath.Join(dir, "pasted.yaml")
	if err := os.WriteFile(pasted, []byte(string(demo[:start])+"road_cases:\n"+string(mb)+"\n"+string(demo[end:])), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{
		{"eval", "--spec", testdataPath("demo-job.yaml"), "--roads", measured, "--setup", setup},
		{"eval", "--spec", testdataPath("demo-job.yaml"), "--roads", fitted, "--setup", setup},
		{"eval", "--spec", pasted, "--setup", setup},
	} {
		r := mustRun(t, exitOK, nil, srv.client(args...)...)
		if !strings.Contains(r.stdout, "Ashgrove Ring sector, ") || !strings.Contains(r.stdout, cautionText) {
			t.Errorf("%v:\n%s", args, r.stdout)
		}
	}
	for _, roads := range []string{measured, fitted} {
		v, _ := verifyOf(t, "--spec", testdataPath("demo-job.yaml"), "--roads", roads, "--setup", setup)
		if len(v.Cases) != 1 || !strings.HasPrefix(v.Cases[0].RoadCase, "Ashgrove Ring sector, ") {
			t.Errorf("verify on %s: %+v", roads, v.Cases)
		}
	}
}

// A one-track profile (distance_m,elevation_m) gives one PSD, no
// coherence, and a road case of that track.
func TestSpectrumOneTrack(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(testdataPath(inventedSector.file))
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, l := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		if strings.HasPrefix(l, "#") {
			continue
		}
		f := strings.Split(l, ",")
		if f[0] == "distance_m" {
			f[1] = "elevation_m"
		}
		out = append(out, f[0]+","+f[1])
	}
	p := filepath.Join(t.TempDir(), "one-track.csv")
	if err := os.WriteFile(p, []byte(strings.Join(out, "\n")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	s, _ := spectrumOf(t, p)
	if s.Profile.Tracks != 1 || s.Spectrum.Right != nil || s.Spectrum.Coherence != nil || len(s.Spectrum.Left) != s.Welch.SegmentSamples/2 {
		t.Errorf("one track: profile %+v, %d right values, %d coherence values", s.Profile, len(s.Spectrum.Right), len(s.Spectrum.Coherence))
	}
	table := mustRun(t, exitOK, nil, "spectrum", p).stdout
	if !strings.Contains(table, "one track") || !strings.Contains(table, "Gd m³") || strings.Contains(table, "coherence") {
		t.Errorf("one-track table:\n%s", table)
	}
	rc := filepath.Join(t.TempDir(), "rc.yaml")
	mustRun(t, exitOK, nil, "spectrum", p, "--road-case", "left track", "--speed", "40", "--out", rc)
	cases, err := readRoadCases(&env{}, rc)
	if err != nil {
		t.Fatal(err)
	}
	if m := cases[0].GetMeasured(); len(m.GetLeftM3()) == 0 || m.GetRightM3() != nil {
		t.Errorf("one-track road case %v", cases[0])
	}
}
