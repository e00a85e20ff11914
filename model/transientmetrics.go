package model

import "math"

// TransientMetrics are the metrics of one setup on one manoeuvre or kerb
// case, from its time history (recorded at every RK4 step from t = 0).
type TransientMetrics struct {
	Case string
	Kind TransientKind

	// Roll and Pitch are the attitude's response (relative to the road,
	// signs as in the package doc).
	Roll, Pitch AttitudeResponse
	// Response is the driver-response figure (-): the RMS over the record
	// of the body's roll and pitch away from where the springs alone
	// would hold it at that instant (the quasi-static attitude under the
	// input at t), each divided by its steady change, over the channels
	// that change (roll, pitch, or both). 0 for a kerb. Too little
	// damping overshoots and rings, too much lags: both raise it.
	Response float64
	// LLTD is the transient lateral load-transfer distribution.
	LLTD LLTDResponse

	TyreLoadMin [4]float64 // lowest tyre load, static at speed included (N)
	// TimeBelow is the time each tyre carries less than the set fraction
	// of its reference load P_i(t) (s). The reference is what the tyre
	// would carry if the car followed the input quasi-statically: the
	// static load at speed plus the steady load transfer of the input at
	// that instant (a manoeuvre), or the static load at speed (a kerb).
	// So the load an input transfers for good is not counted, only what
	// the car's dynamics take off it.
	TimeBelow [4]float64
	// LoadLoss is ∫ max(0, 1 − F_i(t)/P_i(t)) dt over the times with
	// P_i(t) > 0 (s): the load lost below the reference, in
	// reference-load seconds.
	LoadLoss [4]float64
	// RideHeightMin is the lowest ride height, front and rear, relative
	// to the road (m): at speed (the operating point's ride height plus
	// the change) when the car gives a rest ride height, else the change
	// from the operating point.
	RideHeightMin [2]float64
	BumpStopTime  [4]float64 // time past the bump-stop gap at speed (s)
	HeaveAccelMax float64    // largest |heave acceleration| of the sprung CG (m/s²)

	Step     float64 // RK4 step (s)
	Duration float64 // simulated time (s)
}

// AttitudeResponse is the step-response reading of one attitude angle
// (rad, s; rad/s) from the quasi-static start y_0 to the quasi-static
// end y_f under the last input, Δ = y_f − y_0 (common control-text
// definitions, e.g. Ogata, Modern Control Engineering, 5th ed., §5-3,
// with the 5 % settling band).
type AttitudeResponse struct {
	Steady float64 // y_f (rad)
	// Peak is the extreme in the direction of Δ (rad); when the input
	// returns to where it started (Δ ≈ 0, a kerb) the largest |y − y_0|.
	Peak float64
	// Overshoot is max(0, (Peak − y_f)/Δ) (-; 0.1 = 10 %).
	Overshoot float64
	// Rise90 is the time from the input's start until y first covers
	// 90 % of Δ (s; the record's length when it never does); Settling
	// until y last leaves y_f ± 5 % |Δ| (s).
	Rise90, Settling float64
	PeakRate         float64 // largest |dy/dt| (rad/s), by differences between steps
}

// LLTDResponse is the front share of the lateral load transfer,
// ΔW_f/(ΔW_f + ΔW_r) with ΔW_a = (F_right − F_left)/2 on axle a
// (Milliken & Milliken 1995, ch. 18: the tyre lateral load transfer
// distribution), against time.
type LLTDResponse struct {
	// Defined is false when the case has no lateral input (its steady
	// total transfer is under 1 N); the other fields are then 0.
	Defined bool
	Steady  float64 // front share at the end, quasi-static (-)
	// MaxDeviation is the largest |share − Steady| while the total
	// transfer is at least lltdFloor of its steady value (-).
	MaxDeviation float64
	// Settling is the time from the input's start until the share last
	// leaves Steady ± lltdBand (s).
	Settling float64
}

const (
	attitudeTiny = 1e-7 // rad: a change below it counts as none
	settleBand   = 0.05 // the settling band, of |Δ| (common practice: 2 % or 5 %)
	lltdFloor    = 0.1  // share read only where |ΔW_f + ΔW_r| >= 10 % of steady
	lltdBand     = 0.01 // one point of share
)

func (c *transientCase) metrics(w *transientWork, tm *TransientMetrics) {
	*tm = TransientMetrics{Case: c.name, Kind: c.kind, Step: c.h, Duration: c.h * float64(c.steps)}
	h := c.h
	var sq float64
	channels := 0
	for k, y := range [2][]float64{w.roll, w.pitch} {
		dof := dofRoll
		if k == 1 {
			dof = dofPitch
		}
		r := attitude(y, c.x0[dof], c.final[dof], h, c.start)
		if k == 0 {
			tm.Roll = r
		} else {
			tm.Pitch = r
		}
		if d := c.final[dof] - c.x0[dof]; c.kind == KindManoeuvre && math.Abs(d) > attitudeTiny {
			for n, v := range y {
				e := (v - c.qs[k][n]) / d
				sq += e * e
			}
			channels++
		}
	}
	if channels > 0 {
		tm.Response = math.Sqrt(sq / float64(channels*len(w.roll)))
	}
	if !math.IsNaN(c.lltdSS) {
		l := &tm.LLTD
		l.Defined, l.Steady = true, c.lltdSS
		last := -1
		for n := range w.dwf {
			tot := w.dwf[n] + w.dwr[n]
			if math.Abs(tot) < lltdFloor*c.lltdW {
				continue
			}
			dev := math.Abs(w.dwf[n]/tot - c.lltdSS)
			l.MaxDeviation = math.Max(l.MaxDeviation, dev)
			if dev > lltdBand {
				last = n
			}
		}
		l.Settling = sinceStart(last, h, c.start)
	}
	frac := c.opt.LoadFraction
	for i := 0; i < 4; i++ {
		low, below, loss := math.Inf(1), 0, 0.0
		for n, dyn := range w.tyre[i] {
			p := c.op.TyreLoad[i]
			f := p + dyn
			if c.qsLoad[i] != nil {
				p += c.qsLoad[i][n]
			}
			low = math.Min(low, f)
			if p <= 0 {
				continue // the input itself lifts this tyre: nothing to lose
			}
			if f < frac*p {
				below++
			}
			loss += math.Max(0, 1-f/p)
		}
		tm.TyreLoadMin[i] = math.Max(0, low)
		tm.TimeBelow[i] = float64(below) * h
		tm.LoadLoss[i] = loss * h
		tm.BumpStopTime[i] = float64(w.stop[i]) * h
	}
	for ax := 0; ax < 2; ax++ {
		tm.RideHeightMin[ax] = w.rideMin[ax]
		if c.v.RestRideHeight[ax] > 0 {
			tm.RideHeightMin[ax] += c.op.RideHeight[ax]
		}
	}
	tm.HeaveAccelMax = w.heaveMax
}

// sinceStart is the time of step n after the input's start (s), 0 when
// n < 0 or before the start.
func sinceStart(n int, h, start float64) float64 {
	if n < 0 {
		return 0
	}
	return math.Max(0, float64(n+1)*h-start)
}

// attitude reads one angle's history y (one sample per step h) from y0
// to yf, the input starting at start (s).
func attitude(y []float64, y0, yf, h, start float64) AttitudeResponse {
	r := AttitudeResponse{Steady: yf}
	for n := 1; n < len(y); n++ {
		r.PeakRate = math.Max(r.PeakRate, math.Abs(y[n]-y[n-1])/h)
	}
	d := yf - y0
	if math.Abs(d) <= attitudeTiny {
		r.Peak = y0
		for _, v := range y {
			if math.Abs(v-y0) > math.Abs(r.Peak-y0) {
				r.Peak = v
			}
		}
		return r
	}
	sign := math.Copysign(1, d)
	far, rise, last := math.Inf(-1), -1, -1
	for n, v := range y {
		progress := (v - y0) / d
		if rise < 0 && progress >= 0.9 {
			rise = n
		}
		far = math.Max(far, sign*(v-y0))
		if math.Abs(v-yf) > settleBand*math.Abs(d) {
			last = n
		}
	}
	r.Peak = y0 + sign*far
	r.Overshoot = math.Max(0, (r.Peak-yf)/d)
	if rise >= 0 {
		r.Rise90 = math.Max(0, float64(rise)*h-start)
	} else {
		r.Rise90 = math.Max(0, float64(len(y))*h-start) // not reached in the record
	}
	r.Settling = sinceStart(last, h, start)
	return r
}
