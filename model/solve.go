package model

import (
	"math"
)

// maxRHS is the most right-hand sides solveComplex takes at once.
const maxRHS = 2

// solveComplex solves the n×n complex system a·x = b in place by Gaussian
// elimination with partial pivoting (Golub & Van Loan, "Matrix
// Computations", 4th ed., alg. 3.4.1), for nr right-hand sides; b holds the
// solutions on return and a is destroyed. It allocates nothing. It reports
// false when a pivot is zero (a singular dynamic stiffness, which a damped
// stable system never has).
func solveComplex(n, nr int, a *[nDOF][nDOF]complex128, b *[nDOF][maxRHS]complex128) bool {
	// The pivots' reciprocals, taken once: row col is final once its
	// column is eliminated, so back substitution divides by the same.
	var invs [nDOF]complex128
	if n > nDOF || nr > maxRHS {
		panic("model: solveComplex size out of range")
	}
	for col := 0; col < n; col++ {
		p, best := col, cabs1(a[col][col])
		for r := col + 1; r < n; r++ {
			if v := cabs1(a[r][col]); v > best {
				p, best = r, v
			}
		}
		if best == 0 {
			return false
		}
		if p != col {
			// Columns left of col are never read again.
			for c := col; c < n; c++ {
				a[p][c], a[col][c] = a[col][c], a[p][c]
			}
			b[p], b[col] = b[col], b[p]
		}
		pr, pb := &a[col], &b[col]
		inv := recip(pr[col])
		invs[col] = inv
		for r := col + 1; r < n; r++ {
			ar, br := &a[r], &b[r]
			f := ar[col] * inv
			if f == 0 {
				continue
			}
			for c := col + 1; c < n; c++ {
				ar[c] -= f * pr[c]
			}
			for j := 0; j < nr; j++ {
				br[j] -= f * pb[j]
			}
		}
	}
	for col := n - 1; col >= 0; col-- {
		inv, ar := invs[col], &a[col]
		for j := 0; j < nr; j++ {
			s := b[col][j]
			for c := col + 1; c < n; c++ {
				s -= ar[c] * b[c][j]
			}
			b[col][j] = s * inv
		}
	}
	return true
}

// recip is 1/z for a finite non-zero z, without the runtime's complex
// division (which guards against infinities the solver never has). The
// scaling by the larger part avoids overflow of |z|².
func recip(z complex128) complex128 {
	re, im := real(z), imag(z)
	if math.Abs(re) >= math.Abs(im) {
		r := im / re
		d := 1 / (re + im*r)
		return complex(d, -r*d)
	}
	r := re / im
	d := 1 / (re*r + im)
	return complex(r*d, -d)
}

// cabs1 is |re| + |im|, a cheap pivot size.
func cabs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// abs2 is |z|².
func abs2(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }

// scale is complex(r, 0)·z and over is z/complex(r, 0) for finite z and
// r ≠ 0, without the complex product's and the runtime division's idle
// operations on the zero imaginary part: their values are the same
// (Smith's division, which the runtime uses, divides each part by r
// when the divisor is real), up to the sign of a zero part.
func scale(r float64, z complex128) complex128 { return complex(r*real(z), r*imag(z)) }

func over(z complex128, r float64) complex128 { return complex(real(z)/r, imag(z)/r) }
