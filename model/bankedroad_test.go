package model

import (
	"fmt"
	"math"
	"testing"
)

// A car resting rigidly on a road that is a plane (raised, pitched or
// banked) has no suspension travel, no tyre deflection and no change of
// ride height, pitch or roll relative to the road, so no spring, tyre or
// aero force changes: K x_rigid = Bk w and every displacement output is 0.
// This is statics (no source needed beyond the definitions in doc.go:
// ride height is the body's height above the road under the axle).
//
// The rigid motion on the plane w(x, y) = h + p x + r y (x, y from the
// sprung CG) is z = h, θ = p, φ = r and zu_i = w(x_i, y_i).
func TestRigidPlaneRoad(t *testing.T) {
	t.Parallel()
	// Relative to the largest term of K x and Bk w; the terms are sums of
	// a few products, so rounding leaves about 1e-15 of them.
	const tol = 1e-12
	cars := map[string]Vehicle{"demo car": demoCar(), "asymmetric car": asymmetricCar()}
	for name, v := range cars {
		for _, pl := range []struct {
			name    string
			h, p, r float64
		}{{"raised", 0.01, 0, 0}, {"pitched", 0, 0.004, 0}, {"banked", 0, 0, 0.03}} {
			t.Run(fmt.Sprintf("%s, %s", name, pl.name), func(t *testing.T) {
				t.Parallel()
				sys := systemAt(t, &v, 60)
				var x [nDOF]float64
				var w [nIn]float64
				x[dofHeave], x[dofPitch], x[dofRoll] = pl.h, pl.p, pl.r
				for i := 0; i < 4; i++ {
					xi, yi := cornerXY(&v, i)
					w[i] = pl.h + pl.p*xi + pl.r*yi
					x[dofWheel+i] = w[i]
				}
				for a := 0; a < nDOF; a++ {
					kx, bw, scale := 0.0, 0.0, 0.0
					for b := 0; b < nDOF; b++ {
						kx += sys.k[a][b] * x[b]
						scale = math.Max(scale, math.Abs(sys.k[a][b]*x[b]))
					}
					for q := 0; q < nIn; q++ {
						bw += sys.bk[a][q] * w[q]
						scale = math.Max(scale, math.Abs(sys.bk[a][q]*w[q]))
					}
					if math.Abs(kx-bw) > tol*scale {
						t.Errorf("generalised force %d: K x_rigid = %.6g, Bk w = %.6g: the car feels a force on a %s plane road", a, kx, bw, pl.name)
					}
				}
				// Outputs: evaluate the output geometry at ω = 0 on the
				// rigid motion.
				ev, err := NewEvaluator(v, []RoadCase{{Name: "x", Speed: 60, Gd0: 1e-6}}, EvaluatorOptions{})
				if err != nil {
					t.Fatal(err)
				}
				var out [nOut]float64
				var xc [nDOF]complex128
				var wc [nIn]complex128
				for a := range x {
					xc[a] = complex(x[a], 0)
				}
				for q := range w {
					wc[q] = complex(w[q], 0)
				}
				ev.cases[0].geo.accumulate(&out, &xc, &wc, 0, 0, false)
				// Absolute 1e-12 (m, rad, N): rounding of road displacements of
				// 1e-2 m leaves 1e-18 m, times a tyre rate of 3e5 N/m.
				for o := 0; o < nOut; o++ {
					if math.Sqrt(out[o]) > 1e-12 {
						t.Errorf("%s = %.6g on a rigid %s plane road, want 0", outputNames[o], math.Sqrt(out[o]), pl.name)
					}
				}
			})
		}
	}
}

// cornerXY is the corner's position from the sprung CG (x forward, y
// left), from the vehicle's dimensions (doc.go sign conventions).
func cornerXY(v *Vehicle, i int) (x, y float64) {
	x = v.CGToFrontAxle
	t := v.TrackFront
	if i >= RL {
		x, t = -v.CGToRearAxle, v.TrackRear
	}
	y = t/2 - v.CGLateral
	if i%2 == 1 {
		y = -t/2 - v.CGLateral
	}
	return x, y
}

// TestIndependentTracksOffsetCG is the end-to-end symptom of a force on a
// banked road: with equal front and rear tracks, a road whose left and
// right tracks are independent (coherence 0) has a stationary warp, so
// every output has a finite variance (see lyapunov_test.go); a car that
// feels a force or reports a ride-height change on a banked road instead
// responds to the left-right difference of two random walks and has an
// infinite variance.
func TestIndependentTracksOffsetCG(t *testing.T) {
	t.Parallel()
	v := asymmetricCar()
	v.TrackRear = v.TrackFront
	rc := RoadCase{Name: "independent tracks", Speed: 50, Gd0: 3e-6,
		Coherence: Coherence{Kind: CoherenceTable, N: []float64{1}, Gamma: []float64{0}}}
	ev, err := NewEvaluator(v, []RoadCase{rc}, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var res Result
	if err := ev.Evaluate(demoSetup(), &res); err != nil {
		t.Errorf("CG offset %g m, independent tracks: %v", v.CGLateral, err)
	}
}
