package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"dampfront/model"
)

var spectrumCommand = &command{name: "spectrum", synopsis: "[flags] PROFILE.csv", minArgs: 1, maxArgs: 1,
	summary: "road spectra of a measured profile, its ISO 8608 class, and a road case from it", about: spectrumAbout, flags: bindSpectrum}

// bodyModeHz is the frequency below which a road case's measured table
// should reach: race-car heave and pitch modes lie at about 1.5-3 Hz
// (common practice, no source), so a table that starts above 1 Hz at the
// case's speed leaves them to extrapolation.
const bodyModeHz = 1.0

// spectrumAbout is the help text of spectrum.
const spectrumAbout = `
Reads a road profile (CSV: distance_m,left_m,right_m, or
distance_m,elevation_m for one track; metres; lines starting with # are
comments; "-" reads standard input), warns of what it changed or suspects
(resampling of uneven steps, values that look like millimetres), estimates
the one-sided displacement PSDs Gd(n) of both tracks and their coherence
by Welch's method (Hann window, half overlap, linear detrend per segment)
and fits the ISO 8608 power law Gd(n) = Gd(n0) (n/n0)^-w, n0 = 0.1
cycles/m, over a band, with its standard errors and class.

The table shows the spectrum in third-octave bands (the mean of the Welch
bins in each) beside the fitted law; --format csv gives every Welch bin,
--format json the fit and every bin, SI throughout.

With --road-case NAME --speed V it writes a road case in the YAML form of
a job spec's road_cases (a one-item list, so that it also serves as a
--roads file): the measured spectrum over the band (third-octave band
means of the mean of both tracks, used for each, with the isotropic
coherence model), or with --fitted the fitted power law. It goes to --out
FILE, or to standard output, which then carries nothing else (the summary
goes to standard error).`

func bindSpectrum(fs *flagSet, e *env) (runFunc, error) {
	segment := fs.Float64("segment", 0, "Welch segment length, `m` (0: an eighth of the record); the resolution is its inverse")
	bandMin := fs.Float64("band-min", 0, "lowest spatial frequency of the fit and of the road case's table, `cycles/m` (0: the fifth bin, at least 0.011)")
	bandMax := fs.Float64("band-max", 0, "highest spatial frequency, `cycles/m` (0: 2.83, or half the Nyquist frequency when lower)")
	format := newFormat("table", "table", "csv", "json")
	fs.Var(format, "format", "output `format`: table, csv (every bin, SI) or json (fit and every bin, SI)")
	caseName := fs.String("road-case", "", "write a road case of this `name`")
	speed := fs.Float64("speed", 0, "speed of the road case, `m/s`")
	fitted := fs.Bool("fitted", false, "the road case gets the fitted power law instead of the measured table")
	outPath := fs.String("out", "", "write the road case to this `file` instead of standard output")
	return func(ctx context.Context, e *env, in *parsed) error {
		pos := in.args
		switch {
		case *segment < 0 || math.IsNaN(*segment) || math.IsInf(*segment, 0):
			return usagef("spectrum", "--segment must be a length in m >= 0, got %g", *segment)
		case *bandMin < 0 || *bandMax < 0 || math.IsNaN(*bandMin) || math.IsNaN(*bandMax) || math.IsInf(*bandMin, 0) || math.IsInf(*bandMax, 0):
			return usagef("spectrum", "--band-min and --band-max must be spatial frequencies >= 0")
		case *bandMin > 0 && *bandMax > 0 && *bandMax <= *bandMin:
			return usagef("spectrum", "--band-max (%g) must be above --band-min (%g)", *bandMax, *bandMin)
		case *caseName == "" && (isFlagSet(fs, "speed") || *fitted || *outPath != ""):
			return usagef("spectrum", "--speed, --fitted and --out need --road-case")
		case *caseName != "" && !(*speed > 0 && !math.IsInf(*speed, 0)):
			return usagef("spectrum", "--road-case needs --speed, a speed in m/s > 0")
		}

		est, err := estimateProfile(e, pos[0], *segment, *bandMin, *bandMax)
		if err != nil {
			return err
		}
		lo := est.lo

		summary, data := e.stdout, e.stdout
		if *caseName != "" && *outPath == "" {
			summary, data = e.stderr, nil // stdout carries only the road case
		}
		if data != nil {
			if err := writeSpectrum(data, format.value, est); err != nil {
				return err
			}
		} else if format.value == "table" {
			writeSpectrumSummary(summary, est)
		}
		if *caseName == "" {
			return nil
		}
		var rc bytes.Buffer
		if err := writeRoadCaseYAML(&rc, est, *caseName, *speed, *fitted); err != nil {
			return err
		}
		if !*fitted && lo**speed > bodyModeHz {
			fmt.Fprintf(e.stderr, "dampfront spectrum: warning: the measured table starts at %.3g cycles/m, %.2g Hz at %g m/s: below that the road case extends the slope of its first segment, over the body modes (1.5-3 Hz); a longer record, a longer --segment or --fitted reaches lower\n",
				lo, lo**speed, *speed)
		}
		if *outPath == "" {
			_, err := e.stdout.Write(rc.Bytes())
			return err
		}
		if err := os.WriteFile(*outPath, rc.Bytes(), 0o644); err != nil {
			return err
		}
		fmt.Fprintf(summary, "Wrote road case %q to %s.\n", *caseName, *outPath)
		return nil
	}, nil
}

// estimateProfile reads a profile, estimates its spectrum and fits the
// ISO 8608 law over the band (zero ends: model.Spectrum.FitBand's).
func estimateProfile(e *env, path string, segment, bandMin, bandMax float64) (*estimate, error) {
	b, err := readInput(e, path)
	if err != nil {
		return nil, &inputFileError{path: path, err: err}
	}
	opt := model.ProfileOptions{}
	if segment > 0 {
		opt.Resolution = 1 / segment
	}
	p, err := model.ReadProfile(bytes.NewReader(b), opt)
	if err != nil {
		return nil, &inputFileError{path: path, err: err}
	}
	for _, w := range p.Warnings {
		fmt.Fprintf(e.stderr, "dampfront spectrum: warning: %s: %s\n", path, w)
	}
	s, err := model.EstimateSpectrum(p, model.WelchOptions{SegmentLength: segment})
	if err != nil {
		return nil, &inputFileError{path: path, err: err}
	}
	lo, hi := s.FitBand(bandMin, bandMax)
	fit, err := s.FitISO(lo, hi)
	if err != nil {
		return nil, usagef("spectrum", "the fit band [%.4g, %.4g] cycles/m: %v", lo, hi, err)
	}
	return &estimate{path: path, profile: p, spectrum: s, fit: fit, lo: lo, hi: hi}, nil
}

// writeSpectrum writes the estimate in a format: table, csv or json.
func writeSpectrum(w io.Writer, format string, est *estimate) error {
	switch format {
	case "csv":
		return writeSpectrumCSV(w, est.spectrum)
	case "json":
		return writeSpectrumJSON(w, est)
	}
	return writeSpectrumTable(w, est)
}

// estimate is a profile with its spectrum and fit.
type estimate struct {
	path     string
	profile  *model.Profile
	spectrum *model.Spectrum
	fit      model.ISOFit
	lo, hi   float64 // band (cycles/m)
}

func tracksText(p *model.Profile) string {
	if p.Right == nil {
		return "one track"
	}
	return "left and right tracks"
}

// writeSpectrumSummary prints what was read, how it was estimated and the fit.
func writeSpectrumSummary(w io.Writer, est *estimate) {
	p, s, f := est.profile, est.spectrum, est.fit
	fmt.Fprintf(w, "Profile %s: %d samples %.4g m apart (%.6g m), %s\n", est.path, p.Len(), p.Spacing, p.Length(), tracksText(p))
	fmt.Fprintf(w, "Welch estimate: %d segments of %.6g m (%d samples, resolution %.4g cycles/m) at %.0f %% overlap, Hann window, linear detrend; %.1f equivalent segments\n",
		s.Segments, s.SegmentLength(), s.SegmentSamples, 1/s.SegmentLength(), pct(1-float64(s.Hop)/float64(s.SegmentSamples)), s.EquivalentSegments)
	of := "the track"
	if p.Right != nil {
		of = "the mean of both tracks"
	}
	fmt.Fprintf(w, "ISO 8608 fit over %.4g-%.4g cycles/m (%d bins, %s): Gd(n0) = %.4g m³ (standard error %.1f %%), waviness %.3f ± %.3f: class %s; residual RMS %.3f in ln Gd\n",
		f.MinN, f.MaxN, f.Points, of, f.Gd0, pct(f.StdErrLogGd0), f.Waviness, f.StdErrWaviness, f.Class, f.ResidualRMS)
}

// psd formats a PSD in m³ with four significant digits.
func psd(v float64) string { return strconv.FormatFloat(v, 'e', 3, 64) }

func writeSpectrumTable(w io.Writer, est *estimate) error {
	writeSpectrumSummary(w, est)
	two := est.profile.Right != nil
	fmt.Fprintln(w)
	t := newTable(w, true)
	if two {
		t.row("n cycles/m", "bins", "Gd left m³", "Gd right m³", "coherence", "ISO fit m³")
	} else {
		t.row("n cycles/m", "bins", "Gd m³", "ISO fit m³")
	}
	f := est.fit
	for _, b := range est.spectrum.ThirdOctaves(0, 0) {
		fitted := "-"
		if b.Centre >= f.MinN && b.Centre <= f.MaxN {
			fitted = psd(f.Gd0 * math.Pow(b.Centre/model.ISO8608N0, -f.Waviness))
		}
		n := strconv.FormatFloat(b.Centre, 'g', 3, 64)
		if two {
			t.row(n, strconv.Itoa(b.Bins), psd(b.Left), psd(b.Right), num(b.Coherence, 3), fitted)
		} else {
			t.row(n, strconv.Itoa(b.Bins), psd(b.Left), fitted)
		}
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "Third-octave band means of the Welch bins; the bins below %.3g cycles/m (the fifth) are biased low by the detrend.\n",
		est.spectrum.N[min(model.FirstGoodBin, len(est.spectrum.N)-1)])
	return nil
}

func writeSpectrumCSV(w io.Writer, s *model.Spectrum) error {
	cw := csv.NewWriter(w)
	head := []string{"n_cycles_per_m", "left_m3"}
	if s.Right != nil {
		head = append(head, "right_m3", "coherence", "ms_coherence")
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	for k := 1; k < len(s.N); k++ {
		rec := []string{siNum(s.N[k]), siNum(s.Left[k])}
		if s.Right != nil {
			rec = append(rec, siNum(s.Right[k]), siNum(s.Coherence[k]), siNum(s.MSCoherence[k]))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// spectrumJSON is the output of --format json.
type spectrumJSON struct {
	Profile struct {
		Path     string   `json:"path"`
		Samples  int      `json:"samples"`
		Spacing  float64  `json:"spacing_m"`
		Length   float64  `json:"length_m"`
		Tracks   int      `json:"tracks"`
		Warnings []string `json:"warnings"`
	} `json:"profile"`
	Welch struct {
		SegmentLength      float64 `json:"segment_m"`
		SegmentSamples     int     `json:"segment_samples"`
		HopSamples         int     `json:"hop_samples"`
		Segments           int     `json:"segments"`
		EquivalentSegments float64 `json:"equivalent_segments"`
		Window             string  `json:"window"`
		Detrend            string  `json:"detrend"`
	} `json:"welch"`
	Fit struct {
		Gd0            float64 `json:"gd0_m3"`
		Waviness       float64 `json:"waviness"`
		Class          string  `json:"iso_class"`
		MinN           float64 `json:"min_n_cycles_per_m"`
		MaxN           float64 `json:"max_n_cycles_per_m"`
		Points         int     `json:"points"`
		StdErrLogGd0   float64 `json:"std_err_ln_gd0"`
		StdErrWaviness float64 `json:"std_err_waviness"`
		ResidualRMS    float64 `json:"residual_rms_ln"`
	} `json:"fit"`
	Spectrum struct {
		N           []float64 `json:"n_cycles_per_m"`
		Left        []float64 `json:"left_m3"`
		Right       []float64 `json:"right_m3,omitempty"`
		Coherence   []float64 `json:"coherence,omitempty"`
		MSCoherence []float64 `json:"ms_coherence,omitempty"`
	} `json:"spectrum"`
}

func writeSpectrumJSON(w io.Writer, est *estimate) error {
	p, s, f := est.profile, est.spectrum, est.fit
	var out spectrumJSON
	out.Profile.Path, out.Profile.Samples, out.Profile.Spacing, out.Profile.Length = est.path, p.Len(), p.Spacing, p.Length()
	out.Profile.Tracks, out.Profile.Warnings = 1, append([]string{}, p.Warnings...)
	if p.Right != nil {
		out.Profile.Tracks = 2
	}
	wj := &out.Welch
	wj.SegmentLength, wj.SegmentSamples, wj.HopSamples, wj.Segments = s.SegmentLength(), s.SegmentSamples, s.Hop, s.Segments
	wj.EquivalentSegments, wj.Window, wj.Detrend = s.EquivalentSegments, "hann", "linear"
	fj := &out.Fit
	fj.Gd0, fj.Waviness, fj.Class, fj.MinN, fj.MaxN, fj.Points = f.Gd0, f.Waviness, f.Class, f.MinN, f.MaxN, f.Points
	fj.StdErrLogGd0, fj.StdErrWaviness, fj.ResidualRMS = f.StdErrLogGd0, f.StdErrWaviness, f.ResidualRMS
	sj := &out.Spectrum
	sj.N, sj.Left = s.N[1:], s.Left[1:]
	if s.Right != nil {
		sj.Right, sj.Coherence, sj.MSCoherence = s.Right[1:], s.Coherence[1:], s.MSCoherence[1:]
	}
	b, err := json.MarshalIndent(&out, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// writeRoadCaseYAML writes a one-item list of dampfront.v1.RoadCase in
// the YAML of a job spec (proto field names, SI): the measured spectrum
// over the band (model.Spectrum.MeasuredBands), or the fitted power law. Values keep six
// significant digits, far finer than the estimate's own scatter (a bin's
// standard error is 1/sqrt(K_eff) of it, tens of per cent).
func writeRoadCaseYAML(w io.Writer, est *estimate, name string, speed float64, fitted bool) error {
	f := est.fit
	quoted, err := json.Marshal(name) // a JSON string is a YAML double-quoted scalar
	if err != nil {
		return err
	}
	var b strings.Builder
	if fitted {
		fmt.Fprintf(&b, "# Road case from %s: the ISO 8608 power law fitted over %.4g-%.4g cycles/m (%d Welch bins; class %s,\n", est.path, f.MinN, f.MaxN, f.Points, f.Class)
		fmt.Fprintf(&b, "# standard errors %.1f %% in Gd(n0) and %.3f in waviness); left-right coherence from the isotropic model.\n", pct(f.StdErrLogGd0), f.StdErrWaviness)
	} else {
		of := "the track"
		if est.profile.Right != nil {
			of = "the mean of both tracks (used for each)"
		}
		fmt.Fprintf(&b, "# Road case from %s: the Welch estimate of %s, over %.4g-%.4g cycles/m\n", est.path, of, est.lo, est.hi)
		fmt.Fprintf(&b, "# (segments of %.6g m, %.1f equivalent) in third-octave band means at the bins' mean frequency;\n", est.spectrum.SegmentLength(), est.spectrum.EquivalentSegments)
		b.WriteString("# interpolated in log-log, extended beyond with the end slopes; left-right coherence from the isotropic model.\n")
	}
	b.WriteString("# Written by dampfront spectrum; paste the item under a job spec's road_cases, or pass this file to --roads.\n")
	fmt.Fprintf(&b, "- name: %s\n  speed_m_per_s: %s\n  weight: 1\n", quoted, strconv.FormatFloat(speed, 'g', -1, 64))
	if fitted {
		fmt.Fprintf(&b, "  power_law: {gd0_m3: %s, waviness: %s}\n", sig6(f.Gd0), sig6(f.Waviness))
		_, err := io.WriteString(w, b.String())
		return err
	}
	m := est.spectrum.MeasuredBands(est.lo, est.hi)
	rc := model.RoadCase{Name: name, Speed: speed, Measured: m}
	if err := rc.Validate(); err != nil {
		return &inputFileError{path: est.path, err: fmt.Errorf("the measured table over [%.4g, %.4g] cycles/m: %w", est.lo, est.hi, err)}
	}
	b.WriteString("  measured:\n")
	yamlList(&b, "n_cycles_per_m", m.N, 7)
	yamlList(&b, "left_m3", m.Left, 6) // no right_m3: the right track is the same
	_, err = io.WriteString(w, b.String())
	return err
}

func sig6(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

// yamlList writes "    key: [a, b, ...]" as a flow sequence over several
// lines, eight values a line, each with digits significant digits.
func yamlList(b *strings.Builder, key string, xs []float64, digits int) {
	fmt.Fprintf(b, "    %s: [", key)
	for i, x := range xs {
		if i > 0 {
			b.WriteString(",")
			if i%8 == 0 {
				b.WriteString("\n      ")
			} else {
				b.WriteString(" ")
			}
		}
		b.WriteString(strconv.FormatFloat(x, 'g', digits, 64))
	}
	b.WriteString("]\n")
}
