package model

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/interp"
)

// at interpolates the table and its gradient at h (m) (see AeroTable).
// Outside the grid it continues linearly from the nearest edge point c:
// F(h) = F(c) + ∇F(c)·(h - c). It allocates (two spline fits per rear
// grid value); it runs only while the operating point is solved.
func (t *AeroTable) at(h [2]float64) (f [2]float64, jac [2][2]float64) {
	hf, hr := t.RideHeightFront, t.RideHeightRear
	c := [2]float64{clamp(h[0], hf[0], hf[len(hf)-1]), clamp(h[1], hr[0], hr[len(hr)-1])}
	g := make([]float64, len(hr))  // F along the rear grid at the query's front ride height
	dg := make([]float64, len(hr)) // ∂F/∂h_f along the rear grid
	col := make([]float64, len(hf))
	for ax, vals := range [2][]float64{t.Front, t.Rear} {
		for j := range hr {
			for i := range hf {
				col[i] = vals[i*len(hr)+j]
			}
			var s interp.NaturalCubic
			if err := s.Fit(hf, col); err != nil {
				panic(fmt.Sprintf("model: aero table spline: %v", err)) // validated grid: cannot happen
			}
			g[j], dg[j] = s.Predict(c[0]), s.PredictDerivative(c[0])
		}
		var sg, sd interp.NaturalCubic
		if err := sg.Fit(hr, g); err != nil {
			panic(fmt.Sprintf("model: aero table spline: %v", err))
		}
		if err := sd.Fit(hr, dg); err != nil {
			panic(fmt.Sprintf("model: aero table spline: %v", err))
		}
		jac[ax] = [2]float64{sd.Predict(c[1]), sg.PredictDerivative(c[1])}
		f[ax] = sg.Predict(c[1]) + jac[ax][0]*(h[0]-c[0]) + jac[ax][1]*(h[1]-c[1])
	}
	return f, jac
}

// contains reports whether h lies on the table's grid (m).
func (t *AeroTable) contains(h [2]float64) bool {
	hf, hr := t.RideHeightFront, t.RideHeightRear
	return h[0] >= hf[0] && h[0] <= hf[len(hf)-1] && h[1] >= hr[0] && h[1] <= hr[len(hr)-1]
}

func clamp(x, lo, hi float64) float64 { return math.Max(lo, math.Min(hi, x)) }

func (t *AeroTable) validate(p *problems, prefix string, maxForce float64) {
	grid := func(name string, xs []float64) bool {
		if len(xs) < 2 {
			p.add(prefix+name, "needs at least 2 ride heights, got %d", len(xs))
			return false
		}
		for k, x := range xs {
			if !p.finite(fmt.Sprintf("%s%s[%d]", prefix, name, k), x) {
				return false
			}
			if x <= 0 || x > 1 {
				p.add(fmt.Sprintf("%s%s[%d]", prefix, name, k), "must be a ride height in (0, 1] m, got %g", x)
				return false
			}
			if k > 0 && x <= xs[k-1] {
				p.add(fmt.Sprintf("%s%s[%d]", prefix, name, k), "must be greater than the one before (%g m), got %g", xs[k-1], x)
				return false
			}
		}
		return true
	}
	okF := grid("front_ride_height_m", t.RideHeightFront)
	okR := grid("rear_ride_height_m", t.RideHeightRear)
	if !okF || !okR {
		return
	}
	n := len(t.RideHeightFront) * len(t.RideHeightRear)
	for _, v := range []struct {
		name string
		vals []float64
	}{{"front_downforce_n", t.Front}, {"rear_downforce_n", t.Rear}} {
		if len(v.vals) != n {
			p.add(prefix+v.name, "needs %d values (front grid × rear grid, front index major), got %d", n, len(v.vals))
			continue
		}
		for k, x := range v.vals {
			if p.finite(fmt.Sprintf("%s%s[%d]", prefix, v.name, k), x) && math.Abs(x) > maxForce {
				p.add(fmt.Sprintf("%s%s[%d]", prefix, v.name, k), "must be at most %g N in size, got %g: check the unit and the exponent", maxForce, x)
			}
		}
	}
}
