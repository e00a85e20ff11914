package model

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// platformPoints are an invented splitter ahead of the front axle on the
// centre line and a plank point mid-wheelbase off the centre line.
func platformPoints() []ReferencePoint {
	return []ReferencePoint{
		{Name: "splitter", X: -0.65, RestHeight: 0.045},
		{Name: "plank left", WheelbaseFraction: 0.5, Y: 0.25, RestHeight: 0.060},
	}
}

// refRideRow is the reference's ride height of a body point at fraction s
// of the wheelbase behind the front axle and y left of the centre line,
// built from the geometry alone: the body point's rise z + x θ + y φ (x,
// y from the sprung CG) minus the ground under it, interpolated linearly
// along the car between the axles and across each axle between its tyres
// (see ReferencePoint).
func refRideRow(v *Vehicle, s, y float64) func(*refModel) outputRow {
	return func(rm *refModel) outputRow {
		l := rm.a + rm.b
		o := outputRow{cx: [7]float64{1, rm.a - s*l, y - v.CGLateral}}
		tracks := [2]float64{rm.tf, rm.tr}
		for ax, w := range [2]float64{1 - s, s} {
			o.cw[2*ax] = -w * (0.5 + y/tracks[ax])
			o.cw[2*ax+1] = -w * (0.5 - y/tracks[ax])
		}
		return o
	}
}

// refRideSum is c_f h_f + c_r h_r from the reference's own ride rows.
func refRideSum(cf, cr float64) func(*refModel) outputRow {
	return func(rm *refModel) outputRow {
		var o outputRow
		for i := range o.cx {
			o.cx[i] = cf*rm.ride[0][i] + cr*rm.ride[1][i]
		}
		for j := range o.cw {
			o.cw[j] = -(cf*rm.rideW[0][j] + cr*rm.rideW[1][j])
		}
		return o
	}
}

// checkPlatformLyapunov compares the platform figures of m (the vehicle's
// reference points, the front/rear ride-height covariance and the
// downforce sd) with the Lyapunov covariance of the reference's own rows
// (see TestLyapunovCovariance for the reference and the tolerance: 1e-6
// relative, the figure; the covariance relative to σ_f σ_r).
func checkPlatformLyapunov(t *testing.T, v *Vehicle, m *CaseMetrics, cw [4]float64, lc lyapunovCase) {
	t.Helper()
	const tol = 1e-6
	ka := refAeroStiffness(v, lc.speed)
	kd := [2]float64{-(ka[0][0] + ka[1][0]), -(ka[0][1] + ka[1][1])}
	l := v.Wheelbase()
	extra := []func(*refModel) outputRow{refRideSum(1, 1), refRideSum(kd[0], kd[1])}
	for _, p := range v.ReferencePoints {
		s := p.WheelbaseFraction
		if s == 0 {
			s = p.X / l
		}
		extra = append(extra, refRideRow(v, s, p.Y))
	}
	all := lyapunovVariances(t, v, cw, lc, -v.CGLateral, extra...)
	base := len(refOutputs)
	vf, vr := all[12], all[13]
	cov := (all[base] - vf - vr) / 2
	if e := math.Abs(m.RideHeightCovariance-cov) / math.Sqrt(vf*vr); e > tol {
		t.Errorf("ride-height covariance: model %.10g, Lyapunov %.10g m², error %.2g of σ_f σ_r", m.RideHeightCovariance, cov, e)
	}
	if vd := all[base+1]; vd > 0 || m.DownforceSD > 0 {
		if e := relErr(m.DownforceSD*m.DownforceSD, vd); e > tol {
			t.Errorf("downforce variance: model %.10g, Lyapunov %.10g N², rel. error %.2g", m.DownforceSD*m.DownforceSD, vd, e)
		}
	}
	worst := math.Abs(m.RideHeightCovariance-cov) / math.Sqrt(vf*vr)
	for i, p := range m.ReferencePoints() {
		want := all[base+2+i]
		e := relErr(p.SD*p.SD, want)
		if e > tol {
			t.Errorf("%s variance: model %.10g, Lyapunov %.10g m², rel. error %.2g", p.Name, p.SD*p.SD, want, e)
		}
		worst = math.Max(worst, e)
	}
	if vd := all[base+1]; vd > 0 {
		worst = math.Max(worst, relErr(m.DownforceSD*m.DownforceSD, vd))
	}
	t.Logf("platform: worst relative error %.2g (covariance, downforce, %d points)", worst, m.NumPoints)
}

// TestGaussianTail checks the tail P(X > h) = Φ(-h/σ) of the contact
// probabilities against the standard normal table (Abramowitz & Stegun
// 1964, Table 26.1: 1 - Φ(1) = 0.158655253931457, 1 - Φ(2) =
// 0.0227501319481792, 1 - Φ(3) = 0.00134989803163009; the 15 digits from
// memory of the table, confirmed against gonum's distuv.UnitNormal).
// Tolerance 1e-13 relative: erfc is accurate to a few ulp.
func TestGaussianTail(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct{ h, sd, want float64 }{
		{0.010, 0.010, 0.158655253931457},
		{0.020, 0.010, 0.0227501319481792},
		{0.003, 0.001, 0.00134989803163009},
		{-0.020, 0.010, 1 - 0.0227501319481792},
	} {
		if got := tailProb(tc.h, tc.sd); relErr(got, tc.want) > 1e-13 {
			t.Errorf("P(X > %g), σ = %g: got %.17g, want %.17g", tc.h, tc.sd, got, tc.want)
		}
		if ref := distuv.UnitNormal.CDF(-tc.h / tc.sd); relErr(ref, tc.want) > 1e-13 {
			t.Errorf("gonum Φ(%g) = %.17g, table %.17g", -tc.h/tc.sd, ref, tc.want)
		}
	}
}

// aeroCase evaluates the demo car with the platform points on a rough
// road at 55 m/s (partly coherent tracks) with the demo setup.
func aeroCase(t *testing.T, v Vehicle) (*Evaluator, CaseMetrics) {
	t.Helper()
	rc := RoadCase{Name: "rough", Speed: 55, Gd0: 8e-6, Waviness: 2,
		Coherence: Coherence{Kind: CoherenceTable, N: []float64{1e-12}, Gamma: []float64{0.7}}}
	e, err := NewEvaluator(v, []RoadCase{rc}, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var r Result
	if err := e.Evaluate(demoSetup(), &r); err != nil {
		t.Fatal(err)
	}
	return e, r.Cases[0]
}

// closedFormCovariance is the front/rear ride-height covariance from the
// heave/pitch kinematics: h_f - h_r = L θ_rel for a rigid body over the
// interpolated ground, so var(h_f - h_r) = L² var θ_rel and
// cov(h_f, h_r) = (σ_f² + σ_r² - L² σ_θ²)/2 (the variance of a
// difference, any probability text).
func closedFormCovariance(v *Vehicle, m *CaseMetrics) *mat.SymDense {
	l := v.Wheelbase()
	sf, sr := m.RideHeightSD[0], m.RideHeightSD[1]
	c := (sf*sf + sr*sr - l*l*m.PitchSD*m.PitchSD) / 2
	return mat.NewSymDense(2, []float64{sf * sf, c, c, sr * sr})
}

// TestReferencePointClosedForm checks the sd of a centre-line point and
// the contact probabilities:
//
//   - var h(s) = (1-s)² σ_f² + s² σ_r² + 2 s(1-s) cov(h_f, h_r) with the
//     covariance from pitch (closedFormCovariance): a point on the centre
//     line rises z + x θ over the interpolated ground. Tolerance 1e-9
//     relative: the two sides integrate the same spectra on one grid,
//     and differ only by rounding and by the tails' nonlinear fit
//     (octave bands near 1e-3 of the variance).
//   - P(contact) = Φ(-(h + shift)/σ) with gonum's distuv.UnitNormal as
//     the reference library; tolerance 1e-12 relative.
func TestReferencePointClosedForm(t *testing.T) {
	t.Parallel()
	v := demoCar()
	v.RestRideHeight = [2]float64{0.055, 0.075}
	v.ReferencePoints = platformPoints()
	e, m := aeroCase(t, v)
	sig := closedFormCovariance(&v, &m)
	l := v.Wheelbase()
	op := e.OperatingPoint(0)
	for i, p := range m.ReferencePoints() {
		rp := v.ReferencePoints[i]
		s := rp.WheelbaseFraction
		if s == 0 {
			s = rp.X / l
		}
		if rp.Y == 0 {
			u := mat.NewVecDense(2, []float64{1 - s, s})
			want := math.Sqrt(mat.Inner(u, sig, u))
			if relErr(p.SD, want) > 1e-7 {
				t.Errorf("%s sd: got %.12g, closed form %.12g m", p.Name, p.SD, want)
			}
			// At the operating point: rest height plus the interpolated
			// axle ride-height changes (rigid body, no roll at speed).
			h := rp.RestHeight + (1-s)*op.RideHeightChange[0] + s*op.RideHeightChange[1]
			if math.Abs(p.HeightAtSpeed-h) > 1e-12 {
				t.Errorf("%s height at speed: got %.12g, want %.12g m", p.Name, p.HeightAtSpeed, h)
			}
			sh := (1-s)*m.RideHeightShift[0] + s*m.RideHeightShift[1]
			if math.Abs(p.Shift-sh) > 1e-12 {
				t.Errorf("%s jacking shift: got %.12g, want %.12g m", p.Name, p.Shift, sh)
			}
		}
		want := distuv.UnitNormal.CDF(-(p.HeightAtSpeed + p.Shift) / p.SD)
		if relErr(p.ContactProbability, want) > 1e-12 {
			t.Errorf("%s contact probability: got %.17g, Φ(-h/σ) %.17g", p.Name, p.ContactProbability, want)
		}
		t.Logf("%s: height at speed %.2f mm, shift %.3f mm, sd %.3f mm, contact %.3g", p.Name, 1e3*p.HeightAtSpeed, 1e3*p.Shift, 1e3*p.SD, p.ContactProbability)
	}
	if p := m.MaxFloorContact(); p <= 0 || p >= 1 {
		t.Errorf("max floor contact %g: want a probability strictly between 0 and 1 on this road", p)
	}
}

// TestDownforceAndBalanceLinearMap checks, for the per-axle linear map,
// the downforce sd against sqrt(kᵀ Σ_h k) with k = (V/V_ref)² (k_f, k_r)
// and Σ_h from the heave/pitch closed form (gonum's mat.Inner), and the
// balance's sd and jacking shift against the gradient of β = F_f/(F_f +
// F_r) taken by central differences of the map's own definition (step
// 1e-5 m). Tolerances: 1e-7 relative for the downforce (as
// TestReferencePointClosedForm); 1e-7 for the balance, the central
// difference's truncation (step/scale)² with a scale of metres, and its
// rounding eps/step.
func TestDownforceAndBalanceLinearMap(t *testing.T) {
	t.Parallel()
	v := demoCar()
	_, m := aeroCase(t, v)
	sig := closedFormCovariance(&v, &m)
	q := (55.0 / v.Aero.ReferenceSpeed) * (55.0 / v.Aero.ReferenceSpeed)
	k := mat.NewVecDense(2, []float64{q * v.Aero.Stiffness[0], q * v.Aero.Stiffness[1]})
	if want := math.Sqrt(mat.Inner(k, sig, k)); relErr(m.DownforceSD, want) > 1e-7 {
		t.Errorf("downforce sd: got %.12g, sqrt(kᵀΣk) %.12g N", m.DownforceSD, want)
	}
	// β at ride-height changes dh from the operating point.
	op := m.AtSpeed
	beta := func(dh0, dh1 float64) float64 {
		ff := q * (v.Aero.Downforce[0] - v.Aero.Stiffness[0]*(op.RideHeightChange[0]+dh0))
		fr := q * (v.Aero.Downforce[1] - v.Aero.Stiffness[1]*(op.RideHeightChange[1]+dh1))
		return ff / (ff + fr)
	}
	const step = 1e-5
	g := mat.NewVecDense(2, []float64{
		(beta(step, 0) - beta(-step, 0)) / (2 * step),
		(beta(0, step) - beta(0, -step)) / (2 * step),
	})
	if want := math.Sqrt(mat.Inner(g, sig, g)); relErr(m.BalanceSD, want) > 1e-7 {
		t.Errorf("balance sd: got %.12g, from the map's gradient %.12g", m.BalanceSD, want)
	}
	wantShift := g.AtVec(0)*m.RideHeightShift[0] + g.AtVec(1)*m.RideHeightShift[1]
	if relErr(m.BalanceShift, wantShift) > 1e-7 {
		t.Errorf("balance shift: got %.12g, want %.12g", m.BalanceShift, wantShift)
	}
	if want := beta(0, 0); relErr(op.Balance(), want) > 1e-14 {
		t.Errorf("balance at speed: got %.15g, want %.15g", op.Balance(), want)
	}
	t.Logf("downforce sd %.1f N, shift %.2f N; balance %.3f %%, sd %.4f %%, shift %.4f %%", m.DownforceSD, m.DownforceShift, 100*op.Balance(), 100*m.BalanceSD, 100*m.BalanceShift)
}

// TestReferencePointValidation: every bad field of the points is named.
func TestReferencePointValidation(t *testing.T) {
	t.Parallel()
	v := demoCar()
	v.ReferencePoints = []ReferencePoint{
		{Name: "", X: 0.1, RestHeight: 0.05},
		{Name: "a", X: 0.2, WheelbaseFraction: 0.3, RestHeight: 0.05},
		{Name: "a", X: 20, Y: 1.2, RestHeight: 0},
	}
	err := v.Validate()
	var ve *ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("got %v, want a ValidationError", err)
	}
	msg := err.Error()
	for _, f := range []string{
		"reference_points[0].name", "reference_points[1].wheelbase_fraction", "reference_points[2].name",
		"reference_points[2].x_from_front_axle_m", "reference_points[2].y_m", "reference_points[2].rest_height_m",
	} {
		if !strings.Contains(msg, f) {
			t.Errorf("error does not name %s: %v", f, msg)
		}
	}
	v.ReferencePoints = make([]ReferencePoint, MaxReferencePoints+1)
	for i := range v.ReferencePoints {
		v.ReferencePoints[i] = ReferencePoint{Name: string(rune('a' + i)), RestHeight: 0.05}
	}
	if err := v.Validate(); err == nil || !strings.Contains(err.Error(), "reference_points:") {
		t.Errorf("too many points: got %v", err)
	}
}

// TestAeroObjectives: the new objectives and the constraint read the
// figures they name, and need aero or points on the vehicle.
func TestAeroObjectives(t *testing.T) {
	t.Parallel()
	m := CaseMetrics{DownforceSD: 30, DownforceShift: 40, BalanceSD: 0.003, BalanceShift: -0.004, NumPoints: 2}
	m.Points[0].ContactProbability, m.Points[1].ContactProbability = 0.02, 0.05
	// 3-4-5 right triangles (Pythagoras).
	if got := caseObjective(&Objective{Kind: ObjectiveDownforce}, &m); math.Abs(got-50) > 1e-12 {
		t.Errorf("downforce objective %g, want 50", got)
	}
	if got := caseObjective(&Objective{Kind: ObjectiveBalance}, &m); math.Abs(got-0.005) > 1e-15 {
		t.Errorf("balance objective %g, want 0.005", got)
	}
	if got := caseConstraint(&Constraint{Kind: ConstraintFloorContact, Limit: 0.01}, &m); got != 0.05 {
		t.Errorf("floor contact %g, want the worst point's 0.05", got)
	}
	v := demoCar()
	v.Aero = Aero{}
	err := ValidateAeroOutputs(&v, []Objective{{Kind: ObjectiveGrip}, {Kind: ObjectiveBalance}},
		[]Constraint{{Kind: ConstraintFloorContact, Limit: 0.01}})
	if err == nil || !strings.Contains(err.Error(), "objectives[1].kind") || !strings.Contains(err.Error(), "constraints[0].kind") {
		t.Errorf("got %v, want objectives[1].kind and constraints[0].kind named", err)
	}
}
