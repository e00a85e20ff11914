package model

import (
	"errors"
	"fmt"
	"math"
)

// VerifyOptions tune Verify. The zero value gives the defaults.
type VerifyOptions struct {
	Time  TimeOptions      // the time-domain runs (duration, step, bump stops)
	Model EvaluatorOptions // the frequency-domain evaluator
	// Seed seeds the road realisations: case i draws its phases from
	// rand.New(rand.NewPCG(Seed, i)). It is stored in the report.
	Seed uint64
}

// VerifyReport compares the frequency-domain model with the time-domain
// check for one setup.
type VerifyReport struct {
	Setup Setup
	Seed  uint64
	Cases []VerifyCase
}

// VerifyCase is the comparison on one road case.
type VerifyCase struct {
	Case      string
	Frequency CaseMetrics // the statistically linearised frequency-domain metrics
	Time      TimeMetrics // the nonlinear time-domain metrics, peaks included
	Rows      []VerifyRow // the two side by side
}

// VerifyRow is one metric in both models. Units are SI and named in the
// metric (for example "tyre_load_sd_n[FL]").
type VerifyRow struct {
	Metric    string
	Frequency float64 // frequency-domain value
	Time      float64 // time-domain value
	Diff      float64 // Time - Frequency
	RelDiff   float64 // Diff/|Frequency|; 0 when Frequency is 0
	// StatError is the standard deviation the time-domain value would
	// have from the record length alone if the response were the Gaussian
	// process of the frequency-domain spectrum (see Verify); 0 when not
	// estimated. A |Diff| of a few StatError is within sampling error;
	// beyond that it is the nonlinearity (or lift-off, bump stops).
	StatError float64
}

// Verify runs the frequency-domain model (Evaluator, with statistical
// linearisation) and the time-domain check (SimulateCase) for a setup on
// every road case and tabulates their metrics side by side.
//
// Statistical error. For a zero-mean Gaussian process y of one-sided PSD
// G(f) and variance σ² = ∫G df, the sample variance over a record of
// length T ≫ the correlation time has
//
//	Var[σ̂²] = (2/T) ∫_(-∞)^(∞) R(τ)² dτ = (1/T) ∫_0^∞ G(f)² df
//
// (Isserlis' theorem for E[y²(t) y²(t+τ)] and Parseval; Bendat & Piersol,
// "Random Data: Analysis and Measurement Procedures", 4th ed., Wiley 2010,
// ch. 8, from memory, write it as ε = 1/sqrt(B_e T) with the statistical
// bandwidth B_e = (∫G)²/∫G²). The relative error of σ̂ is half that of
// σ̂², so StatError = σ/(2 sqrt(B_e T)), with G the frequency-domain
// output spectrum (integrated on its grid). For a time fraction p it is
// sqrt(p(1-p)/(B_e T)), B_e of tyre load or travel (a rough figure).
// Because the synthesised road has deterministic amplitudes (see
// SynthesiseProfile), the time-domain scatter of a linear car is below
// these figures: they are upper bounds. For a mean shift the linear
// figure, sqrt(G(0)/(2T)) with G(0) read at the grid's lowest frequency,
// leaves out the slow wander of a nonlinear car's mean (the jacking
// follows the road's local roughness), which on the demo car is 4 to 15
// times larger; the error of a mean shift is therefore the larger of that
// figure and the batch-means error of the record itself (16 blocks, see
// batchMeansError).
//
// Cost. The default record (120 s per case after settling) gives standard
// deviations within about 1-2% statistical error; the demo car takes a
// few tenths of a second per case on one core (BenchmarkVerifyPoint).
func Verify(v Vehicle, cases []RoadCase, s Setup, opt VerifyOptions) (*VerifyReport, error) {
	e, err := NewEvaluator(v, cases, opt.Model)
	if err != nil {
		return nil, err
	}
	var p problems
	p.merge("setup.", s.Validate())
	p.merge("setup.", e.v.CheckSetup(&s))
	p.merge("time.", opt.Time.validate())
	if err := p.err(); err != nil {
		return nil, err
	}
	return newVerifier(e, v, opt).Verify(s)
}

// Verifier runs Verify for many setups on one car, road cases and
// options, with the frequency-domain evaluator prepared once. It is safe
// for concurrent use, and its reports are those of Verify, bit for bit.
//
// Memory. The road's tyre inputs of each case (128 bytes a step of the
// record: 15 MB for 120 s at 1 ms) are built at the first check and kept
// by the Verifier for the others (roadInputs), so a check allocates
// little beyond its report.
type Verifier struct {
	e      *Evaluator
	v      Vehicle
	opt    VerifyOptions
	inputs *roadInputs
}

func newVerifier(e *Evaluator, v Vehicle, opt VerifyOptions) *Verifier {
	return &Verifier{e: e, v: v, opt: opt, inputs: newRoadInputs(len(e.cases))}
}

// NewVerifier prepares the evaluator of Verify; problems of the car, the
// cases and the options are a *ValidationError as Verify's.
func NewVerifier(v Vehicle, cases []RoadCase, opt VerifyOptions) (*Verifier, error) {
	e, err := NewEvaluator(v, cases, opt.Model)
	if err != nil {
		return nil, err
	}
	var p problems
	p.merge("time.", opt.Time.validate())
	if err := p.err(); err != nil {
		return nil, err
	}
	return newVerifier(e, v, opt), nil
}

// Verify runs the check of one setup (see Verify).
func (vf *Verifier) Verify(s Setup) (*VerifyReport, error) {
	e, v, opt := vf.e, vf.v, vf.opt
	var p problems
	p.merge("setup.", s.Validate())
	p.merge("setup.", e.v.CheckSetup(&s))
	if err := p.err(); err != nil {
		return nil, err
	}
	rep := &VerifyReport{Setup: s, Seed: opt.Seed}
	dampers := e.ref.dampers(&s)
	ws := e.pool.Get().(*workspace)
	defer e.pool.Put(ws)
	psd := make([]float64, nOut*len(e.f))
	for i := range e.cases {
		vc := VerifyCase{Case: e.cases[i].rc.Name}
		if err := e.evaluateCase(i, &dampers, ws, &vc.Frequency, psd); err != nil {
			return nil, err
		}
		rc := &e.cases[i].rc
		tm, err := simulateCase(&e.v, rc, &s, opt.Time, vf.inputs.source(&e.v, rc, opt.Seed, i))
		if err != nil {
			var ve *ValidationError
			if errors.As(err, &ve) {
				var p problems
				p.merge("time.", err)
				return nil, p.err()
			}
			return nil, err
		}
		vc.Time = *tm
		vc.Rows = verifyRows(&vc.Frequency, tm, &v, e.wts, psd, tm.Duration)
		rep.Cases = append(rep.Cases, vc)
	}
	return rep, nil
}

// spectrumStats gives the statistical errors of one output from its PSD.
type spectrumStats struct {
	wts []float64
	psd []float64
	T   float64
}

// bandwidth is B_e = σ⁴/∫G² df (Hz) of output o with variance sigma².
func (ss *spectrumStats) bandwidth(o int, sigma float64) float64 {
	g2 := 0.0
	for k, w := range ss.wts {
		g := ss.psd[k*nOut+o]
		g2 += w * g * g
	}
	if g2 <= 0 {
		return math.Inf(1)
	}
	return sigma * sigma * sigma * sigma / g2
}

// sdError is σ/(2 sqrt(B_e T)).
func (ss *spectrumStats) sdError(o int, sigma float64) float64 {
	return sigma / (2 * math.Sqrt(ss.bandwidth(o, sigma)*ss.T))
}

// meanError is the larger of sqrt(G(f_min)/(2T)), the linear car's
// figure, and the batch-means error of the record tm (batchMeansError),
// which also holds the nonlinear car's slow wander of the mean.
func (ss *spectrumStats) meanError(o int, tm *TimeMetrics) float64 {
	return math.Max(math.Sqrt(ss.psd[o]/(2*ss.T)), tm.meanError[o])
}

// fractionError is sqrt(p(1-p)/(B_e T)) for output o's bandwidth.
func (ss *spectrumStats) fractionError(p float64, o int, sigma float64) float64 {
	return math.Sqrt(p * (1 - p) / (ss.bandwidth(o, sigma) * ss.T))
}

// verifyRows lays the two sets of metrics side by side.
func verifyRows(f *CaseMetrics, tm *TimeMetrics, v *Vehicle, wts, psd []float64, T float64) []VerifyRow {
	t := &tm.CaseMetrics
	ss := &spectrumStats{wts: wts, psd: psd, T: T}
	var rows []VerifyRow
	add := func(name string, fv, tv, se float64) {
		r := VerifyRow{Metric: name, Frequency: fv, Time: tv, Diff: tv - fv, StatError: se}
		if fv != 0 {
			r.RelDiff = r.Diff / math.Abs(fv)
		}
		rows = append(rows, r)
	}
	corner, axle := cornerMetric, axleMetric
	for i := 0; i < 4; i++ {
		add(corner("tyre_load_sd_n", i), f.TyreLoadSD[i], t.TyreLoadSD[i], ss.sdError(outTyre+i, f.TyreLoadSD[i]))
	}
	for i := 0; i < 4; i++ {
		add(corner("lift_off_fraction", i), f.LiftOffProbability[i], t.LiftOffProbability[i],
			ss.fractionError(f.LiftOffProbability[i], outTyre+i, f.TyreLoadSD[i]))
	}
	for ax := 0; ax < 2; ax++ {
		add(axle("ride_height_sd_m", ax), f.RideHeightSD[ax], t.RideHeightSD[ax], ss.sdError(outRide+ax, f.RideHeightSD[ax]))
	}
	add("pitch_sd_rad", f.PitchSD, t.PitchSD, ss.sdError(outPitch, f.PitchSD))
	add("roll_sd_rad", f.RollSD, t.RollSD, ss.sdError(outRoll, f.RollSD))
	add("heave_accel_sd_m_per_s2", f.HeaveAccelSD, t.HeaveAccelSD, ss.sdError(outHeaveAcc, f.HeaveAccelSD))
	for i := 0; i < 4; i++ {
		add(corner("travel_sd_m", i), f.TravelSD[i], t.TravelSD[i], ss.sdError(outTravel+i, f.TravelSD[i]))
	}
	for i := 0; i < 4; i++ {
		if v.Corners[i].BumpStopGap > 0 || tm.Peaks.BumpStopForceMax[i] > 0 {
			add(corner("bump_stop_fraction", i), f.BumpStopProbability[i], t.BumpStopProbability[i],
				ss.fractionError(f.BumpStopProbability[i], outTravel+i, f.TravelSD[i]))
		}
	}
	for i := 0; i < 4; i++ {
		mr := v.Corners[i].DamperMotionRatio
		add(corner("damper_velocity_sd_m_per_s", i), f.DamperVelocitySD[i], t.DamperVelocitySD[i],
			mr*ss.sdError(outWheelVel+i, f.DamperVelocitySD[i]/mr))
	}
	for ax := 0; ax < 2; ax++ {
		mr := v.Heave[ax].MotionRatio
		if mr == 0 {
			continue
		}
		add(axle("heave_travel_sd_m", ax), f.HeaveTravelSD[ax], t.HeaveTravelSD[ax], mr*ss.sdError(outAxleHeave+ax, f.HeaveTravelSD[ax]/mr))
		add(axle("heave_velocity_sd_m_per_s", ax), f.HeaveVelocitySD[ax], t.HeaveVelocitySD[ax],
			mr*ss.sdError(outWheelVel+dampHeave+ax, f.HeaveVelocitySD[ax]/mr))
		if v.Heave[ax].PackerGap > 0 {
			add(axle("packer_fraction", ax), f.PackerProbability[ax], t.PackerProbability[ax],
				ss.fractionError(f.PackerProbability[ax], outAxleHeave+ax, f.HeaveTravelSD[ax]/mr))
		}
	}
	for i := 0; i < 4; i++ {
		add(corner("equivalent_damping_n_s_per_m", i), f.EquivalentDamping[i], t.EquivalentDamping[i], 0)
	}
	for i := 0; i < 4; i++ {
		add(corner("mean_damper_force_n", i), f.MeanDamperForce[i], t.MeanDamperForce[i], 0)
	}
	for ax := 0; ax < 2; ax++ {
		add(axle("ride_height_shift_m", ax), f.RideHeightShift[ax], t.RideHeightShift[ax], ss.meanError(outRide+ax, tm))
	}
	add("pitch_shift_rad", f.PitchShift, t.PitchShift, ss.meanError(outPitch, tm))
	for i := 0; i < 4; i++ {
		add(corner("travel_shift_m", i), f.TravelShift[i], t.TravelShift[i], ss.meanError(outTravel+i, tm))
	}
	return rows
}

// cornerMetric names a corner's row of the check ("travel_sd_m[FL]").
func cornerMetric(name string, i int) string { return fmt.Sprintf("%s[%s]", name, CornerNames[i]) }

// axleMetric names an axle's row of the check ("ride_height_sd_m[front]").
func axleMetric(name string, ax int) string { return fmt.Sprintf("%s[%s]", name, AxleNames[ax]) }

// Row returns the row of a metric by name, or false.
func (c *VerifyCase) Row(metric string) (VerifyRow, bool) {
	for _, r := range c.Rows {
		if r.Metric == metric {
			return r, true
		}
	}
	return VerifyRow{}, false
}

// VerdictSigmas is how many statistical errors a time-domain value may lie
// from the frequency-domain one before the check says the linear answer
// differs: for a Gaussian estimate, |z| > 3 has probability 0.27 %
// (common practice for a significance bound). The errors are upper bounds
// for the standard deviations of a linear car (see Verify), so the bound
// errs towards "holds".
const VerdictSigmas = 3

// Verdict is the time-domain check's judgement of the linear answer.
type Verdict int

const (
	// VerdictNotJudged: the row has no statistical error to judge by
	// (equivalent damping, mean damper force).
	VerdictNotJudged Verdict = iota
	// VerdictHolds: within VerdictSigmas statistical errors (for a case
	// or a report: no row differs).
	VerdictHolds
	// VerdictDiffers: more than VerdictSigmas statistical errors off (for
	// a case or a report: some row differs).
	VerdictDiffers
)

func (v Verdict) String() string {
	switch v {
	case VerdictHolds:
		return "holds"
	case VerdictDiffers:
		return "differs"
	case VerdictNotJudged:
		return "not judged"
	}
	return fmt.Sprintf("verdict(%d)", int(v))
}

// Judged reports whether the row has a statistical error to judge it by:
// finite and above 0.
func (r VerifyRow) Judged() bool {
	return r.StatError > 0 && !math.IsInf(r.StatError, 0)
}

// Sigmas is |Diff|/StatError, the difference in statistical errors; NaN
// when the row is not judged.
func (r VerifyRow) Sigmas() float64 {
	if !r.Judged() {
		return math.NaN()
	}
	return math.Abs(r.Diff) / r.StatError
}

// Verdict judges the row: VerdictDiffers beyond VerdictSigmas
// statistical errors.
func (r VerifyRow) Verdict() Verdict {
	switch {
	case !r.Judged():
		return VerdictNotJudged
	case r.Sigmas() > VerdictSigmas:
		return VerdictDiffers
	}
	return VerdictHolds
}

// Verdict judges the case: VerdictDiffers when any row does, else
// VerdictHolds.
func (c *VerifyCase) Verdict() Verdict {
	for _, r := range c.Rows {
		if r.Verdict() == VerdictDiffers {
			return VerdictDiffers
		}
	}
	return VerdictHolds
}

// Verdict judges the report: VerdictDiffers when any case does, else
// VerdictHolds.
func (rep *VerifyReport) Verdict() Verdict {
	for i := range rep.Cases {
		if rep.Cases[i].Verdict() == VerdictDiffers {
			return VerdictDiffers
		}
	}
	return VerdictHolds
}

// VerifySummary is a report in a few figures, for comparing the checks of
// many setups.
type VerifySummary struct {
	Verdict Verdict // of the whole report
	// Worst is the largest Sigmas over the cases' judged rows, NaN when
	// no row is judged; WorstMetric and WorstCase name its row (the first
	// of equal ones in case and row order).
	Worst       float64
	WorstMetric string
	WorstCase   int
	// LiftOff and BumpStop are the largest time fractions of any corner
	// on any case off the road and beyond the bump-stop gap (-).
	LiftOff, BumpStop float64
}

// Summary reduces the report to its summary.
func (rep *VerifyReport) Summary() VerifySummary {
	s := VerifySummary{Verdict: rep.Verdict(), Worst: math.NaN()}
	judged := false
	for ci := range rep.Cases {
		c := &rep.Cases[ci]
		for _, r := range c.Rows {
			if r.Judged() && (!judged || r.Sigmas() > s.Worst) {
				s.Worst, s.WorstMetric, s.WorstCase, judged = r.Sigmas(), r.Metric, ci, true
			}
		}
		for i := range 4 {
			s.LiftOff = math.Max(s.LiftOff, c.Time.LiftOffProbability[i])
			s.BumpStop = math.Max(s.BumpStop, c.Time.BumpStopProbability[i])
		}
	}
	return s
}
