package model

import "math"

// TimeMetrics are the metrics of a time-domain run. The embedded
// CaseMetrics carry the same fields as the frequency-domain model,
// estimated from the recorded history (sample means and standard
// deviations over the record), with these readings:
//
//	TyreLoadSD            of the actual tyre load, clipped at zero (N)
//	LiftOffProbability    fraction of the time a tyre carries no load
//	BumpStopProbability   fraction of the time the travel exceeds the gap
//	                      (counted even when no bump stop is modelled)
//	PackerProbability     fraction of the time a heave element's travel
//	                      exceeds its packer gap (counted even without a
//	                      packer rate); HeaveEquivalentDamping is 0
//	EquivalentDamping     E[F v]/E[v²] at the wheel, the least-squares
//	                      slope (the statistical linearisation's c_eq)
//	MeanDamperForce       mean damper force at the damper (N)
//	RideHeightShift, PitchShift, TravelShift
//	                      means over the record (the road's mean is zero)
//
// Iterations is 0.
type TimeMetrics struct {
	CaseMetrics

	Step     float64 // RK4 step (s)
	Settle   float64 // time integrated before recording (s)
	Duration float64 // recorded time (s)
	Samples  int     // recorded samples (one per step)
	// RoadMaxN is the highest spatial frequency of the synthesised road
	// (cycles/m); the road is periodic with length V·Duration.
	RoadMaxN float64

	// VelocityAbsRatio is E|v|/σ of each wheel's suspension velocity;
	// sqrt(2/π) = 0.798 for a Gaussian. The jacking of a bilinear damper
	// is ½(c_b - c_r)E|v|, so this ratio shows how far the linearisation's
	// Gaussian assumption holds.
	VelocityAbsRatio [4]float64

	Peaks Peaks

	// meanError is the batch-means standard error of each output's
	// sample mean (batchMeansError), for Verify.
	meanError [nOut]float64
}

// Peaks are extreme values over the record.
type Peaks struct {
	TyreLoadMin       [4]float64 // lowest tyre load (N); 0 when it lifted
	TyreLoadMax       [4]float64 // highest tyre load (N)
	TravelMax         [4]float64 // most travel in bump from the operating point at speed (m)
	TravelMin         [4]float64 // most travel in rebound from the operating point at speed, negative (m)
	DamperVelocityMax [4]float64 // highest bump velocity at the damper (m/s)
	DamperVelocityMin [4]float64 // highest rebound velocity at the damper, negative (m/s)
	BumpStopForceMax  [4]float64 // highest bump-stop force at the wheel (N)
	RideHeightMin     [2]float64 // lowest ride-height change relative to the road, front, rear (m)
	RideHeightMax     [2]float64 // highest ride-height change relative to the road (m)
	HeaveAccelMax     float64    // largest |heave acceleration| (m/s²)
}

// meanBatches is the number of consecutive blocks a record is cut into
// for the batch-means error of its sample means: 16 blocks of 7.5 s of a
// 120 s record, each far longer than the car's correlation times (its
// slowest mode, heave or pitch at 1-2 Hz with ζ ≈ 0.3, decays in well
// under a second), and enough blocks that the error estimate itself is
// within about 1/sqrt(2(16-1)) = 18 %. Common practice for the method
// (10 to 30 batches), no single source.
const meanBatches = 16

// timeStats accumulates a run's statistics one sample at a time.
type timeStats struct {
	gap        [4]float64
	total      int // samples the record will have, for the block bounds
	n          int
	sum, sq    [nOut]float64
	blocks     [meanBatches][nOut]float64 // sums of each block
	fsum, fv   [4]float64
	vabs       [4]float64
	air, above [4]int
	packer     [2]int // samples on each axle's packer
	peaks      Peaks
	smp        timeSample
}

func (s *timeStats) buffer() *timeSample { return &s.smp }

func newTimeStats(gap [4]float64, total int) *timeStats {
	s := &timeStats{gap: gap, total: total}
	inf := math.Inf(1)
	for i := 0; i < 4; i++ {
		s.peaks.TyreLoadMin[i], s.peaks.TyreLoadMax[i] = inf, -inf
		s.peaks.TravelMax[i], s.peaks.TravelMin[i] = -inf, inf
		s.peaks.DamperVelocityMax[i], s.peaks.DamperVelocityMin[i] = -inf, inf
	}
	for ax := 0; ax < 2; ax++ {
		s.peaks.RideHeightMin[ax], s.peaks.RideHeightMax[ax] = inf, -inf
	}
	return s
}

func (s *timeStats) add(o *timeSample) {
	b := min(s.n*meanBatches/max(s.total, 1), meanBatches-1)
	s.n++
	for k, y := range o.out {
		s.sum[k] += y
		s.sq[k] += y * y
		s.blocks[b][k] += y
	}
	p := &s.peaks
	for i := 0; i < 4; i++ {
		v := o.out[outWheelVel+i]
		s.fsum[i] += o.force[i]
		s.fv[i] += o.force[i] * v
		s.vabs[i] += math.Abs(v)
		if o.airborne[i] {
			s.air[i]++
		}
		tr := o.out[outTravel+i]
		if s.gap[i] > 0 && tr > s.gap[i] {
			s.above[i]++
		}
		t := o.out[outTyre+i]
		p.TyreLoadMin[i] = math.Min(p.TyreLoadMin[i], t)
		p.TyreLoadMax[i] = math.Max(p.TyreLoadMax[i], t)
		p.TravelMax[i] = math.Max(p.TravelMax[i], tr)
		p.TravelMin[i] = math.Min(p.TravelMin[i], tr)
		p.DamperVelocityMax[i] = math.Max(p.DamperVelocityMax[i], v)
		p.DamperVelocityMin[i] = math.Min(p.DamperVelocityMin[i], v)
		p.BumpStopForceMax[i] = math.Max(p.BumpStopForceMax[i], o.stopF[i])
	}
	for ax := 0; ax < 2; ax++ {
		r := o.out[outRide+ax]
		p.RideHeightMin[ax] = math.Min(p.RideHeightMin[ax], r)
		p.RideHeightMax[ax] = math.Max(p.RideHeightMax[ax], r)
	}
	p.HeaveAccelMax = math.Max(p.HeaveAccelMax, math.Abs(o.out[outHeaveAcc]))
	for ax, on := range o.packer {
		if on {
			s.packer[ax]++
		}
	}
}

// finite reports whether every sum is finite (the run did not diverge).
func (s *timeStats) finite() bool {
	for k := range s.sq {
		if math.IsNaN(s.sq[k]) || math.IsInf(s.sq[k], 0) {
			return false
		}
	}
	return true
}

// metrics turns the sums into metrics.
func (s *timeStats) metrics(m *timeModel, name string, warn float64) *TimeMetrics {
	n := float64(s.n)
	var mean, sd [nOut]float64
	for k := range mean {
		mean[k] = s.sum[k] / n
		sd[k] = math.Sqrt(math.Max(0, s.sq[k]/n-mean[k]*mean[k]))
	}
	tm := &TimeMetrics{Samples: s.n, Peaks: s.peaks}
	c := &tm.CaseMetrics
	c.Case = name
	c.StaticTyreLoad = m.static
	for i := 0; i < 4; i++ {
		c.TyreLoadSD[i] = sd[outTyre+i]
		c.TyreLoadSDRel[i] = sd[outTyre+i] / m.static[i]
		c.LiftOffProbability[i] = float64(s.air[i]) / n
		c.TravelSD[i] = sd[outTravel+i]
		c.TravelShift[i] = mean[outTravel+i]
		c.BumpStopProbability[i] = float64(s.above[i]) / n
		c.DamperVelocitySD[i] = m.mr[i] * sd[outWheelVel+i]
		if vv := s.sq[outWheelVel+i]; vv > 0 {
			c.EquivalentDamping[i] = s.fv[i] / vv
		}
		c.MeanDamperForce[i] = s.fsum[i] / n / m.mr[i]
		if sd[outWheelVel+i] > 0 {
			tm.VelocityAbsRatio[i] = s.vabs[i] / n / sd[outWheelVel+i]
		}
		tm.Peaks.TyreLoadMin[i] += m.static[i]
		tm.Peaks.TyreLoadMax[i] += m.static[i]
		tm.Peaks.DamperVelocityMax[i] *= m.mr[i]
		tm.Peaks.DamperVelocityMin[i] *= m.mr[i]
		if c.LiftOffProbability[i] > warn {
			c.Warnings |= WarnLiftOff
		}
		if c.BumpStopProbability[i] > warn {
			c.Warnings |= WarnBumpStop
		}
	}
	for ax := 0; ax < 2; ax++ {
		c.RideHeightSD[ax] = sd[outRide+ax]
		c.RideHeightShift[ax] = mean[outRide+ax]
	}
	c.PitchSD = sd[outPitch]
	c.PitchShift = mean[outPitch]
	c.RollSD = sd[outRoll]
	c.HeaveAccelSD = sd[outHeaveAcc]
	for ax, mr := range m.mr3 {
		c.HeaveTravelSD[ax] = mr * sd[outAxleHeave+ax]
		c.HeaveVelocitySD[ax] = mr * sd[outWheelVel+dampHeave+ax]
		c.PackerProbability[ax] = float64(s.packer[ax]) / n
		if c.PackerProbability[ax] > warn {
			c.Warnings |= WarnPacker
		}
	}
	for k := range tm.meanError {
		var means [meanBatches]float64
		for b := range means {
			lo, hi := blockBounds(b, s.total)
			means[b] = s.blocks[b][k] / float64(hi-lo)
		}
		tm.meanError[k] = batchMeansError(means[:])
	}
	return tm
}

// blockBounds is the sample range [lo, hi) of block b of a record of
// total samples, as add assigns them.
func blockBounds(b, total int) (lo, hi int) {
	// Sample i is in block floor(i·B/total): the first i with
	// i·B >= b·total starts block b.
	first := func(b int) int { return (b*total + meanBatches - 1) / meanBatches }
	return first(b), first(b + 1)
}

// batchMeansError is the standard error of the mean of a record from the
// means of its B equal consecutive blocks, s_b/sqrt(B) with s_b the
// sample standard deviation of the block means (the method of batch
// means; e.g. Law & Kelton, "Simulation Modeling and Analysis", ch. 9,
// from memory). Unlike an error read off a spectrum it needs no model of
// the process, so it also holds the slow wander of a nonlinear car's
// mean, such as the jacking of asymmetric dampers following the road's
// roughness. It is valid when each block is much longer than the
// process's correlation time.
func batchMeansError(means []float64) float64 {
	b := float64(len(means))
	if b < 2 {
		return math.NaN()
	}
	m := 0.0
	for _, x := range means {
		m += x
	}
	m /= b
	ss := 0.0
	for _, x := range means {
		ss += (x - m) * (x - m)
	}
	return math.Sqrt(ss / (b - 1) / b)
}
