package model

import (
	"math"
	"math/cmplx"
	"testing"
)

// The IRI reference quarter car ("Golden Car") of Sayers, Gillespie &
// Queiroz, "The International Road Roughness Experiment: Establishing
// Correlation and a Calibration Standard for Measurements", World Bank
// Technical Paper 45, 1986. Parameters per unit sprung mass, from memory of
// the paper (they are also the ones quoted in ASTM E1926):
const (
	iriC  = 6.0   // suspension damping c/m_s (1/s)
	iriK1 = 653.0 // tyre stiffness k_t/m_s (1/s²)
	iriK2 = 63.3  // suspension stiffness k/m_s (1/s²)
	iriMu = 0.15  // unsprung over sprung mass (-)
)

// quarticRoots returns the four roots of a[4] s⁴ + … + a[0] by the
// Durand-Kerner (Weierstrass) iteration, independent of any linear
// algebra library.
func quarticRoots(a [5]float64) [4]complex128 {
	var c [5]complex128
	for i := range a {
		c[i] = complex(a[i]/a[4], 0)
	}
	p := func(s complex128) complex128 {
		return (((s+c[3])*s+c[2])*s+c[1])*s + c[0]
	}
	var z [4]complex128
	seed := complex(0.4, 0.9)
	scale := math.Pow(cmplx.Abs(c[0]), 0.25)
	for i := range z {
		z[i] = complex(scale, 0) * cmplx.Pow(seed, complex(float64(i), 0))
	}
	for it := 0; it < 500; it++ {
		moved := 0.0
		for i := range z {
			den := complex(1, 0)
			for j := range z {
				if j != i {
					den *= z[i] - z[j]
				}
			}
			step := p(z[i]) / den
			z[i] -= step
			moved = math.Max(moved, cmplx.Abs(step)/cmplx.Abs(z[i]))
		}
		if moved < 1e-15 {
			break
		}
	}
	return z
}

// goldenCarModes builds the quarter-car limit with the Golden Car on the
// front axle and a stiffer, more damped one on the rear (see
// TestIRIQuarterCarModes) and returns the two and the modes at 30 m/s.
func goldenCarModes() (golden, rear quarterCar, modes []Mode, err error) {
	const m = 250.0 // sprung corner mass (kg); the Golden Car is per unit mass
	golden = quarterCar{m: m, mu: iriMu * m, k: iriK2 * m, kt: iriK1 * m}
	rear = quarterCar{m: m, mu: iriMu * m, k: 1.6 * iriK2 * m, kt: iriK1 * m}
	v := quarterCarVehicle(golden, rear, 0.85)
	zf := iriC * m / golden.criticalWheelDamping()
	zr := 1.3 * iriC * m / rear.criticalWheelDamping()
	s := Setup{Axles: [2]AxleDamping{{BumpRatio: zf, ReboundRatio: zf}, {BumpRatio: zr, ReboundRatio: zr}}}
	modes, err = ModalAnalysis(&v, &s, 30)
	return golden, rear, modes, err
}

// TestIRIQuarterCarModes builds the quarter-car limit of the four-post
// model (see quartercar_test.go) with the Golden Car on the front axle and
// compares the model's modal frequencies and damping ratios with the roots
// of the Golden Car's characteristic polynomial (per unit sprung mass)
//
//	μ s⁴ + c(1+μ) s³ + (k2(1+μ) + k1) s² + c k1 s + k1 k2 = 0,
//
// solved here by Durand-Kerner. The rear axle is another quarter car (the
// Golden Car with a 1.6x stiffer suspension and 1.3x the damping), so that
// the front and rear body modes do not coincide. Tolerance relative 1e-9:
// both sides solve well-conditioned eigenproblems whose eigenvalues are
// accurate to about 1e-13 relative.
func TestIRIQuarterCarModes(t *testing.T) {
	t.Parallel()
	const tol = 1e-9
	golden, rear, modes, err := goldenCarModes()
	if err != nil {
		t.Fatal(err)
	}
	byName := map[string]Mode{}
	for _, md := range modes {
		byName[md.Name] = md
	}
	type ref struct{ fn, fd, zeta float64 }
	refs := func(q quarterCar, c float64) (body, hop ref) {
		roots := quarticRoots(q.poly(c))
		var rs []ref
		for _, r := range roots {
			if imag(r) <= 0 {
				continue
			}
			wn := cmplx.Abs(r)
			rs = append(rs, ref{wn / (2 * math.Pi), imag(r) / (2 * math.Pi), -real(r) / wn})
		}
		if len(rs) != 2 {
			t.Fatalf("expected two complex pairs, got roots %v", roots)
		}
		if rs[0].fn > rs[1].fn {
			rs[0], rs[1] = rs[1], rs[0]
		}
		return rs[0], rs[1]
	}
	gBody, gHop := refs(golden, iriC*golden.m)
	rBody, rHop := refs(rear, 1.3*iriC*rear.m)
	t.Logf("Golden Car: body %.4f Hz (ζ %.4f), wheel hop %.4f Hz (ζ %.4f)", gBody.fn, gBody.zeta, gHop.fn, gHop.zeta)

	check := func(what string, md Mode, r ref) {
		t.Helper()
		if md.Overdamped {
			t.Errorf("%s: mode %q overdamped, want a complex pair", what, md.Name)
			return
		}
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"damped frequency (Hz)", md.DampedFrequencyHz, r.fd},
			{"pair damping ratio", md.PairDampingRatio, r.zeta},
		} {
			if e := relErr(c.got, c.want); e > tol {
				t.Errorf("%s (%q) %s: model %.12g, characteristic polynomial %.12g, rel. error %.2g", what, md.Name, c.name, c.got, c.want, e)
			}
		}
	}
	check("Golden Car wheel hop", byName["front hop"], gHop)
	check("rear quarter car wheel hop", byName["rear hop"], rHop)
	// With a = b and I = m a b the body modes are the front and rear
	// quarter cars' sprung-mass modes; their kinetic energy is split evenly
	// between heave and pitch, so which carries which name is arbitrary.
	h, p := byName["heave"], byName["pitch"]
	if relErr(h.DampedFrequencyHz, gBody.fd) > relErr(p.DampedFrequencyHz, gBody.fd) {
		h, p = p, h
	}
	check("Golden Car body", h, gBody)
	check("rear quarter car body", p, rBody)
}
