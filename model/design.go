package model

import (
	"fmt"
	"math"
)

// Range is a closed interval [Min, Max].
type Range struct{ Min, Max float64 }

// Gene describes one searched variable.
type Gene struct {
	Name string  // e.g. "front_bump_ratio"
	Min  float64 // lower bound (SI)
	Max  float64 // upper bound (SI)
}

// DesignSpace maps the searched genes to a Setup. The four damping ratios
// are always searched (two when Symmetric); knee velocities and
// high-speed factors are genes only where a range is given, and otherwise
// come from Base.
type DesignSpace struct {
	// Ratios bounds the damping ratios: front bump, front rebound, rear
	// bump, rear rebound (-).
	Ratios [4]Range
	// Symmetric makes bump = rebound per axle: two ratio genes, bounded by
	// the bump ranges.
	Symmetric bool
	// Knee, per axle, searches one knee velocity at the damper for both
	// directions (m/s); nil keeps Base's.
	Knee [2]*Range
	// HighSpeed, per axle, searches one high-speed factor for both
	// directions (-); nil keeps Base's.
	HighSpeed [2]*Range
	// HeaveRatio, per axle, searches the heave damper's ratio of the
	// axle's heave critical damping, bump = rebound (-); nil keeps
	// Base.Heave's (none when Base has none). Only an axle with a heave
	// element may have one (ValidateFor).
	HeaveRatio [2]*Range
	// Base gives every value that is not a gene.
	Base Setup
	// Snap, when not nil, puts every decoded setup on the clicks of its
	// adjusters (Adjusters.Snap). The search so evaluates snapped setups
	// only: its genes stay continuous (the optimiser's operators need
	// them so), and the setup, objectives, curves and clicks of every
	// solution are those of the snapped setup. Snapping is a pure
	// function of the genes, so a seeded search stays bit-for-bit
	// deterministic, also after a resume. Solutions whose genes snap to
	// the same clicks are the same setup.
	Snap *ClickSnap
}

// ClickSnap is what snapping to clicks needs: the car (critical damping
// and motion ratios, for dyno tables) and the adjusters.
type ClickSnap struct {
	Vehicle   *Vehicle
	Adjusters *Adjusters
}

// Validate checks the bounds and names every bad field: each bound in
// the plausible range of its setting (see Limit), max >= min.
func (d *DesignSpace) Validate() error {
	var p problems
	names := [4]string{"front_bump", "front_rebound", "rear_bump", "rear_rebound"}
	for i, r := range d.Ratios {
		if d.Symmetric && i%2 == 1 {
			continue
		}
		p.bounds("ratios."+names[i], r, "AxleDamping.ratio")
	}
	for ax := 0; ax < 2; ax++ {
		if k := d.Knee[ax]; k != nil {
			p.bounds(fmt.Sprintf("knee_m_per_s[%d]", ax), *k, "AxleDamping.knee_m_per_s")
		}
		if h := d.HighSpeed[ax]; h != nil {
			p.bounds(fmt.Sprintf("high_speed[%d]", ax), *h, "AxleDamping.high_speed")
		}
		if h := d.HeaveRatio[ax]; h != nil {
			p.bounds(fmt.Sprintf("heave_ratio[%d]", ax), *h, "AxleDamping.ratio")
		}
	}
	return p.err()
}

// ValidateFor reports genes and base settings the car cannot take: a
// heave damper gene or a base heave damper on an axle without a heave
// element, named as Validate names its fields.
func (d *DesignSpace) ValidateFor(v *Vehicle) error {
	var p problems
	for ax := 0; ax < 2; ax++ {
		if d.HeaveRatio[ax] != nil && !v.Heave[ax].has() {
			p.add(fmt.Sprintf("heave_ratio[%d]", ax), "searches a heave damper on the %s axle, but the vehicle has no heave element there (vehicle.heave[%d].motion_ratio)", AxleNames[ax], ax)
		}
	}
	p.merge("base.", v.CheckSetup(&d.Base))
	return p.err()
}

// bounds checks a searched range: both ends in the named plausible
// range, max >= min.
func (p *problems) bounds(field string, r Range, name string) {
	p.in(field+".min", r.Min, name)
	p.in(field+".max", r.Max, name)
	if r.Max < r.Min {
		p.add(field+".max", "must be >= min (%g), got %g", r.Min, r.Max)
	}
}

// Genes lists the searched variables in gene order.
func (d *DesignSpace) Genes() []Gene {
	var g []Gene
	if d.Symmetric {
		g = append(g, Gene{"front_ratio", d.Ratios[0].Min, d.Ratios[0].Max}, Gene{"rear_ratio", d.Ratios[2].Min, d.Ratios[2].Max})
	} else {
		g = append(g,
			Gene{"front_bump_ratio", d.Ratios[0].Min, d.Ratios[0].Max},
			Gene{"front_rebound_ratio", d.Ratios[1].Min, d.Ratios[1].Max},
			Gene{"rear_bump_ratio", d.Ratios[2].Min, d.Ratios[2].Max},
			Gene{"rear_rebound_ratio", d.Ratios[3].Min, d.Ratios[3].Max})
	}
	for ax := 0; ax < 2; ax++ {
		if k := d.Knee[ax]; k != nil {
			g = append(g, Gene{AxleNames[ax] + "_knee_m_per_s", k.Min, k.Max})
		}
		if h := d.HighSpeed[ax]; h != nil {
			g = append(g, Gene{AxleNames[ax] + "_high_speed", h.Min, h.Max})
		}
	}
	for ax := 0; ax < 2; ax++ {
		if h := d.HeaveRatio[ax]; h != nil {
			g = append(g, Gene{AxleNames[ax] + "_heave_ratio", h.Min, h.Max})
		}
	}
	return g
}

// Decode turns genes (in Genes order) into a setup.
func (d *DesignSpace) Decode(x []float64) Setup {
	s := d.Base
	i := 0
	if d.Symmetric {
		s.Axles[Front].BumpRatio, s.Axles[Front].ReboundRatio = x[0], x[0]
		s.Axles[Rear].BumpRatio, s.Axles[Rear].ReboundRatio = x[1], x[1]
		i = 2
	} else {
		s.Axles[Front].BumpRatio, s.Axles[Front].ReboundRatio = x[0], x[1]
		s.Axles[Rear].BumpRatio, s.Axles[Rear].ReboundRatio = x[2], x[3]
		i = 4
	}
	for ax := 0; ax < 2; ax++ {
		if d.Knee[ax] != nil {
			s.Axles[ax].KneeBump, s.Axles[ax].KneeRebound = x[i], x[i]
			i++
		}
		if d.HighSpeed[ax] != nil {
			s.Axles[ax].HighSpeedBump, s.Axles[ax].HighSpeedRebound = x[i], x[i]
			i++
		}
	}
	for ax := 0; ax < 2; ax++ {
		if d.HeaveRatio[ax] != nil {
			s.Heave[ax].BumpRatio, s.Heave[ax].ReboundRatio = x[i], x[i]
			i++
		}
	}
	if d.Snap != nil {
		s = d.Snap.Adjusters.Snap(d.Snap.Vehicle, s)
	}
	return s
}

// Encode is the inverse of Decode for the genes a setup determines.
func (d *DesignSpace) Encode(s Setup) []float64 {
	var x []float64
	if d.Symmetric {
		x = append(x, s.Axles[Front].BumpRatio, s.Axles[Rear].BumpRatio)
	} else {
		x = append(x, s.Axles[Front].BumpRatio, s.Axles[Front].ReboundRatio, s.Axles[Rear].BumpRatio, s.Axles[Rear].ReboundRatio)
	}
	for ax := 0; ax < 2; ax++ {
		if d.Knee[ax] != nil {
			x = append(x, s.Axles[ax].KneeBump)
		}
		if d.HighSpeed[ax] != nil {
			x = append(x, s.Axles[ax].HighSpeedBump)
		}
	}
	for ax := 0; ax < 2; ax++ {
		if d.HeaveRatio[ax] != nil {
			x = append(x, s.Heave[ax].BumpRatio)
		}
	}
	return x
}

// MaxSlopeRatio is the steepest damper slope any setup of the space can
// have, as a ratio of critical damping (the corners' of theirs, the heave
// dampers' of the axle's heave critical damping): the largest ratio
// bound or base heave ratio times the largest high-speed or stage factor
// (at least 1). The manoeuvre and kerb cases choose their step for it
// (TransientOptions.MaxRatio), the heave dampers' included.
func (d *DesignSpace) MaxSlopeRatio() float64 {
	r := 0.0
	for _, b := range d.Ratios {
		r = math.Max(r, b.Max)
	}
	f := 1.0
	for ax := 0; ax < 2; ax++ {
		a, h := &d.Base.Axles[ax], &d.Base.Heave[ax]
		f = math.Max(f, math.Max(a.steepestFactor(), h.steepestFactor()))
		if hs := d.HighSpeed[ax]; hs != nil {
			f = math.Max(f, hs.Max)
		}
		r = math.Max(r, math.Max(h.BumpRatio, h.ReboundRatio))
		if hr := d.HeaveRatio[ax]; hr != nil {
			r = math.Max(r, hr.Max)
		}
	}
	return r * f
}

// steepestFactor is the largest slope factor over the low-speed slope of
// the damper's curve: high-speed factors and stages (0 for none).
func (a *AxleDamping) steepestFactor() float64 {
	f := math.Max(a.HighSpeedBump, a.HighSpeedRebound)
	for _, st := range [2]*[MaxStages]Stage{&a.StagesBump, &a.StagesRebound} {
		for _, s := range st {
			f = math.Max(f, s.Factor)
		}
	}
	return f
}
