package model

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestAeroTableReproducesBilinear checks the table's interpolation: a
// natural cubic spline reproduces a linear function exactly (its second
// derivatives are all zero, which meets the natural end conditions;
// Press et al., Numerical Recipes, 3rd ed., §3.3), so the tensor product
// reproduces F = a + b h_f + c h_r + d h_f h_r and its gradient anywhere
// on the grid. Tolerance 1e-9 relative to the largest term (the spline's
// tridiagonal solves round at ~1e-15 of the values, and the derivative
// divides by grid steps of a few mm).
func TestAeroTableReproducesBilinear(t *testing.T) {
	t.Parallel()
	const tol = 1e-9
	fn := func(ax int, hf, hr float64) (f, dfdf, dfdr float64) {
		a, b, c, d := [2]float64{5200, 6100}[ax], [2]float64{-6e4, 2e4}[ax], [2]float64{1.5e4, -5e4}[ax], [2]float64{3e5, -2e5}[ax]
		return a + b*hf + c*hr + d*hf*hr, b + d*hr, c + d*hf
	}
	tb := &AeroTable{RideHeightFront: []float64{0.02, 0.026, 0.035, 0.05, 0.07}, RideHeightRear: []float64{0.04, 0.05, 0.065, 0.072, 0.1, 0.12}}
	for _, hf := range tb.RideHeightFront {
		for _, hr := range tb.RideHeightRear {
			f0, _, _ := fn(0, hf, hr)
			f1, _, _ := fn(1, hf, hr)
			tb.Front, tb.Rear = append(tb.Front, f0), append(tb.Rear, f1)
		}
	}
	var p problems
	tb.validate(&p, "table.", 1e6)
	if err := p.err(); err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(11, 11))
	for k := 0; k < 50; k++ {
		h := [2]float64{0.02 + 0.05*r.Float64(), 0.04 + 0.08*r.Float64()}
		f, jac := tb.at(h)
		for ax := 0; ax < 2; ax++ {
			want, wf, wr := fn(ax, h[0], h[1])
			scale := 7000.0
			if math.Abs(f[ax]-want) > tol*scale || math.Abs(jac[ax][0]-wf) > tol*scale/0.005 || math.Abs(jac[ax][1]-wr) > tol*scale/0.005 {
				t.Errorf("at %v axle %d: F %.12g dF %v, want %.12g [%g %g]", h, ax, f[ax], jac[ax], want, wf, wr)
			}
		}
	}
	// Outside the grid the map continues linearly from the edge: value and
	// slope at the edge point (continuity, by construction).
	edge, jEdge := tb.at([2]float64{0.07, 0.08})
	out, jOut := tb.at([2]float64{0.08, 0.08})
	for ax := 0; ax < 2; ax++ {
		if want := edge[ax] + jEdge[ax][0]*0.01; math.Abs(out[ax]-want) > tol*7000 || jOut[ax] != jEdge[ax] {
			t.Errorf("axle %d beyond the grid: %g, linear continuation %g", ax, out[ax], want)
		}
	}
}

// TestOperatingPointNonlinearMap checks Newton's operating point on a
// map with cross terms and a product term, against statics: the body is
// a rigid beam on two supports at the axle lines and the downforce acts
// at the axle lines, so each axle's downforce at the point, evaluated
// here from the polynomial's own definition at the reported ride heights,
// equals the axle's rate times its drop, F_a(h) = k_a·(-Δh_a), with
// k_a = 2 k_w k_t/(k_w + k_t) (springs in series and in parallel); and
// each corner's compression is half the axle's downforce over k_w.
// Tolerance 1e-10 relative (Newton stops when its step is below 1e-12 m,
// and converges quadratically).
func TestOperatingPointNonlinearMap(t *testing.T) {
	t.Parallel()
	const tol = 1e-10
	v := crossAeroCar()
	pm := v.Aero.Polynomial
	pm.Terms = append(pm.Terms, AeroTerm{PowerFront: 1, PowerRear: 1, Coefficient: [2]float64{4e5, 2e5}},
		AeroTerm{PowerFront: 2, Coefficient: [2]float64{3e5, 0}})
	for _, speed := range []float64{30, 50, 56} {
		op, err := v.OperatingPoint(speed)
		if err != nil {
			t.Fatal(err)
		}
		q := (speed / v.Aero.ReferenceSpeed) * (speed / v.Aero.ReferenceSpeed)
		u, w := op.RideHeight[0]-pm.Origin[0], op.RideHeight[1]-pm.Origin[1]
		for ax := 0; ax < 2; ax++ {
			df := 0.0
			for _, tm := range pm.Terms {
				df += tm.Coefficient[ax] * math.Pow(u, float64(tm.PowerFront)) * math.Pow(w, float64(tm.PowerRear))
			}
			df *= q
			c := v.Corners[2*ax]
			kw, kt := c.WheelRateOf(), c.TyreRate
			k := 2 * kw * kt / (kw + kt)
			if relErr(op.Downforce[ax], df) > tol || relErr(k*(-op.RideHeightChange[ax]), df) > tol {
				t.Errorf("%g m/s %s: downforce %.12g, map at the point %.12g, axle rate × drop %.12g", speed, AxleNames[ax], op.Downforce[ax], df, -k*op.RideHeightChange[ax])
			}
			if relErr(op.Compression[2*ax], df/2/kw) > tol {
				t.Errorf("%g m/s %s: compression %.12g, statics %.12g", speed, AxleNames[ax], op.Compression[2*ax], df/2/kw)
			}
		}
		if op.Iterations < 3 {
			t.Errorf("%g m/s: %d Newton steps on a nonlinear map", speed, op.Iterations)
		}
		t.Logf("%g m/s: ride heights %.2f / %.2f mm, %d Newton steps, K_a %.4g N/m", speed, op.RideHeight[0]*1e3, op.RideHeight[1]*1e3, op.Iterations, op.AeroStiffness)
	}
}
