package model

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// stateMatrixEigen returns the eigenvalues of the linear state matrix
// [[0, I], [-M⁻¹(K + Dᵀ diag(kx) D), -M⁻¹(C + Dᵀ diag(c) D)]] (gonum
// mat.Eigen).
func stateMatrixEigen(s *system, c, kx [nDamp]float64) ([]complex128, error) {
	sys := s.withDamping(c)
	const n = 2 * nDOF
	a := mat.NewDense(n, n, nil)
	for i := 0; i < nDOF; i++ {
		a.Set(i, nDOF+i, 1)
		for j := 0; j < nDOF; j++ {
			k := sys.k[i][j]
			for q := 0; q < nDamp; q++ {
				if kx[q] != 0 {
					k += s.r[q][i] * kx[q] * s.r[q][j]
				}
			}
			a.Set(nDOF+i, j, -k/s.m[i])
			a.Set(nDOF+i, nDOF+j, -sys.c[i][j]/s.m[i])
		}
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenNone) {
		return nil, fmt.Errorf("model: eigen decomposition of the state matrix failed")
	}
	return eig.Values(nil), nil
}

// timing chooses the step and the settling time (s) for the model (see
// SimulateCase).
func (m *timeModel) timing() (h, settle, rho float64, err error) {
	var cmax, cmin, kx [nDamp]float64
	for i := range m.damp {
		cmin[i], cmax[i] = m.damp[i].slopeRange()
		if i < 4 && m.stop[i] != nil {
			kx[i] = m.stop[i].maxSlope()
		}
	}
	for ax := 0; ax < 2; ax++ {
		if m.packer[ax] > 0 {
			kx[dampHeave+ax] = m.kp[ax] * m.mr3[ax] * m.mr3[ax] // on the mean wheel travel
		}
	}
	fast, err := stateMatrixEigen(m.sys, cmax, kx)
	if err != nil {
		return 0, 0, 0, err
	}
	for _, l := range fast {
		rho = math.Max(rho, cmplx.Abs(l))
	}
	h = math.Min(stepStability/rho, stepMax)
	slow, err := stateMatrixEigen(m.sys, cmin, [nDamp]float64{})
	if err != nil {
		return 0, 0, 0, err
	}
	alpha := math.Inf(1)
	for _, l := range slow {
		alpha = math.Min(alpha, -real(l))
	}
	if !(alpha > 0) {
		return 0, 0, 0, fmt.Errorf("%w: the state matrix has an eigenvalue with real part %g >= 0", ErrUnstable, -alpha)
	}
	settle = math.Max(settleMin, math.Min(settleMax, settleDecay/alpha))
	return h, settle, rho, nil
}
