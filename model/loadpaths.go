package model

import "math"

// LoadPaths says how the inertial loads of a manoeuvre reach the tyres
// (see the manoeuvre cases): the centre-of-gravity heights, and the
// geometric part carried by the links, which loads the tyres without
// deflecting the springs. The zero value carries nothing through the
// links, with the CG at ground level; a car run through manoeuvres needs
// CGHeight > 0.
//
// The load-transfer model (Milliken & Milliken 1995, Race Car Vehicle
// Dynamics, ch. 18, load transfer), per unit acceleration at the sprung
// CG, with m_s,a = m_s·(b, a)/L the sprung mass on axle a and h the
// sprung CG height:
//
//	lateral a_y (+ left):   geometric ΔW_a = m_s,a a_y h_rc,a / t_a per axle
//	                        (outer tyre +, inner −, through the links);
//	                        elastic roll moment m_s a_y (h − h_ra), h_ra the
//	                        roll axis under the CG, through springs, bars and
//	                        dampers; unsprung ΔW_a = m_u,a a_y h_u,a / t_a
//	                        direct to the tyres
//	longitudinal a_x (+ forward): sprung transfer m_s a_x h / L to the rear,
//	                        of which the fraction Anti at each axle goes
//	                        through the links; unsprung Σ m_u,a h_u,a a_x / L
//	                        direct
//
// In the 7-DOF model these are generalised forces: the body gets the
// inertial moments m_s a_y h (roll) and m_s a_x h (pitch) of its load
// about the ground, and each link force is a pair acting on body and
// wheel like a spring force (so it moves no spring in steady state); the
// unsprung transfer acts on the wheels only. Springs, bars and dampers
// carry the rest, and the tyres, being compliant, carry everything.
type LoadPaths struct {
	// CGHeight is the sprung centre of gravity's height above the ground
	// at speed (m).
	CGHeight float64
	// RollCentreHeight is the front and rear roll-centre height above the
	// ground (m); below the ground is negative.
	RollCentreHeight [2]float64
	// AntiBrake is the fraction of each axle's share of the sprung
	// longitudinal load transfer that its links carry under braking:
	// front anti-dive, rear anti-lift (-; 1 = 100 %: that axle's springs
	// do not move under braking).
	AntiBrake [2]float64
	// AntiDrive is the same under acceleration: front anti-lift, rear
	// anti-squat (-).
	AntiDrive [2]float64
	// UnsprungCGHeight is the unsprung CG height per axle (m), about the
	// loaded tyre radius; 0 leaves the unsprung transfer out.
	UnsprungCGHeight [2]float64
}

func (l *LoadPaths) validate(p *problems, prefix string) {
	p.inOrZero(prefix+"cg_height_m", l.CGHeight, "LoadPaths.height_m")
	for ax := 0; ax < 2; ax++ {
		p.in(prefix+"roll_centre_height_m["+axleIndex[ax]+"]", l.RollCentreHeight[ax], "LoadPaths.roll_centre_height_m")
		p.in(prefix+"anti_brake["+axleIndex[ax]+"]", l.AntiBrake[ax], "LoadPaths.anti")
		p.in(prefix+"anti_drive["+axleIndex[ax]+"]", l.AntiDrive[ax], "LoadPaths.anti")
		p.inOrZero(prefix+"unsprung_cg_height_m["+axleIndex[ax]+"]", l.UnsprungCGHeight[ax], "LoadPaths.height_m")
	}
}

var axleIndex = [2]string{"0", "1"}

// inertialLoads are the generalised forces (N, N m on the state's
// coordinates) per unit input of a manoeuvre: braking and drive per m/s²
// of a_x (they differ by the anti fractions), cornering per m/s² of a_y,
// and the downforce change per unit of (V/V_0)² − 1.
type inertialLoads struct {
	brake, drive, lateral, aero [nDOF]float64
}

// pair adds a link force g at corner i that pushes body and wheel apart
// like a spring force (the body up at (x_i, y_i), the wheel down).
func (s *system) pair(f *[nDOF]float64, i int, g float64) {
	d := &s.d[i]
	f[dofHeave] -= d[0] * g
	f[dofPitch] -= d[1] * g
	f[dofRoll] -= d[2] * g
	f[dofWheel+i] -= g
}

// newInertialLoads builds the loads of LoadPaths for the car at its
// operating point op.
func newInertialLoads(v *Vehicle, s *system, op *OperatingPoint) inertialLoads {
	var il inertialLoads
	lp := &v.LoadPaths
	ms, h, l := v.SprungMass, lp.CGHeight, v.Wheelbase()
	msAxle := [2]float64{ms * v.CGToRearAxle / l, ms * v.CGToFrontAxle / l}
	track := [2]float64{v.TrackFront, v.TrackRear}
	il.lateral[dofRoll] = ms * h
	il.brake[dofPitch] = ms * h
	il.drive[dofPitch] = ms * h
	var unsprungMoment float64
	for ax := 0; ax < 2; ax++ {
		left, right := 2*ax, 2*ax+1
		g := msAxle[ax] * lp.RollCentreHeight[ax] / track[ax]
		s.pair(&il.lateral, right, g)
		s.pair(&il.lateral, left, -g)
		mu := v.Corners[left].UnsprungMass + v.Corners[right].UnsprungMass
		u := mu * lp.UnsprungCGHeight[ax] / track[ax]
		il.lateral[dofWheel+right] -= u
		il.lateral[dofWheel+left] += u
		unsprungMoment += mu * lp.UnsprungCGHeight[ax]
		// Axle a's share of the sprung transfer per m/s² of a_x: the front
		// gains −m_s h/L, the rear +m_s h/L, half per corner.
		share := ms * h / l / 2
		if ax == Front {
			share = -share
		}
		for _, i := range [2]int{left, right} {
			s.pair(&il.brake, i, lp.AntiBrake[ax]*share)
			s.pair(&il.drive, i, lp.AntiDrive[ax]*share)
		}
	}
	for i := 0; i < 4; i++ {
		u := unsprungMoment / l / 2 // front tyres gain −u per m/s² of a_x
		if i >= 2 {
			u = -u
		}
		il.brake[dofWheel+i] += u
		il.drive[dofWheel+i] += u
	}
	t := v.axleRows()
	for ax := 0; ax < 2; ax++ {
		for a := 0; a < 3; a++ {
			il.aero[a] -= op.Downforce[ax] * t[ax][a]
		}
	}
	return il
}

// at fills f with the generalised forces at accelerations ax, ay (m/s²)
// and speed ratio q = (V/V_0)² − 1.
func (il *inertialLoads) at(ax, ay, q float64, f []float64) {
	lon := &il.drive
	if ax < 0 {
		lon = &il.brake
	}
	for a := 0; a < nDOF; a++ {
		f[a] = ax*lon[a] + ay*il.lateral[a] + q*il.aero[a]
	}
}

// finiteAll reports whether every value is finite.
func finiteAll(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}
