package model

import "fmt"

// BumpStop is a corner's bump rubber referred to the wheel: a force that
// pushes body and wheel apart once the wheel's travel in bump passes the
// corner's gap (Corner.BumpStopGap; at speed, the gap left at the
// operating point). Deflection and Force tabulate the force against the
// compression δ = travel − gap from F(0) = 0, linear between points and
// beyond the last point with the last segment's slope:
//
//	F(δ) = 0                                              δ <= 0
//	F(δ) = F_(k−1) + (F_k − F_(k−1)) (δ − δ_(k−1))/(δ_k − δ_(k−1))   δ_(k−1) < δ <= δ_k
//
// with δ_0 = F_0 = 0. A rate with a progressive term is given as its
// points. A rubber is referred to the wheel as a spring is: a force F_r
// against compression δ_r at the rubber with motion ratio MR gives
// F = MR F_r at δ = δ_r/MR (common practice, as for the springs).
//
// Every time-domain model uses it (the check, the manoeuvre and kerb
// cases); the frequency domain, being linear, reports the probability of
// reaching the gap only. The zero value has no force: contact is then
// counted only, and the wheel travels on through the gap.
type BumpStop struct {
	// Deflection is the compression past the gap at each point (m),
	// increasing, the first > 0.
	Deflection []float64
	// Force is the force at the wheel at each point (N), >= 0 and
	// non-decreasing.
	Force []float64
}

// has reports whether a force curve is given.
func (b *BumpStop) has() bool { return len(b.Deflection) > 0 || len(b.Force) > 0 }

// force is the bump-stop force at compression delta (m), 0 for delta <= 0.
func (b *BumpStop) force(delta float64) float64 {
	if delta <= 0 {
		return 0
	}
	x0, f0 := 0.0, 0.0
	for k, x1 := range b.Deflection {
		f1 := b.Force[k]
		if delta <= x1 || k == len(b.Deflection)-1 {
			return f0 + (f1-f0)*(delta-x0)/(x1-x0)
		}
		x0, f0 = x1, f1
	}
	return 0
}

// maxSlope is the largest slope of the force curve (N/m).
func (b *BumpStop) maxSlope() float64 {
	x0, f0, s := 0.0, 0.0, 0.0
	for k, x1 := range b.Deflection {
		s = max(s, (b.Force[k]-f0)/(x1-x0))
		x0, f0 = x1, b.Force[k]
	}
	return s
}

// maxBumpStopPoints bounds a force curve's points.
const maxBumpStopPoints = 64

// validate checks the curve of a corner with bump-stop gap gap (m),
// naming its fields under prefix.
func (b *BumpStop) validate(p *problems, prefix string, gap float64) {
	if !b.has() {
		return
	}
	if n := len(b.Deflection); n == 0 || n > maxBumpStopPoints || n != len(b.Force) {
		p.add(prefix+"deflection_m", "needs 1 to %d points and as many as force_n, got %d and %d", maxBumpStopPoints, n, len(b.Force))
		return
	}
	p.table(prefix+"deflection_m", b.Deflection, "BumpStop.deflection_m", true)
	p.table(prefix+"force_n", b.Force, "BumpStop.force_n", false)
	for k := 1; k < len(b.Force); k++ {
		if b.Force[k] < b.Force[k-1] {
			p.add(fmt.Sprintf("%sforce_n[%d]", prefix, k), "must be non-decreasing, got %s after %s", num(b.Force[k]), num(b.Force[k-1]))
			return
		}
	}
	if gap == 0 {
		p.add(prefix+"deflection_m", "a bump-stop force curve needs the corner's bump_stop_gap_m (> 0), where it starts")
	}
}

// BumpStopPoint is one point of a corner's bump-stop curve, at the wheel
// as the vehicle gives it and at the damper for a rubber on the damper's
// shaft: compression MR·δ and force F/MR with MR the damper's motion
// ratio (the rubber referred through it as the damper is; the work
// F·δ is the same at both ends).
type BumpStopPoint struct {
	Deflection float64 // compression past the gap at the wheel (m)
	Force      float64 // force at the wheel (N)
	// Rate is the slope of the segment ending at this point, at the
	// wheel (N/m).
	Rate             float64
	DamperDeflection float64 // compression at the damper (m)
	DamperForce      float64 // force at the damper (N)
}

// BumpStopPoints lists the corner's bump-stop curve (nil without one).
func (c *Corner) BumpStopPoints() []BumpStopPoint {
	b := &c.BumpStop
	if !b.has() || len(b.Deflection) != len(b.Force) {
		return nil
	}
	mr := c.DamperMotionRatio
	out := make([]BumpStopPoint, len(b.Deflection))
	x0, f0 := 0.0, 0.0
	for k, x := range b.Deflection {
		f := b.Force[k]
		out[k] = BumpStopPoint{Deflection: x, Force: f, Rate: (f - f0) / (x - x0), DamperDeflection: mr * x, DamperForce: f / mr}
		x0, f0 = x, f
	}
	return out
}
