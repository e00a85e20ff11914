package model

import (
	"fmt"
	"math"
)

// The out-of-band check: does a setup's damper lie within what its
// adjusters can reach? The setup's damping force (at the damper, friction
// included, gas force taken off) is compared at a few damper speeds with
// the softest and the stiffest setting's: for a linear adjuster the curve
// of the setup's own hardware with the low-speed ratio (and, with a
// high-speed adjuster, the high-speed factor) at its softest or stiffest
// click; for a dyno table the table's softest or stiffest row, read
// linearly from (0, 0) through its points (no reading beyond its fastest
// point).

// BandVelocities are the damper speeds (m/s) of the out-of-band check
// in every output: 25, 50, 100, 150, 200, 250 and 300 mm/s, the dyno test
// speeds of a damper specification (common dyno practice, no single
// source).
var BandVelocities = []float64{0.025, 0.05, 0.1, 0.15, 0.2, 0.25, 0.3}

// BandExcess is where one corner's damper, in one direction, lies
// furthest outside its adjuster range.
type BandExcess struct {
	Corner  int
	Rebound bool    // the rebound direction (else bump)
	Speed   float64 // damper speed of the worst point (m/s)
	Force   float64 // the setup's damping force there (N, magnitude)
	// Softest and Stiffest are the band's forces there (N, magnitudes).
	Softest, Stiffest float64
	// Over is how far outside (N, > 0): Force - Stiffest when Above,
	// Softest - Force otherwise.
	Over  float64
	Above bool // beyond the stiffest setting (else below the softest)
}

// Relative is Over over the band's force it is measured from (-).
func (e BandExcess) Relative() float64 {
	if e.Above {
		return e.Over / e.Stiffest
	}
	return e.Over / e.Softest
}

// String is "FL bump: 1019 N at 50 mm/s, above the stiffest setting's
// 831 N by 188 N (23 %)".
func (e BandExcess) String() string {
	dir, side, ref := "bump", "below the softest", e.Softest
	if e.Rebound {
		dir = "rebound"
	}
	if e.Above {
		side, ref = "above the stiffest", e.Stiffest
	}
	return fmt.Sprintf("%s %s: %.0f N at %.0f mm/s, %s setting's %.0f N by %.0f N (%.0f %%)",
		CornerNames[e.Corner], dir, e.Force, e.Speed*1e3, side, ref, e.Over, 100*e.Relative())
}

// OutOfBand checks setup s against adjusters adj at the damper speeds
// given (m/s, each > 0; BandVelocities in the outputs) and returns, per
// corner and direction outside the band, the point furthest out relative
// to the band's force there (largest Relative; the slower speed on a
// tie); nil when the damper lies within its range everywhere, or has no
// adjuster in a direction. Invalid input is a *ValidationError naming the
// field.
func OutOfBand(v *Vehicle, s *Setup, adj *Adjusters, speeds []float64) ([]BandExcess, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.merge("setup.", s.Validate())
	p.merge("adjusters.", adj.Validate())
	for k, u := range speeds {
		p.in(fmt.Sprintf("speeds[%d]", k), u, "Curves.max_velocity_m_per_s")
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	cc := v.CriticalDamping()
	var out []BandExcess
	for i := 0; i < 4; i++ {
		a := &s.Axles[i/2]
		ad := &adj.Axles[i/2]
		mr2 := v.Corners[i].DamperMotionRatio * v.Corners[i].DamperMotionRatio
		at := func(zb, zr, rb, rr float64) wheelDamper {
			x := *a
			x.HighSpeedBump, x.HighSpeedRebound = rb, rr
			return x.axleDamper(zb*cc[i]/mr2, zr*cc[i]/mr2, 1)
		}
		set := at(a.BumpRatio, a.ReboundRatio, a.HighSpeedBump, a.HighSpeedRebound)
		rb, rr := [2]float64{a.HighSpeedBump, a.HighSpeedBump}, [2]float64{a.HighSpeedRebound, a.HighSpeedRebound}
		if ad.HighBump.Clicks > 0 {
			rb = [2]float64{ad.HighBump.Softest, ad.HighBump.Stiffest}
		}
		if ad.HighRebound.Clicks > 0 {
			rr = [2]float64{ad.HighRebound.Softest, ad.HighRebound.Stiffest}
		}
		lb, lr := &ad.LowBump, &ad.LowRebound
		if lb.Clicks == 0 && lr.Clicks == 0 && ad.HighBump.Clicks == 0 && ad.HighRebound.Clicks == 0 {
			continue
		}
		zb, zr := [2]float64{a.BumpRatio, a.BumpRatio}, [2]float64{a.ReboundRatio, a.ReboundRatio}
		if lb.Clicks > 0 && lb.Dyno == nil {
			zb = [2]float64{lb.Softest, lb.Stiffest}
		}
		if lr.Clicks > 0 && lr.Dyno == nil {
			zr = [2]float64{lr.Softest, lr.Stiffest}
		}
		soft, stiff := at(zb[0], zr[0], rb[0], rr[0]), at(zb[1], zr[1], rb[1], rr[1])
		for dir, lo := range [2]*Adjuster{lb, lr} {
			sign := 1 - 2*float64(dir)
			if lo.Clicks == 0 && [2]*Adjuster{&ad.HighBump, &ad.HighRebound}[dir].Clicks == 0 {
				continue
			}
			var worst BandExcess
			for _, u := range speeds {
				f := sign * set.force(sign*u)
				fs, fh := sign*soft.force(sign*u), sign*stiff.force(sign*u)
				if lo.Dyno != nil {
					var ok bool
					if fs, ok = lo.Dyno.at(len(lo.Dyno.Force)-1, u); !ok {
						continue
					}
					fh, _ = lo.Dyno.at(0, u)
				}
				e := BandExcess{Corner: i, Rebound: dir == 1, Speed: u, Force: f, Softest: fs, Stiffest: fh}
				// A setting on the band's edge is inside: 1e-12 of the
				// force allows for rounding of the same curve.
				tol := 1e-12 * math.Abs(f)
				switch {
				case f > fh+tol:
					e.Over, e.Above = f-fh, true
				case f < fs-tol:
					e.Over = fs - f
				}
				// Ties (to rounding) go to the slower speed.
				if e.Over > 0 && (worst.Over == 0 || e.Relative() > worst.Relative()*(1+1e-9)) {
					worst = e
				}
			}
			if worst.Over > 0 {
				out = append(out, worst)
			}
		}
	}
	return out, nil
}

// at reads row k of the table at speed u linearly from (0, 0) through
// its points; false beyond its fastest point.
func (t *DynoTable) at(k int, u float64) (float64, bool) {
	pv, pf := 0.0, 0.0
	for j, x := range t.Velocity {
		if u <= x {
			return pf + (t.Force[k][j]-pf)*(u-pv)/(x-pv), true
		}
		pv, pf = x, t.Force[k][j]
	}
	return math.NaN(), false
}
