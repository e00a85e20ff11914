package model

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// Degrees of freedom and their indices in the state vector.
const (
	dofHeave = 0
	dofPitch = 1
	dofRoll  = 2
	dofWheel = 3 // wheel i is dofWheel+i
	nDOF     = 7
	nIn      = 4
	// nDamp counts the damper coordinates: the four corners' travels and
	// each axle's mean wheel travel, where its heave damper acts
	// (dampHeave+axle).
	nDamp     = 6
	dampHeave = 4
)

// system holds the real matrices of M ẍ + C ẋ + K x = Bk w + Bc ẇ.
//
// With s = D x the suspension travel (D_i = [-1, -x_i, -y_i, e_i]) and
// E x the wheel displacements:
//
//	K  = Dᵀ Ks D + Eᵀ Kt E - Σ_(a,b) K_a[a][b] T_aᵀ T_b
//	C  = Dᵀ Cs D + Eᵀ Ct E
//	Bk = Eᵀ Kt - Σ_(a,b) K_a[a][b] T_aᵀ [½ ½] (on axle b's inputs)
//	Bc = Eᵀ Ct
//
// where Ks is diagonal in the wheel rates plus each axle's bar coupling
// (k_bar/2)[[1,-1],[-1,1]] and heave spring (k3 MR3²/4)[[1,1],[1,1]]
// (see HeaveElement), Cs = Σ_j c_j R_jᵀ R_j over the damper rows R_j
// (the corner dampers at the wheel on D_i, each axle's heave damper on
// its mean wheel travel (D_L + D_R)/2; with heave dampers Cs is not
// diagonal), Kt
// and Ct the tyres, and T_a = [1, x_a, -y_cg] the body point on axle a's
// centre line. The aero term is the linearised downforce at the operating
// point: K_a = -∂F/∂h (2×2, see Aero) gives the upward force
// Σ_b K_a[a][b]·h_b on the body at axle a, h_b axle b's ride height above
// the road (downforce grows as h falls). With cross terms K is not
// symmetric (the aero force is not conservative).
type system struct {
	m      [nDOF]float64 // diagonal mass matrix
	k, c   [nDOF][nDOF]float64
	bk, bc [nDOF][nIn]float64
	// d holds the rows D_i (travel of corner i from the state).
	d [nIn][nDOF]float64
	// r holds the damper rows R_j: D_i for the corners (j = i < 4) and
	// (D_L + D_R)/2, the axle's mean wheel travel, for the heave dampers
	// (j = dampHeave+axle).
	r [nDamp][nDOF]float64
}

// newSystem builds the system with the aero stiffness ka (N/m at the
// case's speed, see OperatingPoint.AeroStiffness) and no suspension
// damping; withDamping adds it.
func newSystem(v *Vehicle, ka *[2][2]float64) *system {
	s := &system{}
	s.m[dofHeave] = v.SprungMass
	s.m[dofPitch] = v.PitchInertia
	s.m[dofRoll] = v.RollInertia
	for i := 0; i < 4; i++ {
		s.m[dofWheel+i] = v.Corners[i].UnsprungMass
		x, y := v.cornerPosition(i)
		s.d[i] = [nDOF]float64{-1, -x, -y}
		s.d[i][dofWheel+i] = 1
		s.r[i] = s.d[i]
	}
	for ax := 0; ax < 2; ax++ {
		for a := 0; a < nDOF; a++ {
			s.r[dampHeave+ax][a] = (s.d[2*ax][a] + s.d[2*ax+1][a]) / 2
		}
	}
	// Suspension stiffness matrix in travel coordinates.
	var ks [4][4]float64
	for i := 0; i < 4; i++ {
		ks[i][i] = v.Corners[i].WheelRateOf()
	}
	for ax := 0; ax < 2; ax++ {
		kb := v.AntiRoll[ax].WheelRateOf() / 2
		l, r := 2*ax, 2*ax+1
		ks[l][l] += kb
		ks[r][r] += kb
		ks[l][r] -= kb
		ks[r][l] -= kb
		// Heave spring: energy ½ k3 MR3² ((s_L + s_R)/2)².
		if k3 := v.Heave[ax].WheelRateOf(); k3 != 0 {
			q := k3 / 4
			ks[l][l] += q
			ks[r][r] += q
			ks[l][r] += q
			ks[r][l] += q
		}
	}
	for a := 0; a < nDOF; a++ {
		for b := 0; b < nDOF; b++ {
			sum := 0.0
			for i := 0; i < 4; i++ {
				for j := 0; j < 4; j++ {
					sum += s.d[i][a] * ks[i][j] * s.d[j][b]
				}
			}
			s.k[a][b] = sum
		}
	}
	for i := 0; i < 4; i++ {
		kt, ct := v.Corners[i].TyreRate, v.Corners[i].TyreDamping
		s.k[dofWheel+i][dofWheel+i] += kt
		s.c[dofWheel+i][dofWheel+i] += ct
		s.bk[dofWheel+i][i] = kt
		s.bc[dofWheel+i][i] = ct
	}
	t := v.axleRows()
	for ax := 0; ax < 2; ax++ {
		for bx := 0; bx < 2; bx++ {
			k := ka[ax][bx]
			if k == 0 {
				continue
			}
			for a := 0; a < 3; a++ {
				for b := 0; b < 3; b++ {
					s.k[a][b] -= k * t[ax][a] * t[bx][b]
				}
				s.bk[a][2*bx] -= k * t[ax][a] / 2
				s.bk[a][2*bx+1] -= k * t[ax][a] / 2
			}
		}
	}
	return s
}

// axleRows returns T_a, the body point on each axle's centre line (where
// the aero load acts and ride height is measured: y = -CGLateral from
// the sprung CG), as rows of the state: its rise is T_a·x.
func (v *Vehicle) axleRows() [2][nDOF]float64 {
	return [2][nDOF]float64{{1, v.CGToFrontAxle, -v.CGLateral}, {1, -v.CGToRearAxle, -v.CGLateral}}
}

// withDamping returns a copy of s with suspension dampers c (N s/m on
// each damper coordinate: the corners at the wheel, then the heave
// dampers on the axles' mean wheel travel; 0 = none) added to the tyre
// damping: C = Σ_j c_j R_jᵀ R_j + Eᵀ Ct E.
func (s *system) withDamping(c [nDamp]float64) system {
	out := *s
	for a := 0; a < nDOF; a++ {
		for b := a; b < nDOF; b++ {
			sum := 0.0
			for i := 0; i < nDamp; i++ {
				if c[i] != 0 {
					sum += s.r[i][a] * c[i] * s.r[i][b]
				}
			}
			out.c[a][b] += sum
			if b != a {
				out.c[b][a] += sum
			}
		}
	}
	return out
}

// stiffEnough reports whether the symmetric part of K, (K + Kᵀ)/2, is
// positive definite (Cholesky): then xᵀK x > 0 for every displacement,
// every static load has one equilibrium and the car does not diverge
// statically. For a symmetric K (a per-axle linear map) it is the usual
// test; the circulatory part of an aero map's cross terms can in
// principle make a damped car flutter, which the time-domain check's
// eigenvalues catch (common practice, no single source: a sufficient
// test for divergence, not for flutter).
func (s *system) stiffEnough() bool {
	k := mat.NewSymDense(nDOF, nil)
	for a := 0; a < nDOF; a++ {
		for b := a; b < nDOF; b++ {
			k.SetSym(a, b, (s.k[a][b]+s.k[b][a])/2)
		}
	}
	var ch mat.Cholesky
	return ch.Factorize(k)
}

// staticSolve solves K x = f for the mean displacement under mean forces.
func (s *system) staticSolve(f [nDOF]float64) ([nDOF]float64, error) {
	k := mat.NewDense(nDOF, nDOF, nil)
	for a := 0; a < nDOF; a++ {
		for b := 0; b < nDOF; b++ {
			k.Set(a, b, s.k[a][b])
		}
	}
	var x mat.VecDense
	if err := x.SolveVec(k, mat.NewVecDense(nDOF, f[:])); err != nil {
		return [nDOF]float64{}, fmt.Errorf("%w: static solve: %v", ErrUnstable, err)
	}
	var out [nDOF]float64
	for a := range out {
		out[a] = x.AtVec(a)
	}
	return out, nil
}
