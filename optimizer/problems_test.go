package optimizer

import (
	"errors"
	"math"
)

// constr is the CONSTR problem of Deb et al. (2002), §VI-B, Table V:
//
//	min f1 = x1,  f2 = (1 + x2)/x1,
//	g1 = x2 + 9 x1 − 6 ≥ 0,  g2 = −x2 + 9 x1 − 1 ≥ 0,
//	x1 ∈ [0.1, 1], x2 ∈ [0, 5].
//
// Violations are reported as max(0, −g).
type constr struct{}

func (constr) Bounds() []Bound     { return []Bound{{0.1, 1}, {0, 5}} }
func (constr) NumObjectives() int  { return 2 }
func (constr) NumConstraints() int { return 2 }
func (constr) Evaluate(x, obj, viol []float64) error {
	obj[0] = x[0]
	obj[1] = (1 + x[1]) / x[0]
	viol[0] = max(0, -(x[1] + 9*x[0] - 6))
	viol[1] = max(0, -(-x[1] + 9*x[0] - 1))
	return nil
}

// dtlz2 is DTLZ2 of K. Deb, L. Thiele, M. Laumanns and E. Zitzler,
// "Scalable test problems for evolutionary multiobjective optimization",
// in Evolutionary Multiobjective Optimization, Springer, 2005, pp. 105-145,
// doi:10.1007/1-84628-137-7_6, with three objectives and n genes in
// [0, 1]:
//
//	g  = Σ_{i≥3} (x_i − ½)²,
//	f1 = (1+g) cos(x1 π/2) cos(x2 π/2),
//	f2 = (1+g) cos(x1 π/2) sin(x2 π/2),
//	f3 = (1+g) sin(x1 π/2).
//
// The front is the positive octant of the unit sphere (g = 0).
type dtlz2 struct{ n int }

func (d dtlz2) Bounds() []Bound {
	b := make([]Bound, d.n)
	for i := range b {
		b[i] = Bound{0, 1}
	}
	return b
}
func (dtlz2) NumObjectives() int  { return 3 }
func (dtlz2) NumConstraints() int { return 0 }
func (d dtlz2) Evaluate(x, obj, _ []float64) error {
	var g float64
	for _, v := range x[2:] {
		g += (v - 0.5) * (v - 0.5)
	}
	a, b := x[0]*math.Pi/2, x[1]*math.Pi/2
	obj[0] = (1 + g) * math.Cos(a) * math.Cos(b)
	obj[1] = (1 + g) * math.Cos(a) * math.Sin(b)
	obj[2] = (1 + g) * math.Sin(a)
	return nil
}

// errRegion is what faulty returns in its failing region.
var errRegion = errors.New("model diverged")

// faulty is ZDT1 with 10 genes whose evaluation fails in parts of the
// design space: an error for x1 > 0.8, a NaN second objective for
// 0.4 < x1 < 0.5, and a constraint x2 ≤ 0.9 (violation x2 − 0.9).
type faulty struct{}

func (faulty) Bounds() []Bound {
	b := make([]Bound, 10)
	for i := range b {
		b[i] = Bound{0, 1}
	}
	return b
}
func (faulty) NumObjectives() int  { return 2 }
func (faulty) NumConstraints() int { return 1 }
func (faulty) Evaluate(x, obj, viol []float64) error {
	if x[0] > 0.8 {
		return errRegion
	}
	if err := (zdt{n: 10, h: zdt1H}).Evaluate(x, obj, nil); err != nil {
		return err
	}
	if x[0] > 0.4 && x[0] < 0.5 {
		obj[1] = math.NaN()
	}
	viol[0] = x[1] - 0.9
	return nil
}
