package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	"google.golang.org/protobuf/encoding/protojson"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// The display of a time-domain check (verify): its rows in trade units,
// the verdict of each case in words, the peaks and warnings, and the
// report in SI for --format json. The judgement itself is the model's
// (model.VerifyRow.Verdict).

// relabel is q under another label and column, in the same unit.
func relabel(q quantity, label, column string) quantity {
	q.label, q.column = label, column
	return q
}

// withPrec is q shown with other decimals.
func withPrec(q quantity, prec int) quantity {
	q.prec = prec
	return q
}

// fractionMetrics are the time fractions (probabilities in the frequency
// domain), whose differences and errors are shown in percentage points:
// relative to a Gaussian tail probability of 1e-30 they mean nothing.
var fractionMetrics = map[string]bool{"lift_off_fraction": true, "bump_stop_fraction": true}

// verifyMetrics pairs each metric name of model.VerifyRow (without its
// corner or axle) with its display.
var verifyMetrics = map[string]quantity{
	"tyre_load_sd_n":               relabel(qLoadSDRel, "tyre load sd", "tyre_load_sd_n"),
	"lift_off_fraction":            relabel(qProbability, "lift-off time", "lift_off_fraction"),
	"ride_height_sd_m":             qRideSD,
	"pitch_sd_rad":                 qPitchSD,
	"roll_sd_rad":                  relabel(qPitchSD, "roll sd", "roll_sd_rad"),
	"heave_accel_sd_m_per_s2":      qHeaveSD,
	"travel_sd_m":                  qTravelSD,
	"bump_stop_fraction":           relabel(qProbability, "bump-stop time", "bump_stop_fraction"),
	"damper_velocity_sd_m_per_s":   qDamperVelSD,
	"equivalent_damping_n_s_per_m": relabel(qSlope, "equiv. damping (wheel)", "equivalent_damping_n_s_per_m"),
	"mean_damper_force_n":          relabel(qForce, "mean damper force", "mean_damper_force_n"),
	"ride_height_shift_m":          qRideShift,
	"pitch_shift_rad":              withPrec(relabel(qPitchSD, "pitch shift", "pitch_shift_rad"), 5),
	"travel_shift_m":               relabel(qTravelSD, "travel shift", "travel_shift_m"),
}

// shownRow is one row of a verify table in trade units.
type shownRow struct {
	label, unit string
	freq, time  string
	diffPct     string // "-" when the frequency-domain value is 0
	errPct      string // "-" when there is no statistical error
	verdict     model.Verdict
	sigmas      float64 // |Diff|/StatError, NaN when not judged
}

// verifyMetric is the display of a metric name of model.VerifyRow and
// its corner or axle ("" when none).
func verifyMetric(metric string) (q quantity, base, pos string) {
	base, pos, _ = strings.Cut(strings.TrimSuffix(metric, "]"), "[")
	q, ok := verifyMetrics[base]
	if !ok {
		q = quantity{label: strings.ReplaceAll(base, "_", " "), scale: 1, prec: 4, column: base}
	}
	return q, base, pos
}

// metricLabel is a metric's label in a table, its corner or axle after it.
func metricLabel(metric string) string {
	q, _, pos := verifyMetric(metric)
	if pos != "" {
		return q.label + " " + pos
	}
	return q.label
}

// showRow converts a row to trade units; static are the case's static
// tyre loads (N).
func showRow(r model.VerifyRow, static [4]float64) shownRow {
	q, base, pos := verifyMetric(r.Metric)
	f, t := r.Frequency, r.Time
	if base == "tyre_load_sd_n" {
		i := cornerIndex(pos)
		if i >= 0 && static[i] > 0 {
			f, t = f/static[i], t/static[i]
		}
	}
	out := shownRow{label: metricLabel(r.Metric), unit: q.unit, freq: tradeNum(q, f), time: tradeNum(q, t), diffPct: "-", errPct: "-",
		verdict: r.Verdict(), sigmas: r.Sigmas()}
	absolute := fractionMetrics[base] || r.Frequency == 0
	switch {
	case absolute && fractionMetrics[base]:
		out.diffPct = signedNum(q.trade(r.Diff), q.prec) + " pt"
	case absolute:
		out.diffPct = signedNum(q.trade(r.Diff), q.prec) + " " + q.unit
	default:
		out.diffPct = signedNum(pct(r.RelDiff), 1)
	}
	if r.Judged() {
		switch {
		case absolute && fractionMetrics[base]:
			out.errPct = fmt.Sprintf("%.*f pt", q.prec, q.trade(r.StatError))
		case absolute:
			out.errPct = fmt.Sprintf("%.*f %s", q.prec, q.trade(r.StatError), q.unit)
		default:
			out.errPct = fmt.Sprintf("%.1f", pct(r.StatError/math.Abs(r.Frequency)))
		}
	}
	if r.Diff == 0 && r.Frequency == 0 {
		out.diffPct = "0"
	}
	return out
}

// signedNum is v with prec decimals and its sign, "0.000" when it rounds
// to zero.
func signedNum(v float64, prec int) string {
	s := fmt.Sprintf("%+.*f", prec, v)
	if strings.Trim(s, "+-0.") == "" {
		return s[1:]
	}
	return s
}

func cornerIndex(name string) int {
	for i, c := range model.CornerNames {
		if c == name {
			return i
		}
	}
	return -1
}

// verdictLine is the judgement of one case (model.VerifyCase.Verdict)
// with the rows that differ, shown.
func verdictLine(rows []shownRow) string {
	var off []string
	for _, r := range rows {
		if r.verdict == model.VerdictDiffers {
			unit := ""
			if r.unit != "" {
				unit = " " + r.unit
			}
			rel := ""
			if !strings.HasSuffix(r.diffPct, "pt") && r.diffPct != "-" {
				rel = r.diffPct + " %, "
			}
			off = append(off, fmt.Sprintf("%s %s against %s%s (%s%.1f errors)", r.label, r.time, r.freq, unit, rel, r.sigmas))
		}
	}
	if len(off) == 0 {
		return "linear answer holds within the statistical error"
	}
	return fmt.Sprintf("differs by more than %d statistical errors in: %s", model.VerdictSigmas, strings.Join(off, "; "))
}

func writeVerifyTable(w io.Writer, rep *model.VerifyReport, in *api.ModelInputs, setup *pb.Setup, source string) error {
	fmt.Fprintf(w, "Time-domain check of %s on %s: %s\n", source, plain(in.Vehicle.Name), setupText(setup))
	fmt.Fprintf(w, "Road seed %d. Frequency domain: statistically linearised model; time domain: nonlinear dampers, tyres may leave the road.\n", rep.Seed)
	for i := range rep.Cases {
		c := &rep.Cases[i]
		tm := &c.Time
		fmt.Fprintf(w, "\nRoad case %q at %g m/s: %g s of road after %.1f s settling, RK4 step %.3f ms, road up to %.3g cycles/m\n",
			c.Case, in.RoadCases[i].Speed, tm.Duration, tm.Settle, tm.Step*1000, tm.RoadMaxN)
		rows := make([]shownRow, len(c.Rows))
		for k, r := range c.Rows {
			rows[k] = showRow(r, c.Frequency.StaticTyreLoad)
		}
		lw, uw := len("metric"), len("unit")
		for _, r := range rows {
			lw, uw = max(lw, len(r.label)), max(uw, len(r.unit))
		}
		t := newTable(w, true)
		t.row(fmt.Sprintf("%-*s", lw, "metric"), fmt.Sprintf("%-*s", uw, "unit"), "frequency domain", "time domain", "difference %", "statistical error %")
		for _, r := range rows {
			t.row(fmt.Sprintf("%-*s", lw, r.label), fmt.Sprintf("%-*s", uw, r.unit), r.freq, r.time, r.diffPct, r.errPct)
		}
		if err := t.flush(); err != nil {
			return err
		}
		if err := writePeaks(w, tm); err != nil {
			return err
		}
		for _, wn := range timeWarnings(tm) {
			fmt.Fprintf(w, "  warning: %s\n", plain(wn))
		}
		fmt.Fprintf(w, "  verdict: %s\n", verdictLine(rows))
	}
	return nil
}

// timeWarnings names the corners whose tyre left the road or whose travel
// passed the bump-stop gap for more than verifyWarn of the time.
func timeWarnings(tm *model.TimeMetrics) []string {
	var out []string
	for i, c := range model.CornerNames {
		if p := tm.LiftOffProbability[i]; p > verifyWarn {
			out = append(out, fmt.Sprintf("%s tyre off the road %s %% of the time (over %s %%)", c, tradeNum(qProbability, p), num(pct(verifyWarn), 0)))
		}
	}
	for i, c := range model.CornerNames {
		if p := tm.BumpStopProbability[i]; p > verifyWarn {
			out = append(out, fmt.Sprintf("%s travel beyond the bump-stop gap %s %% of the time (over %s %%)", c, tradeNum(qProbability, p), num(pct(verifyWarn), 0)))
		}
	}
	return out
}

// writePeaks prints the extremes of the time history per corner and axle.
func writePeaks(w io.Writer, tm *model.TimeMetrics) error {
	p := &tm.Peaks
	fmt.Fprintln(w, "  peaks of the time history:")
	t := newTable(w, true)
	const lw, uw = 31, 4 // the longest label and unit below
	t.row(fmt.Sprintf("%-*s", lw, ""), fmt.Sprintf("%-*s", uw, ""), "FL", "FR", "RL", "RR")
	corner := func(label string, q quantity, v [4]float64) {
		t.row(fmt.Sprintf("%-*s", lw, label), fmt.Sprintf("%-*s", uw, q.unit), tradeNum(q, v[0]), tradeNum(q, v[1]), tradeNum(q, v[2]), tradeNum(q, v[3]))
	}
	corner("lowest tyre load", qForce, p.TyreLoadMin)
	corner("highest tyre load", qForce, p.TyreLoadMax)
	corner("most travel in bump", qTravelSD, p.TravelMax)
	corner("most travel in rebound", qTravelSD, p.TravelMin)
	corner("highest damper speed in bump", qDamperVelSD, p.DamperVelocityMax)
	corner("highest damper speed in rebound", qDamperVelSD, p.DamperVelocityMin)
	if p.BumpStopForceMax != [4]float64{} {
		corner("highest bump-stop force", qForce, p.BumpStopForceMax)
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "  ride height change from %s to %s mm front, %s to %s mm rear; largest heave acceleration %s g\n",
		tradeNum(qRideShift, p.RideHeightMin[0]), tradeNum(qRideShift, p.RideHeightMax[0]),
		tradeNum(qRideShift, p.RideHeightMin[1]), tradeNum(qRideShift, p.RideHeightMax[1]),
		tradeNum(qHeaveSD, p.HeaveAccelMax))
	return nil
}

// verifyJSON is the report of --format json, SI throughout.
type verifyJSON struct {
	Source  string           `json:"source"`
	Vehicle string           `json:"vehicle"`
	Setup   json.RawMessage  `json:"setup"`
	Seed    uint64           `json:"seed"`
	Sigmas  float64          `json:"verdict_sigmas"`
	Cases   []verifyCaseJSON `json:"cases"`
	Caution string           `json:"caution"`
}

type verifyCaseJSON struct {
	RoadCase string          `json:"road_case"`
	Speed    float64         `json:"speed_m_per_s"`
	Holds    bool            `json:"holds"`
	Verdict  string          `json:"verdict"`
	Differs  []string        `json:"differs"`
	Step     float64         `json:"step_s"`
	Settle   float64         `json:"settle_s"`
	Duration float64         `json:"duration_s"`
	Samples  int             `json:"samples"`
	RoadMaxN float64         `json:"road_max_n_cycles_per_m"`
	Static   [4]float64      `json:"static_tyre_load_n"`
	Rows     []verifyRowJSON `json:"rows"`
	Peaks    verifyPeaksJSON `json:"peaks"`
	Warnings []string        `json:"warnings"`
}

type verifyRowJSON struct {
	Metric    string  `json:"metric"`
	Frequency float64 `json:"frequency"`
	Time      float64 `json:"time"`
	Diff      float64 `json:"diff"`
	RelDiff   float64 `json:"rel_diff"`
	StatError float64 `json:"stat_error"`
}

type verifyPeaksJSON struct {
	TyreLoadMin       [4]float64 `json:"tyre_load_min_n"`
	TyreLoadMax       [4]float64 `json:"tyre_load_max_n"`
	TravelMax         [4]float64 `json:"travel_max_m"`
	TravelMin         [4]float64 `json:"travel_min_m"`
	DamperVelocityMax [4]float64 `json:"damper_velocity_max_m_per_s"`
	DamperVelocityMin [4]float64 `json:"damper_velocity_min_m_per_s"`
	BumpStopForceMax  [4]float64 `json:"bump_stop_force_max_n"`
	RideHeightMin     [2]float64 `json:"ride_height_min_m"`
	RideHeightMax     [2]float64 `json:"ride_height_max_m"`
	HeaveAccelMax     float64    `json:"heave_accel_max_m_per_s2"`
}

func writeVerifyJSON(w io.Writer, rep *model.VerifyReport, in *api.ModelInputs, setup *pb.Setup, source string) error {
	out, err := verifyReportJSON(rep, in, setup, source)
	if err != nil {
		return err
	}
	b, err := json.MarshalIndent(out, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// verifyReportJSON is the report of one setup as --format json shows it.
func verifyReportJSON(rep *model.VerifyReport, in *api.ModelInputs, setup *pb.Setup, source string) (verifyJSON, error) {
	sb, err := protojson.MarshalOptions{UseProtoNames: true}.Marshal(setup)
	if err != nil {
		return verifyJSON{}, err
	}
	out := verifyJSON{Source: source, Vehicle: in.Vehicle.Name, Setup: sb, Seed: rep.Seed, Sigmas: model.VerdictSigmas,
		Caution: strings.Join(strings.Fields(caution), " ")}
	for i := range rep.Cases {
		c := &rep.Cases[i]
		tm := &c.Time
		cj := verifyCaseJSON{RoadCase: c.Case, Speed: in.RoadCases[i].Speed, Step: tm.Step, Settle: tm.Settle,
			Duration: tm.Duration, Samples: tm.Samples, RoadMaxN: tm.RoadMaxN, Static: c.Frequency.StaticTyreLoad,
			Differs: []string{}, Warnings: timeWarnings(tm)}
		shown := make([]shownRow, len(c.Rows))
		for k, r := range c.Rows {
			shown[k] = showRow(r, c.Frequency.StaticTyreLoad)
			cj.Rows = append(cj.Rows, verifyRowJSON{Metric: r.Metric, Frequency: r.Frequency, Time: r.Time,
				Diff: r.Diff, RelDiff: r.RelDiff, StatError: finiteOr0(r.StatError)})
			if r.Verdict() == model.VerdictDiffers {
				cj.Differs = append(cj.Differs, r.Metric)
			}
		}
		cj.Holds, cj.Verdict = c.Verdict() == model.VerdictHolds, verdictLine(shown)
		if cj.Warnings == nil {
			cj.Warnings = []string{}
		}
		p := &tm.Peaks
		cj.Peaks = verifyPeaksJSON{p.TyreLoadMin, p.TyreLoadMax, p.TravelMax, p.TravelMin, p.DamperVelocityMax,
			p.DamperVelocityMin, p.BumpStopForceMax, p.RideHeightMin, p.RideHeightMax, p.HeaveAccelMax}
		out.Cases = append(out.Cases, cj)
	}
	return out, nil
}

func finiteOr0(x float64) float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0
	}
	return x
}
