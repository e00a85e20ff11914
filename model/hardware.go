package model

import (
	"fmt"
	"math"
)

// Damper hardware: the shape of the force-velocity curve beyond the
// low-speed slope, and the damper's constant forces.
//
// Per direction the force at the damper is a piecewise-linear, continuous
// function of the damper speed |v| (bump and rebound apart):
//
//	f(v) = c (v + Σ_j (s_j - s_(j-1)) (v - v_j)⁺),   s_0 = 1
//
// with c the low-speed slope (the damping-ratio gene), v_1 < v_2 < ... the
// knees and s_j the slope above knee j over c: s_j < s_(j-1) is a
// digressive stage, s_j > s_(j-1) a progressive one. The first knee is
// AxleDamping.KneeBump (its slope HighSpeedBump) or a blow-off knee; the
// further ones are Stages. On top of it:
//
//   - Blow-off (BlowOffBump, BlowOffRebound): a valve held shut by a
//     preload opens when the force reaches the blow-off force F_bo. It is
//     modelled as a knee at a force, not as a force step at v = 0: the
//     first knee sits at v_1 = F_bo / c, where the bleed's slope c
//     reaches F_bo, and the slope above it is the high-speed factor. Why
//     a knee: a real preloaded stack has a bleed in parallel, so the force
//     rises from zero along the bleed's slope and bends where the stack
//     lifts; a step at v = 0 would be mathematically the same as Coulomb
//     friction (already modelled on its own) and would make the
//     linearised slope infinite for a small velocity. Because the knee
//     moves with c, a stiffer bleed blows off at a lower speed, as on the
//     dyno. Stages at or below v_1 are inactive (the valve is still shut
//     there).
//   - Coulomb friction (Friction): ±F_c sign(v) in both directions (seals
//     and bushes), in the time domain as such and statistically
//     linearised in closed form (see linearise.go).
//   - Gas force (GasForce): the gas spring's constant push that extends
//     the damper. It is not put into the operating point's statics: the
//     rest ride heights, corner loads and bump-stop gaps a vehicle file
//     gives are measured on the complete car at rest, dampers fitted, so
//     the gas force is already inside them; adding it again would count
//     it twice. Being constant (its small rise with shaft travel, the gas
//     spring rate, is neglected), it changes neither the dynamics about
//     the operating point nor the mean shift at speed. It is carried for
//     the curve at the component (a dyno reading at v = 0 shows it; the
//     curves and the out-of-band check compare damping forces with the
//     gas force taken off, common dyno practice).

// MaxStages is the number of further knees a direction may have beyond
// its first knee.
const MaxStages = 5

// Stage is one further knee of a multi-stage curve.
type Stage struct {
	// Velocity is the knee velocity at the damper (m/s), above the first
	// knee and the previous stage; 0 ends the list.
	Velocity float64
	// Factor is the slope above the knee over the low-speed slope (-).
	Factor float64
}

// stages is a direction's further knees referred to the wheel.
type stages struct {
	n int
	v [MaxStages]float64 // knee velocities at the wheel (m/s), increasing
	r [MaxStages]float64 // slope above each over the low-speed slope (-)
}

// wheelDamper is one corner's damper referred to the wheel. The zero
// stages and friction make it the one-knee damper.
type wheelDamper struct {
	cb, cr float64 // low-speed slopes at the wheel (N s/m)
	vb, vr float64 // first knee velocities at the wheel (m/s), 0 = none
	rb, rr float64 // slope above the first knee over the low-speed slope
	sb, sr stages  // further knees at the wheel
	fric   float64 // Coulomb friction force at the wheel (N), both directions
}

// axleDamper is an axle's damper with low-speed slopes cb, cr at the
// wheel for motion ratio mr (mr = 1 and slopes at the damper give the
// damper at the component): velocities at the damper are divided by mr,
// forces at the damper multiplied by it.
func (a *AxleDamping) axleDamper(cb, cr, mr float64) wheelDamper {
	d := wheelDamper{
		cb: cb, cr: cr,
		vb: a.KneeBump / mr, vr: a.KneeRebound / mr,
		rb: factorOr1(a.HighSpeedBump), rr: factorOr1(a.HighSpeedRebound),
		fric: a.Friction * mr,
	}
	if a.BlowOffBump > 0 {
		d.vb = a.BlowOffBump * mr / cb
	}
	if a.BlowOffRebound > 0 {
		d.vr = a.BlowOffRebound * mr / cr
	}
	d.sb = wheelStages(&a.StagesBump, d.vb, mr)
	d.sr = wheelStages(&a.StagesRebound, d.vr, mr)
	return d
}

// wheelStages refers the stages above the first knee v1 (wheel) to the
// wheel; stages at or below v1 are inactive.
func wheelStages(st *[MaxStages]Stage, v1, mr float64) stages {
	var out stages
	if v1 <= 0 {
		return out
	}
	for _, s := range st {
		if s.Velocity == 0 {
			break
		}
		if v := s.Velocity / mr; v > v1 {
			out.v[out.n], out.r[out.n] = v, s.Factor
			out.n++
		}
	}
	return out
}

// force is the damper force at the wheel for wheel velocity v (bump > 0),
// friction included.
func (d *wheelDamper) force(v float64) float64 {
	if v >= 0 {
		f := branchForce(v, d.cb, d.vb, d.rb, &d.sb)
		if v > 0 {
			f += d.fric
		}
		return f
	}
	return -branchForce(-v, d.cr, d.vr, d.rr, &d.sr) - d.fric
}

// branchForce is one direction's force at speed v >= 0: c·v below the
// first knee vk, c·(vk + r(v - vk)) above it, and so on over the stages.
func branchForce(v, c, vk, r float64, st *stages) float64 {
	if vk <= 0 || v <= vk {
		return c * v
	}
	acc, prev, slope := vk, vk, r
	for j := 0; j < st.n && v > st.v[j]; j++ {
		acc += slope * (st.v[j] - prev)
		prev, slope = st.v[j], st.r[j]
	}
	return c * (acc + slope*(v-prev))
}

// slopeRange returns the smallest and largest slope of the curve (N s/m).
func (d *wheelDamper) slopeRange() (lo, hi float64) {
	lo = math.Min(math.Min(d.cb, d.cb*d.rb), math.Min(d.cr, d.cr*d.rr))
	hi = math.Max(math.Max(d.cb, d.cb*d.rb), math.Max(d.cr, d.cr*d.rr))
	for j := 0; j < d.sb.n; j++ {
		lo, hi = math.Min(lo, d.cb*d.sb.r[j]), math.Max(hi, d.cb*d.sb.r[j])
	}
	for j := 0; j < d.sr.n; j++ {
		lo, hi = math.Min(lo, d.cr*d.sr.r[j]), math.Max(hi, d.cr*d.sr.r[j])
	}
	return lo, hi
}

// linear reports a damper whose force is c·v in each direction: no knee
// that changes the slope, no friction.
func (d *wheelDamper) linear() bool {
	return d.fric == 0 && branchLinear(d.vb, d.rb, &d.sb) && branchLinear(d.vr, d.rr, &d.sr)
}

func branchLinear(vk, r float64, st *stages) bool {
	if vk <= 0 {
		return true
	}
	prev := r
	if prev != 1 {
		return false
	}
	for j := 0; j < st.n; j++ {
		if st.r[j] != prev {
			return false
		}
	}
	return true
}

// hasHardware reports a hardware field other than the one-knee curve.
func (a *AxleDamping) hasHardware() bool {
	return a.StagesBump != [MaxStages]Stage{} || a.StagesRebound != [MaxStages]Stage{} ||
		a.BlowOffBump != 0 || a.BlowOffRebound != 0 || a.Friction != 0 || a.GasForce != 0
}

// The plausible ranges of the hardware's values.
var (
	blowOffLimit  = limit("AxleDamping.blow_off_n")
	frictionLimit = limit("AxleDamping.friction_n")
	gasLimit      = limit("AxleDamping.gas_force_n")
)

// hardwareOK is the allocation-free form of checkHardware.
func (a *AxleDamping) hardwareOK() bool {
	if !a.hasHardware() {
		return true
	}
	var p problems
	a.checkHardware(&p, "")
	return len(p.list) == 0
}

// checkHardware adds every problem of the axle's hardware to p, field
// names after prefix ("front."): blow-off, friction and gas force in
// their plausible ranges; a blow-off force and a knee velocity in one
// direction are alternatives; stages need a first knee, come in
// increasing velocity above it with no gap in the list, and each has a
// velocity and a slope in range. Field names are built only for a
// problem, so a good axle allocates nothing.
func (a *AxleDamping) checkHardware(p *problems, prefix string) {
	p.inOrZeroAt(prefix, "blow_off_bump_n", a.BlowOffBump, blowOffLimit)
	p.inOrZeroAt(prefix, "blow_off_rebound_n", a.BlowOffRebound, blowOffLimit)
	p.inOrZeroAt(prefix, "friction_n", a.Friction, frictionLimit)
	p.inOrZeroAt(prefix, "gas_force_n", a.GasForce, gasLimit)
	if a.BlowOffBump != 0 && a.KneeBump != 0 {
		p.add(prefix+"blow_off_bump_n", "give either knee_bump_m_per_s or blow_off_bump_n (a knee at a force), not both")
	}
	if a.BlowOffRebound != 0 && a.KneeRebound != 0 {
		p.add(prefix+"blow_off_rebound_n", "give either knee_rebound_m_per_s or blow_off_rebound_n (a knee at a force), not both")
	}
	p.stages(prefix, "bump", &a.StagesBump, a.KneeBump, a.BlowOffBump != 0)
	p.stages(prefix, "rebound", &a.StagesRebound, a.KneeRebound, a.BlowOffRebound != 0)
}

// stages checks one direction's stages (see checkHardware).
func (p *problems) stages(prefix, dir string, st *[MaxStages]Stage, knee float64, blowOff bool) {
	prev := knee
	ended := false
	for j, s := range st {
		if s.Velocity == 0 && s.Factor == 0 {
			ended = true
			continue
		}
		field := func(leaf string) string { return fmt.Sprintf("%sstages_%s[%d]%s", prefix, dir, j, leaf) }
		switch {
		case ended:
			p.add(field(""), "follows an empty stage: the list has a gap")
		case knee == 0 && !blowOff:
			p.add(field(""), "needs a first knee: give knee_%s_m_per_s or blow_off_%s_n", dir, dir)
		}
		if !kneeLimit.Contains(s.Velocity) {
			p.add(field(".velocity_m_per_s"), "must be in %s, got %s%s", kneeLimit, num(s.Velocity), kneeLimit.hint(s.Velocity))
		} else if s.Velocity <= prev {
			p.add(field(".velocity_m_per_s"), "knees out of order: must be > %s m/s (the knee before), got %s", num(prev), num(s.Velocity))
		}
		if !highSpeedLimit.Contains(s.Factor) {
			p.add(field(".factor"), "must be in %s, got %s", highSpeedLimit, num(s.Factor))
		}
		if kneeLimit.Contains(s.Velocity) {
			prev = s.Velocity
		}
	}
}

// inOrZeroAt is inOrZero for the field prefix+name, built only for a problem.
func (p *problems) inOrZeroAt(prefix, name string, v float64, l Limit) {
	if v == 0 || l.Contains(v) {
		return
	}
	field := prefix + name
	if p.finite(field, v) {
		p.add(field, "must be in %s, got %s%s", l, num(v), l.hint(v))
	}
}
