package model

import (
	"fmt"
	"math"
)

// A logged table's speed changes through the record, and with it the
// aero: at speed V the map's force and slopes are (V/V_0)² = 1 + q times
// those at the operating point's speed V_0 (both scale with the dynamic
// pressure, see Aero). About the operating point at V_0, with K_a its
// aero stiffness and F_0 its downforce, the linearised aero load at V is
//
//	F(V, h_0 + Δh) = (1 + q)(F_0 − K_a Δh)
//
// so besides the downforce change q F_0 (inertialLoads.aero, an input)
// the aero stiffness grows by q K_a: the generalised force
// q Σ_(a,b) K_a[a][b] T_aᵀ Δh_b, Δh_b axle b's ride-height change above
// the road, which depends on the state and is added in timeModel.accel
// from q carried in each input sample (inWidthSpeed). Settled at a
// constant speed V this is the operating point at V for a linear map
// (statics: Δh = F/(k − k_a) per axle with F and k_a at V); for a table
// or polynomial map it is that point's linearisation about the ride
// heights at V_0, exact to first order in the ride-height change. Nothing
// else of the operating point depends on the speed: the springs, bars,
// tyres and masses do not, and the tyre loads, gaps and ride heights are
// carried as changes from the point at V_0.

// inWidthSpeed is the input sample width of a manoeuvre whose speed
// changes on a car with aero stiffness: the road, the generalised forces,
// then q = (V/V_0)² − 1.
const inWidthSpeed = inWidthForced + 1

// aeroSpeed adds q Σ_(a,b) K_a[a][b] T_aᵀ Δh_b to f, with Δh_b = T_b x −
// (w_L + w_R)/2 from the state x and the road inputs in.
func (m *timeModel) aeroSpeed(x *[nDOF]float64, in []float64, q float64, f *[nDOF]float64) {
	if q == 0 {
		return
	}
	var dh [2]float64
	for b := 0; b < 2; b++ {
		t := &m.axle[b]
		dh[b] = t[0]*x[0] + t[1]*x[1] + t[2]*x[2] - (in[2*b]+in[2*b+1])/2
	}
	for a := 0; a < 2; a++ {
		g := q * (m.ka[a][0]*dh[0] + m.ka[a][1]*dh[1])
		t := &m.axle[a]
		f[0] += g * t[0]
		f[1] += g * t[1]
		f[2] += g * t[2]
	}
}

// speedFollows reports whether the manoeuvre's speed changes on a car
// whose aero stiffness at the operating point is not zero: its samples
// then carry q (inWidthSpeed).
func (c *transientCase) speedFollows() bool {
	if c.man == nil || c.op.AeroStiffness == [2][2]float64{} {
		return false
	}
	lo, hi := c.man.speedRange()
	return lo != hi
}

// speedRatio is q = (V/V_0)² − 1 for the speed V (0 when V_0 is 0).
func (c *transientCase) speedRatio(v float64) float64 {
	v0 := c.op.Speed
	if v0 == 0 {
		return 0
	}
	return v*v/(v0*v0) - 1
}

// systemAt is the case's system with the aero stiffness at speed ratio q,
// (1 + q) K_a: the stiffness the car has at that speed about the
// operating point. It refuses a speed at which the aero stiffness exceeds
// the suspension's (as the operating point does).
func (c *transientCase) systemAt(q float64) (*system, error) {
	if q == 0 {
		return c.tm.sys, nil
	}
	var ka [2][2]float64
	for a := range ka {
		for b := range ka[a] {
			ka[a][b] = (1 + q) * c.op.AeroStiffness[a][b]
		}
	}
	s := newSystem(c.v, &ka)
	if !s.stiffEnough() {
		return nil, fmt.Errorf("%w: at %.4g m/s, which the table reaches from %.4g m/s, the aero stiffness exceeds the suspension's", ErrNoEquilibrium, c.op.Speed*math.Sqrt(1+q), c.op.Speed)
	}
	return s, nil
}

// quasiStaticAtSpeed solves K(q_k) x_k = f_k at each step k of a manoeuvre whose
// speed follows the table (see systemAt), writing the roll and pitch to
// c.qs and the tyre load changes to c.qsLoad, and K(q) x = f for the last
// sample to c.final. force gives f at a half-step sample.
func (c *transientCase) quasiStaticAtSpeed(force func(j int) [nDOF]float64) error {
	var sys *system
	qPrev := 0.0
	at := func(j int) ([nDOF]float64, error) {
		q := c.in[j*inWidthSpeed+inWidthForced]
		if sys == nil || q != qPrev {
			s, err := c.systemAt(q)
			if err != nil {
				return [nDOF]float64{}, err
			}
			sys, qPrev = s, q
		}
		return sys.staticSolve(force(j))
	}
	for k := 0; k < c.steps; k++ {
		x, err := at(2 * k)
		if err != nil {
			return err
		}
		c.qs[0][k], c.qs[1][k] = x[dofRoll], x[dofPitch]
		for i := range c.qsLoad {
			c.qsLoad[i][k] = -c.v.Corners[i].TyreRate * x[dofWheel+i]
		}
	}
	var err error
	c.final, err = at(len(c.in)/inWidthSpeed - 1)
	return err
}
