package model

import (
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// heaveCar is the demo car with a heave (third) spring and packer on each
// axle, softer corner springs and a heave damper set in heaveSetup.
func heaveCar() Vehicle {
	v := demoCar()
	for i := range v.Corners {
		v.Corners[i].SpringRate *= 0.6
	}
	v.Heave = [2]HeaveElement{
		{MotionRatio: 0.9, SpringRate: 250e3, PackerGap: 0.020, PackerRate: 2e6},
		{MotionRatio: 0.85, SpringRate: 300e3, PackerGap: 0.025, PackerRate: 2e6},
	}
	return v
}

// heaveSetup is the demo setup with a linear heave damper of ratio z on
// both axles (0: none).
func heaveSetup(s Setup, z float64) Setup {
	if z > 0 {
		s.Heave = [2]AxleDamping{{BumpRatio: z, ReboundRatio: z}, {BumpRatio: z, ReboundRatio: z}}
	}
	return s
}

// TestHeaveRideFrequencyGillespie checks the heave ride frequency with a
// third spring against Gillespie (1992, Fundamentals of Vehicle Dynamics,
// SAE, ch. 6, ride rate, springs in parallel):
//
//	f = (1/2π) sqrt((2 k_w + k3 MR3²) / m_axle)
//
// through the hand method (HandAxle, the formula itself: tolerance 1e-12
// relative, rounding) and through the modal analysis of a car whose
// tyres are stiff (1e10 N/m, beyond the plausible range, so the internal
// system is built directly) and whose axles have equal heave frequencies,
// so that heave and pitch decouple (k_f a = k_r b) and the heave mode's
// frequency is the per-axle one; the tyres in series shift it by about
// k/(2 k_t) ≈ 2e-5 relative, tolerance 1e-4. The roll frequency must not
// move when the heave springs are added (the third spring does not stroke
// in roll, the same source): tolerance 1e-9 relative, the eigensolver's
// rounding.
func TestHeaveRideFrequencyGillespie(t *testing.T) {
	t.Parallel()
	const tolHand, tolModal, tolRoll = 1e-12, 1e-4, 1e-9
	v := handCar()
	v.Heave = [2]HeaveElement{{MotionRatio: 0.8, SpringRate: 90e3}, {MotionRatio: 0.7, SpringRate: 60e3}}
	m := v.AxleSprungMass()
	// Rear corner rate for equal axle frequencies: (2 k_wr + k3r MR3r²)/m_r = (2 k_wf + k3f MR3f²)/m_f.
	kf := 2*v.Corners[FL].WheelRate + 90e3*0.8*0.8
	kwr := (kf*m[Rear]/m[Front] - 60e3*0.7*0.7) / 2
	v.Corners[RL].WheelRate, v.Corners[RR].WheelRate = kwr, kwr
	r, err := HandMethod(&v, DefaultHandTargets())
	if err != nil {
		t.Fatal(err)
	}
	gillespie := func(ax int) float64 {
		k3 := v.Heave[ax].SpringRate * v.Heave[ax].MotionRatio * v.Heave[ax].MotionRatio
		return math.Sqrt((2*v.Corners[2*ax].WheelRate+k3)/m[ax]) / (2 * math.Pi)
	}
	for ax := 0; ax < 2; ax++ {
		if got, want := r.Axles[ax].HeaveFrequencyHz, gillespie(ax); relErr(got, want) > tolHand {
			t.Errorf("%s: hand heave frequency %.12g Hz, Gillespie %.12g", AxleNames[ax], got, want)
		}
	}
	stiff := v
	for i := range stiff.Corners {
		stiff.Corners[i].TyreRate = 1e10
	}
	u, err := undampedModes(newSystem(&stiff, &[2][2]float64{}))
	if err != nil {
		t.Fatal(err)
	}
	if got, want := u.omega[ModeHeave]/(2*math.Pi), gillespie(Front); relErr(got, want) > tolModal {
		t.Errorf("modal heave frequency %.8g Hz, Gillespie %.8g", got, want)
	}
	bare := stiff
	bare.Heave = [2]HeaveElement{}
	u0, err := undampedModes(newSystem(&bare, &[2][2]float64{}))
	if err != nil {
		t.Fatal(err)
	}
	if relErr(u.omega[ModeRoll], u0.omega[ModeRoll]) > tolRoll {
		t.Errorf("roll frequency %.12g rad/s with heave springs, %.12g without", u.omega[ModeRoll], u0.omega[ModeRoll])
	}
	if relErr(u.omega[ModeHeave], u0.omega[ModeHeave]) < 0.1 {
		t.Errorf("heave frequency %.6g rad/s with heave springs, %.6g without: the third spring did nothing", u.omega[ModeHeave], u0.omega[ModeHeave])
	}
	plain := v
	plain.Heave = [2]HeaveElement{}
	bareHand, err := HandMethod(&plain, DefaultHandTargets())
	if err != nil {
		t.Fatal(err)
	}
	if got, want := r.Modes[ModeRoll].HandFrequencyHz, bareHand.Modes[ModeRoll].HandFrequencyHz; got != want {
		t.Errorf("hand roll frequency %.12g Hz with heave springs, %.12g without", got, want)
	}
}

// TestHeaveOperatingPointClosedForm checks the operating point of a
// symmetric car with heave springs against statics, as
// TestOperatingPointClosedForm does without them: each axle takes its own
// downforce (a rigid beam on two supports, the load at the supports), so
// the single-axle form x = F/(k - k_aero) holds with k the axle's support
// rate, K_s = 2 k_w + k3 MR3² (springs in parallel) in series with the two
// tyres 2 k_t. The axle's mean compression is then F_at_point/K_s and the
// heave element's travel MR3 times it; the packer gap left is the gap
// minus that travel. Tolerance relative 1e-12: one 7×7 solve.
func TestHeaveOperatingPointClosedForm(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	v := heaveCar()
	for _, speed := range []float64{30, 55} {
		op, err := v.OperatingPoint(speed)
		if err != nil {
			t.Fatal(err)
		}
		q := (speed / v.Aero.ReferenceSpeed) * (speed / v.Aero.ReferenceSpeed)
		for ax := 0; ax < 2; ax++ {
			h := v.Heave[ax]
			ks := 2*v.Corners[2*ax].WheelRateOf() + h.SpringRate*h.MotionRatio*h.MotionRatio
			kt := 2 * v.Corners[2*ax].TyreRate
			k := ks * kt / (ks + kt)
			f, ka := q*v.Aero.Downforce[ax], q*v.Aero.Stiffness[ax]
			x := f / (k - ka)
			df := f + ka*x
			check := func(what string, got, want float64) {
				t.Helper()
				if relErr(got, want) > tol {
					t.Errorf("%g m/s %s: %s %.12g, statics %.12g", speed, AxleNames[ax], what, got, want)
				}
			}
			check("ride-height drop", -op.RideHeightChange[ax], x)
			check("heave element travel", op.HeaveTravel[ax], h.MotionRatio*df/ks)
			check("packer gap left", op.PackerGap[ax], h.PackerGap-h.MotionRatio*df/ks)
			check("corner compression", op.Compression[2*ax], df/ks)
		}
	}
}

// TestHeaveFrequencyToZeroWithAero: as the front aero stiffness k_a
// approaches the front axle's support rate k (springs and heave spring
// in series with the tyres), the front of the body loses its support and
// the lowest body mode's ω² falls linearly in the margin k - k_a
// (Rayleigh's quotient: ω² = (k - k_a)/m_eff to first order as the
// stiffness matrix approaches singularity; any vibration text), while the
// operating point refuses the car once k_a reaches k (stiffness matrix
// not positive definite). Checked: ω²/(k - k_a) at margins 1e-2, 1e-3,
// 1e-4 of k agrees within 2 % (the next-order term is O(margin)), and at
// margins 0 and -1e-3 the car is refused with ErrNoEquilibrium.
func TestHeaveFrequencyToZeroWithAero(t *testing.T) {
	t.Parallel()
	v := heaveCar()
	h := v.Heave[Front]
	ks := 2*v.Corners[FL].WheelRateOf() + h.SpringRate*h.MotionRatio*h.MotionRatio
	kt := 2 * v.Corners[FL].TyreRate
	k := ks * kt / (ks + kt)
	var slopes []float64
	for _, margin := range []float64{1e-2, 1e-3, 1e-4, 0, -1e-3} {
		c := v
		c.Aero = Aero{ReferenceSpeed: 50, Stiffness: [2]float64{k * (1 - margin), 0}}
		modes, err := ModesAt(&c, 50, [4]float64{})
		if margin <= 0 {
			if !errors.Is(err, ErrNoEquilibrium) {
				t.Errorf("margin %g: got %v, want a refusal wrapping ErrNoEquilibrium", margin, err)
			}
			continue
		}
		if err != nil {
			t.Fatalf("margin %g: %v", margin, err)
		}
		low := math.Inf(1)
		for _, m := range modes {
			low = math.Min(low, m.UndampedFrequencyHz)
		}
		w2 := math.Pow(2*math.Pi*low, 2)
		slopes = append(slopes, w2/(margin*k))
		t.Logf("margin %g: lowest mode %.4g Hz", margin, low)
	}
	for i := 1; i < len(slopes); i++ {
		if relErr(slopes[i], slopes[0]) > 0.02 {
			t.Errorf("ω²/(k - k_a) = %.6g at the smaller margin, %.6g at 1e-2: not linear in the margin", slopes[i], slopes[0])
		}
	}
}

// TestHeaveTimeDomainAgreesWithFrequencyDomain: with linear corner and
// heave dampers and no stops the time domain and the frequency domain
// are the same linear system, and every standard deviation (heave
// element travel and velocity included) must agree within 3 statistical
// errors (Bendat & Piersol's 1/sqrt(B_e T), see Verify; the rule of
// TestTimeDomainAgreesWithFrequencyDomainForLinearDampers). The packers
// are moved out of reach so that the car stays linear.
func TestHeaveTimeDomainAgreesWithFrequencyDomain(t *testing.T) {
	t.Parallel()
	const sigmas = 3.0
	v := heaveCar()
	for ax := range v.Heave {
		v.Heave[ax].PackerGap, v.Heave[ax].PackerRate = 0.3, 0
	}
	for i := range v.Corners {
		v.Corners[i].BumpStopGap = 0
	}
	rep, err := Verify(v, demoCases()[1:], heaveSetup(tdLinearSetup(0.4), 0.3), VerifyOptions{Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	c := &rep.Cases[0]
	seen := 0
	for _, r := range c.Rows {
		if !strings.Contains(r.Metric, "_sd_") {
			continue
		}
		if strings.HasPrefix(r.Metric, "heave_") && !strings.HasPrefix(r.Metric, "heave_accel") {
			seen++
		}
		if math.Abs(r.Diff) > sigmas*r.StatError {
			t.Errorf("%s: frequency %g, time %g: differ by %.2f statistical errors (%g)", r.Metric, r.Frequency, r.Time, r.Diff/r.StatError, r.StatError)
		}
	}
	if seen != 4 {
		t.Errorf("%d heave element rows, want 4 (travel and velocity per axle)", seen)
	}
	if testing.Verbose() {
		verifyLog(t, c)
	}
}

// TestHeaveDamperLinearisation: a heave damper with a knee is linearised
// by the same closed forms as a corner damper (Caughey 1963; Roberts &
// Spanos 1990, see linearise.go) at its own velocity: at the fixed point
// the reported c_eq equals c_eq(σ) of the heave damper at the reported
// velocity sd (referred to the mean wheel travel, σ_u = σ_element/MR3),
// to the fixed point's tolerance (1e-8 relative, EvaluatorOptions).
// A bump-heavy heave damper jacks the car down: its mean force pushes the
// axle apart (Roberts & Spanos' E[f] > 0 for c_b > c_r), so with the
// corner dampers symmetric the axle's ride height rises (shift > 0).
func TestHeaveDamperLinearisation(t *testing.T) {
	t.Parallel()
	const tol = 1e-7
	v := heaveCar()
	ev, err := NewEvaluator(v, demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	s := tdLinearSetup(0.5)
	s.Heave[Front] = AxleDamping{BumpRatio: 0.9, ReboundRatio: 0.3, KneeBump: 0.03, KneeRebound: 0.03, HighSpeedBump: 0.4, HighSpeedRebound: 0.4}
	var r Result
	if err := ev.Evaluate(s, &r); err != nil {
		t.Fatal(err)
	}
	hd := v.heaveDampers(&s)
	for _, m := range r.Cases {
		sigma := m.HeaveVelocitySD[Front] / v.Heave[Front].MotionRatio
		want, mean := hd[Front].Equivalent(sigma)
		if relErr(m.HeaveEquivalentDamping[Front], want) > tol {
			t.Errorf("%s: heave c_eq %.10g, closed form at its sd %.10g", m.Case, m.HeaveEquivalentDamping[Front], want)
		}
		if mean <= 0 || m.RideHeightShift[Front] <= 0 {
			t.Errorf("%s: bump-heavy heave damper: mean force %g N, front shift %g m, want both > 0", m.Case, mean, m.RideHeightShift[Front])
		}
		if m.HeaveEquivalentDamping[Rear] != 0 || m.HeaveTravelSD[Rear] <= 0 || m.PackerProbability[Front] <= 0 {
			t.Errorf("%s: rear heave c_eq %g (want 0, no damper), rear travel sd %g, front packer %g", m.Case, m.HeaveEquivalentDamping[Rear], m.HeaveTravelSD[Rear], m.PackerProbability[Front])
		}
	}
}

// TestHeavePackerProbability: the packer contact probability is the
// Gaussian tail P = Q((gap left - mean shift)/σ) of the element travel
// (any probability text), from the packer gap left at speed; linear
// dampers with bump = rebound, so no mean shift. Tolerance 1e-12
// relative: the same erfc.
func TestHeavePackerProbability(t *testing.T) {
	t.Parallel()
	v := heaveCar()
	ev, err := NewEvaluator(v, []RoadCase{{Name: "rough", Speed: 55, Gd0: 42e-6}}, EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var r Result
	if err := ev.Evaluate(heaveSetup(tdLinearSetup(0.5), 0.4), &r); err != nil {
		t.Fatal(err)
	}
	m := r.Cases[0]
	for ax := 0; ax < 2; ax++ {
		gap := m.AtSpeed.PackerGap[ax]
		want := 0.5 * math.Erfc(gap/(m.HeaveTravelSD[ax]*math.Sqrt2))
		if relErr(m.PackerProbability[ax], want) > 1e-12 {
			t.Errorf("%s packer: %.12g, Gaussian tail %.12g", AxleNames[ax], m.PackerProbability[ax], want)
		}
		t.Logf("%s: packer gap left %.2f mm, element travel sd %.2f mm, contact %.3g", AxleNames[ax], gap*1e3, m.HeaveTravelSD[ax]*1e3, m.PackerProbability[ax])
	}
}

// TestNoHeaveIsUnchanged: a heave element with zero values is no heave
// element: the metrics of the demo car are identical (==) with and without
// the zero-valued fields, and carry zero heave metrics. (The stored
// digests of api/testdata hold the same against earlier versions.)
func TestNoHeaveIsUnchanged(t *testing.T) {
	t.Parallel()
	v := demoCar()
	ev, err := NewEvaluator(v, demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var r Result
	if err := ev.Evaluate(demoSetup(), &r); err != nil {
		t.Fatal(err)
	}
	for _, m := range r.Cases {
		if m.HeaveTravelSD != [2]float64{} || m.HeaveVelocitySD != [2]float64{} || m.PackerProbability != [2]float64{} || m.AtSpeed.HeaveTravel != [2]float64{} {
			t.Errorf("%s: heave metrics %v %v %v without a heave element", m.Case, m.HeaveTravelSD, m.HeaveVelocitySD, m.PackerProbability)
		}
	}
	// A heave element without spring or damper adds nothing but outputs.
	w := v
	w.Heave[Front] = HeaveElement{MotionRatio: 1}
	ew, err := NewEvaluator(w, demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var rw Result
	if err := ew.Evaluate(demoSetup(), &rw); err != nil {
		t.Fatal(err)
	}
	for i := range rw.Cases {
		a, b := r.Cases[i], rw.Cases[i]
		b.HeaveTravelSD, b.HeaveVelocitySD, b.AtSpeed.HeaveTravel = [2]float64{}, [2]float64{}, [2]float64{}
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%s: a heave element of zero rate changed the metrics:\n%+v\n%+v", a.Case, a, b)
		}
	}
}

// TestHeaveValidationNamesFields: every bad heave field is named.
func TestHeaveValidationNamesFields(t *testing.T) {
	t.Parallel()
	v := heaveCar()
	v.Heave[Front] = HeaveElement{MotionRatio: 3, SpringRate: -1, PackerGap: -0.01}
	v.Heave[Rear] = HeaveElement{SpringRate: 100e3}
	got := fieldsOf(t, v.Validate())
	want := []string{"heave[0].motion_ratio", "heave[0].packer_gap_m", "heave[0].spring_rate_n_per_m", "heave[1].motion_ratio"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("fields %v, want %v", got, want)
	}
	bare := demoCar()
	ev, err := NewEvaluator(bare, demoCases(), EvaluatorOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var r Result
	s := heaveSetup(demoSetup(), 0.4)
	if got := fieldsOf(t, ev.Evaluate(s, &r)); !reflect.DeepEqual(got, []string{"heave[0]", "heave[1]"}) {
		t.Errorf("heave damper without heave element: fields %v", got)
	}
	s.Heave[Rear] = AxleDamping{BumpRatio: 9, ReboundRatio: 0.4}
	if got := fieldsOf(t, s.Validate()); !reflect.DeepEqual(got, []string{"heave[1].bump_ratio"}) {
		t.Errorf("bad heave ratio: fields %v", got)
	}
}

// TestHeavePackerInTheTimeDomain: with the packer's rate 0 (contact
// counted only) the car is linear, and the fraction of the time the
// element spends beyond the packer gap must match the frequency domain's
// Gaussian tail within 3 statistical errors (the binomial error over the
// record's effective number of independent samples, Bendat & Piersol, as
// Verify gives it for the bump-stop fraction). With a packer rate the
// packer is a stop on the same road (same seed): the element's time beyond
// the gap falls (a stop only pushes back beyond the gap) and stays above 0.
func TestHeavePackerInTheTimeDomain(t *testing.T) {
	t.Parallel()
	v := heaveCar()
	for i := range v.Corners {
		v.Corners[i].BumpStopGap = 0
	}
	// Front packer gap 8.8 mm at rest: about 2.5 mm left at 55 m/s on the
	// rough road, where the element's travel sd is 2.2 mm.
	v.Heave[Front].PackerGap, v.Heave[Front].PackerRate = 0.0138, 0
	v.Heave[Rear].PackerGap, v.Heave[Rear].PackerRate = 0, 0
	rc := []RoadCase{{Name: "rough", Speed: 55, Gd0: 42e-6}}
	s := heaveSetup(tdLinearSetup(0.5), 0.4)
	rep, err := Verify(v, rc, s, VerifyOptions{Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	row, ok := rep.Cases[0].Row("packer_fraction[front]")
	if !ok {
		t.Fatal("no packer_fraction[front] row")
	}
	t.Logf("packer: frequency %.4g, time %.4g, stat. error %.2g", row.Frequency, row.Time, row.StatError)
	if row.Frequency < 0.01 || math.Abs(row.Diff) > 3*row.StatError {
		t.Errorf("packer fraction: frequency %g, time %g, want within 3 × %g (and the case in contact for > 1 %%)", row.Frequency, row.Time, row.StatError)
	}
	free := rep.Cases[0].Time
	v.Heave[Front].PackerRate = 1.5e6
	stopped, err := SimulateCase(&v, &rc[0], &s, TimeOptions{}, rand.New(rand.NewPCG(3, 0)))
	if err != nil {
		t.Fatal(err)
	}
	if !(stopped.PackerProbability[Front] > 0 && stopped.PackerProbability[Front] < free.PackerProbability[Front]) {
		t.Errorf("with the packer: travel sd %g m, fraction %g; without %g m, %g: the stop did not limit the travel",
			stopped.HeaveTravelSD[Front], stopped.PackerProbability[Front], free.HeaveTravelSD[Front], free.PackerProbability[Front])
	}
}
