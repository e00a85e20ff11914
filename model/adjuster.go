package model

import (
	"fmt"
	"math"
)

// Adjusters and clicks.
//
// A damper has up to four adjusters: low speed and high speed, in bump
// and in rebound. Each has a number of clicks; click 0 is the stiffest
// (the adjuster closed) and clicks count open towards the softest, as
// race dampers are usually set ("clicks out"; common practice, no single
// source). A click sets the curve in one of two ways:
//
//   - linearly: a low-speed adjuster sets the damping ratio at the wheel
//     (the low-speed slope), a high-speed one the high-speed factor (the
//     slope above the first knee over the low-speed slope), each linear in
//     the click between its stiffest and softest values;
//   - by a dyno table (low-speed adjusters): the damping force of each
//     click measured at a few velocities. The click's low-speed slope is
//     its force at the table's lowest velocity over that velocity, which
//     should lie below the knee; the table's rows are also the band's
//     softest and stiffest curves.
//
// The click of a setup is the click whose setting is nearest to the
// setup's (for a table, nearest in low-speed slope); Snap puts every
// adjusted value on its click.

// MaxClicks is the most clicks an adjuster may have.
const MaxClicks = 200

// Adjuster is one adjuster of a damper. The zero value is no adjuster.
type Adjuster struct {
	// Clicks is the number of positions, both ends included (>= 2); 0 is
	// no adjuster.
	Clicks int
	// Stiffest and Softest are the setting at click 0 and at click
	// Clicks-1: a damping ratio at the wheel (-) for a low-speed adjuster,
	// a high-speed factor (-) for a high-speed one. Not with Dyno.
	Stiffest, Softest float64
	// Dyno, when not nil, is the measured curve of every click (low-speed
	// adjusters only), instead of Stiffest and Softest.
	Dyno *DynoTable
}

// DynoTable is the damping force of each click of an adjuster measured
// on a damper dyno, in one direction.
type DynoTable struct {
	// Velocity is the damper speeds measured (m/s), > 0 and increasing.
	Velocity []float64
	// Force[k][j] is the damping force of click k (stiffest first) at
	// Velocity[j] (N at the damper, a magnitude, the gas force taken off
	// as dyno reports do): one row per click, each as long as Velocity,
	// rising with velocity and falling (not rising) from click to click.
	Force [][]float64
}

// DamperAdjusters are the adjusters of one axle's dampers.
type DamperAdjusters struct {
	LowBump, LowRebound   Adjuster
	HighBump, HighRebound Adjuster
}

// Adjusters are the adjusters of the car's dampers, front and rear.
type Adjusters struct {
	Axles [2]DamperAdjusters
}

// CornerClicks is the click of each adjuster of one corner's damper, -1
// where it has no such adjuster.
type CornerClicks struct {
	Corner                int
	LowBump, LowRebound   int
	HighBump, HighRebound int
}

// String is "FL: LS bump 7, LS rebound 9, HS bump 3" (adjusters present).
func (c CornerClicks) String() string {
	s := CornerNames[c.Corner] + ":"
	sep := " "
	for _, x := range []struct {
		name  string
		click int
	}{{"LS bump", c.LowBump}, {"LS rebound", c.LowRebound}, {"HS bump", c.HighBump}, {"HS rebound", c.HighRebound}} {
		if x.click >= 0 {
			s += fmt.Sprintf("%s%s %d", sep, x.name, x.click)
			sep = ", "
		}
	}
	return s
}

// adjusterNames are the field names of DamperAdjusters' adjusters.
var adjusterNames = [4]string{"low_bump", "low_rebound", "high_bump", "high_rebound"}

// list returns the four adjusters in adjusterNames' order.
func (d *DamperAdjusters) list() [4]*Adjuster {
	return [4]*Adjuster{&d.LowBump, &d.LowRebound, &d.HighBump, &d.HighRebound}
}

// Given reports whether any adjuster is given.
func (a *Adjusters) Given() bool {
	for ax := range a.Axles {
		for _, j := range a.Axles[ax].list() {
			if j.Clicks != 0 {
				return true
			}
		}
	}
	return false
}

// Validate checks every adjuster and names each bad field: clicks in
// [2, MaxClicks] (or 0), stiffest and softest in the plausible range of an
// adjustment band's ratio (low speed) or a high-speed factor, stiffest >= softest;
// a dyno table only on a low-speed adjuster, instead of stiffest and
// softest, with one full row per click (no gaps), velocities > 0 and
// increasing, forces finite and >= 0, rising with velocity and not
// rising from one click to the next (non-monotonic tables are refused).
func (a *Adjusters) Validate() error {
	var p problems
	for ax := range a.Axles {
		for k, j := range a.Axles[ax].list() {
			j.check(&p, AxleNames[ax]+"."+adjusterNames[k]+".", k < 2)
		}
	}
	return p.err()
}

func (j *Adjuster) check(p *problems, f string, low bool) {
	if j.Clicks == 0 {
		if j.Stiffest != 0 || j.Softest != 0 || j.Dyno != nil {
			p.add(f+"clicks", "must be given (>= 2) with the adjuster's settings")
		}
		return
	}
	if j.Clicks < 2 || j.Clicks > MaxClicks {
		p.add(f+"clicks", "must be in [2, %d], got %d", MaxClicks, j.Clicks)
	}
	if j.Dyno != nil {
		if !low {
			p.add(f+"dyno", "a dyno table sets a low-speed adjuster only")
		}
		if j.Stiffest != 0 || j.Softest != 0 {
			p.add(f+"dyno", "give either a dyno table or stiffest and softest, not both")
		}
		j.Dyno.check(p, f+"dyno.", j.Clicks)
		return
	}
	name := "Adjustment.ratio" // as the adjustment band's ratios
	if !low {
		name = "AxleDamping.high_speed"
	}
	p.in(f+"stiffest", j.Stiffest, name)
	p.in(f+"softest", j.Softest, name)
	if j.Stiffest < j.Softest {
		p.add(f+"softest", "must be <= stiffest (%g), got %g", j.Stiffest, j.Softest)
	}
}

func (t *DynoTable) check(p *problems, f string, clicks int) {
	if len(t.Velocity) == 0 {
		p.add(f+"velocity_m_per_s", "give at least one velocity")
	}
	p.table(f+"velocity_m_per_s", t.Velocity, "Curves.max_velocity_m_per_s", true)
	if len(t.Force) != clicks {
		p.add(f+"rows", "the table has %d rows, want one per click (%d): a click is missing", len(t.Force), clicks)
	}
	for k, row := range t.Force {
		rf := fmt.Sprintf("%srows[%d].force_n", f, k)
		if len(row) != len(t.Velocity) {
			p.add(rf, "has %d forces, want one per velocity (%d): the table has a gap", len(row), len(t.Velocity))
			continue
		}
		for j, x := range row {
			switch {
			case math.IsNaN(x) || math.IsInf(x, 0):
				p.add(fmt.Sprintf("%s[%d]", rf, j), "must be a finite number, got %v", x)
			case x < 0:
				p.add(fmt.Sprintf("%s[%d]", rf, j), "must be >= 0 (a force magnitude), got %g", x)
			case j > 0 && x <= row[j-1]:
				p.add(fmt.Sprintf("%s[%d]", rf, j), "must rise with velocity: %g N at %g m/s is not above %g N at %g m/s",
					x, t.Velocity[j], row[j-1], t.Velocity[j-1])
			case k > 0 && j < len(t.Force[k-1]) && x > t.Force[k-1][j]:
				p.add(fmt.Sprintf("%s[%d]", rf, j), "must not rise from click %d to click %d (clicks count from the stiffest): %g N above %g N",
					k-1, k, x, t.Force[k-1][j])
			}
		}
	}
}

// setting is the value click k sets (linear map).
func (j *Adjuster) setting(k int) float64 {
	if k == j.Clicks-1 {
		return j.Softest // exactly, not up to rounding
	}
	return j.Stiffest + (j.Softest-j.Stiffest)*float64(k)/float64(j.Clicks-1)
}

// nearest is the click whose setting is nearest x, ties to the stiffer.
func (j *Adjuster) nearest(x float64) int {
	if j.Stiffest == j.Softest {
		return 0
	}
	k := int(math.Round((j.Stiffest - x) / (j.Stiffest - j.Softest) * float64(j.Clicks-1)))
	return max(0, min(j.Clicks-1, k))
}

// dynoRatio is the damping ratio at the wheel of a dyno table's click k
// for a corner of critical damping cc (N s/m, wheel) and motion ratio mr:
// the click's low-speed slope F_k(v_0)/v_0 at the damper times MR² over cc.
func (t *DynoTable) dynoRatio(k int, cc, mr float64) float64 {
	return t.Force[k][0] / t.Velocity[0] * mr * mr / cc
}

// nearestDyno is the click of a table whose low-speed ratio is nearest z.
func (t *DynoTable) nearestDyno(z, cc, mr float64) int {
	best, bd := 0, math.Inf(1)
	for k := range t.Force {
		if d := math.Abs(t.dynoRatio(k, cc, mr) - z); d < bd {
			best, bd = k, d
		}
	}
	return best
}

// ratioClick is the click of a low-speed adjuster for ratio z at corner
// i, and the ratio that click sets.
func (j *Adjuster) ratioClick(z float64, v *Vehicle, cc *[4]float64, i int) (int, float64) {
	if j.Dyno != nil {
		mr := v.Corners[i].DamperMotionRatio
		k := j.Dyno.nearestDyno(z, cc[i], mr)
		return k, j.Dyno.dynoRatio(k, cc[i], mr)
	}
	k := j.nearest(z)
	return k, j.setting(k)
}

// factorClick is the click of a high-speed adjuster for factor r (0 is
// 1), and the factor that click sets.
func (j *Adjuster) factorClick(r float64) (int, float64) {
	k := j.nearest(factorOr1(r))
	return k, j.setting(k)
}

// Clicks returns the click of each adjuster of every corner for setup s
// (see the file's comment for the nearest click). The adjusters must be
// valid (Validate).
func (a *Adjusters) Clicks(v *Vehicle, s *Setup) [4]CornerClicks {
	cc := v.CriticalDamping()
	var out [4]CornerClicks
	for i := range out {
		ax := &a.Axles[i/2]
		ad := &s.Axles[i/2]
		c := CornerClicks{Corner: i, LowBump: -1, LowRebound: -1, HighBump: -1, HighRebound: -1}
		if ax.LowBump.Clicks > 0 {
			c.LowBump, _ = ax.LowBump.ratioClick(ad.BumpRatio, v, &cc, i)
		}
		if ax.LowRebound.Clicks > 0 {
			c.LowRebound, _ = ax.LowRebound.ratioClick(ad.ReboundRatio, v, &cc, i)
		}
		if ax.HighBump.Clicks > 0 {
			c.HighBump, _ = ax.HighBump.factorClick(ad.HighSpeedBump)
		}
		if ax.HighRebound.Clicks > 0 {
			c.HighRebound, _ = ax.HighRebound.factorClick(ad.HighSpeedRebound)
		}
		out[i] = c
	}
	return out
}

// Snap returns s with every adjusted value on its nearest click: the
// damping ratios on the low-speed adjusters' clicks, the high-speed
// factors on the high-speed adjusters'. A dyno table's click ratio is
// taken at the axle's left corner (both sides are set alike). A pure
// function of its inputs, so a seeded search that snaps stays
// deterministic.
func (a *Adjusters) Snap(v *Vehicle, s Setup) Setup {
	cc := v.CriticalDamping()
	for ax := range s.Axles {
		adj, d, i := &a.Axles[ax], &s.Axles[ax], 2*ax
		if adj.LowBump.Clicks > 0 {
			_, d.BumpRatio = adj.LowBump.ratioClick(d.BumpRatio, v, &cc, i)
		}
		if adj.LowRebound.Clicks > 0 {
			_, d.ReboundRatio = adj.LowRebound.ratioClick(d.ReboundRatio, v, &cc, i)
		}
		if adj.HighBump.Clicks > 0 {
			_, d.HighSpeedBump = adj.HighBump.factorClick(d.HighSpeedBump)
		}
		if adj.HighRebound.Clicks > 0 {
			_, d.HighSpeedRebound = adj.HighRebound.factorClick(d.HighSpeedRebound)
		}
	}
	return s
}

// AdjustersOf is the adjustment band as low-speed adjusters of two
// clicks (its two ends) on both axles, for the band check of a job that
// gives a band and no adjusters.
func AdjustersOf(adj Adjustment) Adjusters {
	var out Adjusters
	for ax := range out.Axles {
		if adj.BumpStiffest > 0 {
			out.Axles[ax].LowBump = Adjuster{Clicks: 2, Stiffest: adj.BumpStiffest, Softest: adj.BumpSoftest}
		}
		if adj.ReboundStiffest > 0 {
			out.Axles[ax].LowRebound = Adjuster{Clicks: 2, Stiffest: adj.ReboundStiffest, Softest: adj.ReboundSoftest}
		}
	}
	return out
}
