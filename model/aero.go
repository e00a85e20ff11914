package model

import (
	"fmt"
	"math"
	"strings"
)

// Aero is the car's downforce as a function of the front and rear ride
// height, given at a reference speed and scaled by (V/V_ref)² to each
// case's speed (dynamic pressure ½ρV², constant coefficients).
//
// Three forms, at most one given:
//
//   - linear per axle (Downforce, Stiffness; the simplest map):
//     F_ax(h) = D_ax - k_ax (h_ax - h_ax,rest), no cross terms;
//   - a table on a ride-height grid (Table);
//   - a polynomial in the two ride heights (Polynomial).
//
// The downforce acts on the body at each axle's centre line, where the
// ride height is measured. At a case's speed the car settles at its
// operating point (see OperatingPoint), and the map's slope there is the
// aero stiffness, K_a = -∂F/∂h (2×2, cross terms included).
type Aero struct {
	ReferenceSpeed float64 // speed at which the figures hold (m/s); 0 = no aero

	// Downforce per axle at the reference speed with the car at its rest
	// ride heights (N), front, rear; the linear map.
	Downforce [2]float64
	// Stiffness is the increase of an axle's downforce per metre of drop
	// of that axle's ride height (N/m) at the reference speed; positive for
	// a car that gains downforce nearer the ground. It acts as a negative
	// spring on the body. The linear map.
	Stiffness [2]float64

	Table      *AeroTable      // downforce on a ride-height grid; nil = none
	Polynomial *AeroPolynomial // downforce as a polynomial; nil = none
}

// AeroTable is downforce per axle on a grid of front and rear ride
// heights at the reference speed.
//
// Interpolation: a tensor-product natural cubic spline (the "splie2/
// splin2" construction of Press et al., Numerical Recipes, 3rd ed. 2007,
// §3.6, with gonum's interp.NaturalCubic in each direction): a spline
// along the front ride height for each rear grid value, then a spline
// along the rear ride height through their values at the query. Why this
// one: it is C² in each direction, so the aero stiffness (the first
// derivative) is smooth in the operating point and Newton converges
// quadratically; and it reproduces exactly any map of the form
// a + b h_f + c h_r + d h_f h_r, so a table sampled from a linear map is
// that linear map. A monotone spline (Fritsch-Butland) would not
// overshoot between points but is only C¹, and a downforce map's peak
// near the ground (stall) is not monotone anyway. Outside the grid the
// map is continued linearly from its edge (value and slope there), and an
// operating point outside the grid is refused.
type AeroTable struct {
	RideHeightFront []float64 // front ride-height grid (m), increasing, at least 2 points
	RideHeightRear  []float64 // rear ride-height grid (m), increasing, at least 2 points
	// Front and Rear are the axles' downforce (N) at the grid points,
	// front index major: value [i·len(RideHeightRear) + j] is at
	// (RideHeightFront[i], RideHeightRear[j]).
	Front, Rear []float64
}

// AeroPolynomial is downforce per axle as a polynomial in the ride
// heights about an origin, at the reference speed:
//
//	F_ax(h_f, h_r) = Σ_terms c_ax (h_f - o_f)^p (h_r - o_r)^q
type AeroPolynomial struct {
	Origin [2]float64 // front and rear ride heights the powers are taken about (m)
	Terms  []AeroTerm
}

// AeroTerm is one term c (h_f - o_f)^p (h_r - o_r)^q of an AeroPolynomial.
type AeroTerm struct {
	PowerFront, PowerRear int        // p, q >= 0
	Coefficient           [2]float64 // c for the front and rear axle's downforce (N/m^(p+q))
}

// maxAeroPower bounds a polynomial term's powers (common practice, no
// source: maps are fitted with low orders; higher ones ring).
const maxAeroPower = 6

// has reports whether the car has aero at all.
func (a *Aero) has() bool { return a.ReferenceSpeed > 0 }

// linear reports whether the map is the per-axle linear one.
func (a *Aero) linear() bool { return a.Table == nil && a.Polynomial == nil }

// speedScale is (V/V_ref)², 0 without aero.
func (a *Aero) speedScale(speed float64) float64 {
	if !a.has() {
		return 0
	}
	return (speed / a.ReferenceSpeed) * (speed / a.ReferenceSpeed)
}

// at returns the downforce per axle (N) and its derivative
// jac[ax][b] = ∂F_ax/∂h_b (N/m) at the reference speed, at the ride
// heights h0 + dh: h0 the rest ride heights, dh the change from rest (m,
// + up).
func (a *Aero) at(h0, dh [2]float64) (f [2]float64, jac [2][2]float64) {
	switch {
	case a.Table != nil:
		return a.Table.at([2]float64{h0[0] + dh[0], h0[1] + dh[1]})
	case a.Polynomial != nil:
		return a.Polynomial.at([2]float64{h0[0] + dh[0], h0[1] + dh[1]})
	}
	for ax := 0; ax < 2; ax++ {
		f[ax] = a.Downforce[ax] - a.Stiffness[ax]*dh[ax]
		jac[ax][ax] = -a.Stiffness[ax]
	}
	return f, jac
}

// at evaluates the polynomial and its gradient at h (m).
func (p *AeroPolynomial) at(h [2]float64) (f [2]float64, jac [2][2]float64) {
	u, w := h[0]-p.Origin[0], h[1]-p.Origin[1]
	for _, t := range p.Terms {
		up, wq := math.Pow(u, float64(t.PowerFront)), math.Pow(w, float64(t.PowerRear))
		var du, dw float64
		if t.PowerFront > 0 {
			du = float64(t.PowerFront) * math.Pow(u, float64(t.PowerFront-1)) * wq
		}
		if t.PowerRear > 0 {
			dw = up * float64(t.PowerRear) * math.Pow(w, float64(t.PowerRear-1))
		}
		for ax := 0; ax < 2; ax++ {
			f[ax] += t.Coefficient[ax] * up * wq
			jac[ax][0] += t.Coefficient[ax] * du
			jac[ax][1] += t.Coefficient[ax] * dw
		}
	}
	return f, jac
}

// validate checks the aero and names every bad field under prefix.
func (a *Aero) validate(p *problems, prefix string, rest [2]float64) {
	p.inOrZero(prefix+"reference_speed_m_per_s", a.ReferenceSpeed, "Aero.reference_speed_m_per_s")
	const maxForce = 1e6 // out-of-scale guard of the maps' values (common practice, no source)
	for ax := 0; ax < 2; ax++ {
		p.in(fmt.Sprintf("%sdownforce_n[%d]", prefix, ax), a.Downforce[ax], "Aero.downforce_n")
		p.in(fmt.Sprintf("%sstiffness_n_per_m[%d]", prefix, ax), a.Stiffness[ax], "Aero.stiffness_n_per_m")
	}
	maps := 0
	linearGiven := a.Downforce != [2]float64{} || a.Stiffness != [2]float64{}
	if linearGiven {
		maps++
	}
	if a.Table != nil {
		maps++
		a.Table.validate(p, prefix+"table.", maxForce)
	}
	if a.Polynomial != nil {
		maps++
		a.Polynomial.validate(p, prefix+"polynomial.")
	}
	if maps > 1 {
		p.add(strings.TrimSuffix(prefix, "."), "give one aero map: the linear downforce and stiffness, a table or a polynomial, not %d of them", maps)
	}
	if a.ReferenceSpeed == 0 && maps > 0 {
		p.add(prefix+"reference_speed_m_per_s", "must be > 0 when downforce or an aero map is given")
	}
	if !a.linear() && (rest[0] <= 0 || rest[1] <= 0) {
		for ax := 0; ax < 2; ax++ {
			if rest[ax] <= 0 {
				p.add(fmt.Sprintf("rest_ride_height_m[%d]", ax), "a ride-height aero map needs the rest ride heights front and rear (> 0), got %g m", rest[ax])
			}
		}
	}
}

func (p *AeroPolynomial) validate(pr *problems, prefix string) {
	pr.finite(prefix+"front_origin_m", p.Origin[0])
	pr.finite(prefix+"rear_origin_m", p.Origin[1])
	if len(p.Terms) == 0 {
		pr.add(prefix+"terms", "needs at least one term")
	}
	for k, t := range p.Terms {
		f := fmt.Sprintf("%sterms[%d].", prefix, k)
		if t.PowerFront < 0 || t.PowerFront > maxAeroPower {
			pr.add(f+"front_power", "must be in [0, %d], got %d", maxAeroPower, t.PowerFront)
		}
		if t.PowerRear < 0 || t.PowerRear > maxAeroPower {
			pr.add(f+"rear_power", "must be in [0, %d], got %d", maxAeroPower, t.PowerRear)
		}
		pr.finite(f+"front_coefficient", t.Coefficient[0])
		pr.finite(f+"rear_coefficient", t.Coefficient[1])
	}
}
