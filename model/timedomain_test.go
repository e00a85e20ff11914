package model

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// tdLinearSetup is a linear, symmetric damper of ratio z on both axles.
func tdLinearSetup(z float64) Setup {
	a := AxleDamping{BumpRatio: z, ReboundRatio: z}
	return Setup{Axles: [2]AxleDamping{a, a}}
}

func TestBumpStopForceCurve(t *testing.T) {
	t.Parallel()
	// Piecewise linear through (0,0), (5 mm, 500 N), (10 mm, 2500 N),
	// extended with the last slope 2000 N / 5 mm = 4e5 N/m: values by hand.
	b := BumpStop{Deflection: []float64{0.005, 0.010}, Force: []float64{500, 2500}}
	for _, c := range []struct{ d, f float64 }{
		{-0.01, 0}, {0, 0}, {0.0025, 250}, {0.005, 500}, {0.0075, 1500}, {0.010, 2500}, {0.020, 6500},
	} {
		if got := b.force(c.d); !scalar.EqualWithinAbsOrRel(got, c.f, 1e-9, 1e-12) {
			t.Errorf("force(%g) = %g, want %g", c.d, got, c.f)
		}
	}
	if got := b.maxSlope(); !scalar.EqualWithinRel(got, 4e5, 1e-12) {
		t.Errorf("max slope %g, want 4e5", got)
	}
}

// tdLinearForce is -K x - C ẋ + Bk w + Bc ẇ of the system, by gonum.
func tdLinearForce(s *system, x, xd [nDOF]float64, in []float64) [nDOF]float64 {
	k := mat.NewDense(nDOF, nDOF, nil)
	c := mat.NewDense(nDOF, nDOF, nil)
	bk := mat.NewDense(nDOF, nIn, nil)
	bc := mat.NewDense(nDOF, nIn, nil)
	for a := 0; a < nDOF; a++ {
		for b := 0; b < nDOF; b++ {
			k.Set(a, b, s.k[a][b])
			c.Set(a, b, s.c[a][b])
		}
		for q := 0; q < nIn; q++ {
			bk.Set(a, q, s.bk[a][q])
			bc.Set(a, q, s.bc[a][q])
		}
	}
	var f, tmp mat.VecDense
	f.MulVec(k, mat.NewVecDense(nDOF, x[:]))
	f.ScaleVec(-1, &f)
	tmp.MulVec(c, mat.NewVecDense(nDOF, xd[:]))
	f.SubVec(&f, &tmp)
	tmp.MulVec(bk, mat.NewVecDense(nIn, append([]float64(nil), in[:4]...)))
	f.AddVec(&f, &tmp)
	tmp.MulVec(bc, mat.NewVecDense(nIn, append([]float64(nil), in[4:8]...)))
	f.AddVec(&f, &tmp)
	var out [nDOF]float64
	for a := range out {
		out[a] = f.AtVec(a)
	}
	return out
}

func TestAccelForces(t *testing.T) {
	t.Parallel()
	// The equations of motion at single states, against the linear forces
	// computed with gonum plus each nonlinear force placed by hand:
	// a damper or bump-stop force g at corner i acts as -D_iᵀ g, i.e. +g
	// on heave, +x_i g on pitch, +y_i g on roll and -g on the wheel (doc.go
	// sign conventions); a lifted tyre adds back kt δ - P on its wheel.
	// Rounding: 1e-9 relative to the largest force.
	const rounding = 1e-9
	v := demoCar()
	s := demoSetup()
	// The front-left rubber's gap at rest is set to leave 10 mm at the
	// operating point at 50 m/s, where the model starts.
	op, err := v.OperatingPoint(50)
	if err != nil {
		t.Fatal(err)
	}
	v.Corners[FL].BumpStopGap = 0.01 + op.Compression[FL]
	v.Corners[FL].BumpStop = BumpStop{Deflection: []float64{0.005}, Force: []float64{1000}}
	m := timeModelAt(t, &v, &s, 50)
	in := []float64{0.001, -0.002, 0.0005, 0, 0.01, 0.02, -0.01, 0}
	xi, yi := v.cornerPosition(FL)
	tests := []struct {
		name      string
		x, xd     [nDOF]float64
		nonlinear func(f *[nDOF]float64)
		airborne  bool
	}{
		{
			name: "damper in bump above the knee",
			x:    [nDOF]float64{0.001, 0.0002, -0.0003, 0.002, 0.001, 0, 0},
			xd:   [nDOF]float64{0, 0, 0, 0.3, 0, 0, 0}, // FL travel rate 0.3 m/s
			nonlinear: func(f *[nDOF]float64) {
				for i := 0; i < 4; i++ {
					d := m.sys.d[i]
					vel := 0.0
					for a := 0; a < nDOF; a++ {
						vel += d[a] * [nDOF]float64{0, 0, 0, 0.3}[a]
					}
					g := m.damp[i].force(vel)
					x, y := v.cornerPosition(i)
					f[0] += g
					f[1] += x * g
					f[2] += y * g
					f[dofWheel+i] -= g
				}
			},
		},
		{
			name: "front-left bump stop compressed by 2 mm",
			x:    [nDOF]float64{0, 0, 0, 0.012, 0, 0, 0}, // FL travel 12 mm, gap 10 mm
			nonlinear: func(f *[nDOF]float64) {
				g := 1000 * 0.002 / 0.005
				f[0] += g
				f[1] += xi * g
				f[2] += yi * g
				f[dofWheel+FL] -= g
			},
		},
		{
			name: "front-left tyre lifted",
			x:    [nDOF]float64{0, 0, 0, 0.02, 0, 0, 0}, // kt·20 mm exceeds the static load
			nonlinear: func(f *[nDOF]float64) {
				tyre := m.kt[FL]*(in[FL]-0.02) + m.ct[FL]*in[4+FL]
				f[dofWheel+FL] += -(m.static[FL] + tyre)
				g := 1000 * 0.01 / 0.005
				f[0] += g
				f[1] += xi * g
				f[2] += yi * g
				f[dofWheel+FL] -= g
			},
			airborne: true,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			want := tdLinearForce(m.sys, tc.x, tc.xd, in)
			tc.nonlinear(&want)
			var acc [nDOF]float64
			var o timeSample
			x, xd := tc.x, tc.xd
			m.accel(&x, &xd, in, &acc, &o)
			scale := 0.0
			for a := range want {
				scale = math.Max(scale, math.Abs(want[a]))
			}
			for a := range want {
				if math.Abs(acc[a]*m.sys.m[a]-want[a]) > rounding*scale {
					t.Errorf("dof %d: force %g, want %g", a, acc[a]*m.sys.m[a], want[a])
				}
			}
			if o.airborne[FL] != tc.airborne || (tc.airborne && o.out[outTyre+FL] != -m.static[FL]) {
				t.Errorf("airborne %v, dynamic tyre load %g (static %g)", o.airborne[FL], o.out[outTyre+FL], m.static[FL])
			}
		})
	}
}

// tdHarmonic returns the 2·steps half-step samples of a harmonic road,
// w_i(t) = A cos(ω t + φ_i), and its rates.
func tdHarmonic(steps int, h, f, amp float64, phase [4]float64) []float64 {
	in := make([]float64, 16*steps)
	om := 2 * math.Pi * f
	for j := 0; j < 2*steps; j++ {
		tj := float64(j) * h / 2
		for i := 0; i < 4; i++ {
			in[8*j+i] = amp * math.Cos(om*tj+phase[i])
			in[8*j+4+i] = -amp * om * math.Sin(om*tj+phase[i])
		}
	}
	return in
}

// tdExactTravelRMS solves (K - ω²M + iωC) X = (Bk + iωBc) W as a real
// 14x14 system with gonum and returns the RMS travel of each corner.
func tdExactTravelRMS(s *system, f, amp float64, phase [4]float64) [4]float64 {
	om := 2 * math.Pi * f
	a := mat.NewDense(2*nDOF, 2*nDOF, nil)
	b := mat.NewVecDense(2*nDOF, nil)
	for r := 0; r < nDOF; r++ {
		for c := 0; c < nDOF; c++ {
			re := s.k[r][c]
			if r == c {
				re -= om * om * s.m[r]
			}
			im := om * s.c[r][c]
			a.Set(r, c, re)
			a.Set(r, nDOF+c, -im)
			a.Set(nDOF+r, c, im)
			a.Set(nDOF+r, nDOF+c, re)
		}
		var br, bi float64
		for q := 0; q < nIn; q++ {
			w := complex(amp*math.Cos(phase[q]), amp*math.Sin(phase[q]))
			rhs := complex(s.bk[r][q], om*s.bc[r][q]) * w
			br += real(rhs)
			bi += imag(rhs)
		}
		b.SetVec(r, br)
		b.SetVec(nDOF+r, bi)
	}
	var x mat.VecDense
	if err := x.SolveVec(a, b); err != nil {
		panic(err)
	}
	var out [4]float64
	for i := 0; i < 4; i++ {
		var re, im float64
		for c := 0; c < nDOF; c++ {
			re += s.d[i][c] * x.AtVec(c)
			im += s.d[i][c] * x.AtVec(nDOF+c)
		}
		out[i] = math.Hypot(re, im) / math.Sqrt2
	}
	return out
}

func TestRK4IsFourthOrder(t *testing.T) {
	t.Parallel()
	// A linear car on a harmonic road at wheel-hop frequency: the steady
	// state travel is the complex solve (tdExactTravelRMS), and the sample
	// mean square over whole periods of a sinusoid is exact, so the
	// time-domain RMS differs from it only by the integrator. RK4 has a
	// global error O(h⁴) (Butcher, "Numerical Methods for Ordinary
	// Differential Equations", 3rd ed., Wiley 2016; from memory): halving h
	// must divide the error by 16 (accepted: 12 to 20, the next term of
	// the series at these steps), and at the default 1 ms the error must be
	// below 1e-4 relative, the figure SimulateCase's doc claims.
	const f, amp = 15.0, 1e-3
	v := demoCar()
	s := tdLinearSetup(0.6)
	m := timeModelAt(t, &v, &s, 50)
	var c [nDamp]float64
	for i := range c {
		c[i] = m.damp[i].cb
	}
	sys := m.sys.withDamping(c)
	phase := [4]float64{0, 1, 2, 3}
	exact := tdExactTravelRMS(&sys, f, amp, phase)
	var errs []float64
	for _, steps := range []int{250, 500, 1000, 2000} { // h = 4, 2, 1, 0.5 ms over 1 s
		h := 1.0 / float64(steps)
		in := tdHarmonic(steps, h, f, amp, phase)
		st := newTimeStats(m.gap, steps)
		m.integrate(in, steps, int(8/h), h, [nDOF]float64{}, st)
		e := 0.0
		for i := 0; i < 4; i++ {
			rms := math.Sqrt(st.sq[outTravel+i] / float64(st.n))
			e = math.Max(e, math.Abs(rms/exact[i]-1))
		}
		errs = append(errs, e)
	}
	t.Logf("relative RMS error at h = 4, 2, 1, 0.5 ms: %.3g", errs)
	for k := 0; k+1 < len(errs); k++ {
		if r := errs[k] / errs[k+1]; r < 12 || r > 20 {
			t.Errorf("error ratio %g between h = %g ms and half of it, want about 16", r, 4/math.Pow(2, float64(k)))
		}
	}
	if errs[2] > 1e-4 {
		t.Errorf("error %g at 1 ms, want below 1e-4", errs[2])
	}
}

func TestDefaultStepIsConverged(t *testing.T) {
	t.Parallel()
	// The step rule's claim, on the strongly nonlinear setup: the road is
	// synthesised up to the rule's bandwidth whatever step is given, so a
	// quarter step integrates the same road; every metric must agree to
	// 1e-3 relative (the integration error the rule allows is ~1e-4).
	const converged = 1e-3
	v := demoCar()
	s := tdDigressiveSetup()
	rc := demoCases()[1]
	a, err := SimulateCase(&v, &rc, &s, TimeOptions{Duration: 20}, rand.New(rand.NewPCG(1, 1)))
	if err != nil {
		t.Fatal(err)
	}
	b, err := SimulateCase(&v, &rc, &s, TimeOptions{Duration: 20, Step: a.Step / 4, Settle: a.Settle}, rand.New(rand.NewPCG(1, 1)))
	if err != nil {
		t.Fatal(err)
	}
	if b.Samples != 4*a.Samples {
		t.Fatalf("%d and %d samples", a.Samples, b.Samples)
	}
	pairs := map[string][2]float64{
		"tyre FL": {a.TyreLoadSD[FL], b.TyreLoadSD[FL]}, "tyre RR": {a.TyreLoadSD[RR], b.TyreLoadSD[RR]},
		"travel FL": {a.TravelSD[FL], b.TravelSD[FL]}, "damper velocity RL": {a.DamperVelocitySD[RL], b.DamperVelocitySD[RL]},
		"ride front": {a.RideHeightSD[Front], b.RideHeightSD[Front]}, "ride shift rear": {a.RideHeightShift[Rear], b.RideHeightShift[Rear]},
		"pitch": {a.PitchSD, b.PitchSD}, "roll": {a.RollSD, b.RollSD}, "heave acceleration": {a.HeaveAccelSD, b.HeaveAccelSD},
	}
	for name, p := range pairs {
		if math.Abs(p[0]/p[1]-1) > converged {
			t.Errorf("%s: %g at %.3g s, %g at a quarter of it", name, p[0], a.Step, p[1])
		}
	}
	t.Logf("step %.3g s, settle %.3g s", a.Step, a.Settle)
}

// tdDigressiveSetup is strongly asymmetric (rebound 4x bump) and
// digressive (high-speed slopes a quarter to a third of the low-speed).
func tdDigressiveSetup() Setup {
	a := AxleDamping{BumpRatio: 0.3, ReboundRatio: 1.2, KneeBump: 0.03, KneeRebound: 0.03,
		HighSpeedBump: 0.25, HighSpeedRebound: 0.35}
	return Setup{Axles: [2]AxleDamping{a, a}}
}

func TestTyreLiftOffIsClipped(t *testing.T) {
	t.Parallel()
	// On a class D road at 30 m/s (far rougher than a track) the demo
	// car's tyres leave the road: the tyre force is clipped at zero, never
	// negative, and the time in the air is counted.
	v := demoCar()
	s := tdLinearSetup(0.5)
	rc := RoadCase{Name: "rough", Speed: 30, Class: "D"}
	tm, err := SimulateCase(&v, &rc, &s, TimeOptions{Duration: 20}, rand.New(rand.NewPCG(2, 2)))
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 4; i++ {
		if tm.LiftOffProbability[i] <= 0 || tm.Peaks.TyreLoadMin[i] != 0 {
			t.Errorf("%s: airborne %.3g of the time, lowest load %g N; want > 0 and exactly 0", CornerNames[i], tm.LiftOffProbability[i], tm.Peaks.TyreLoadMin[i])
		}
	}
	if tm.Warnings&WarnLiftOff == 0 {
		t.Error("no lift-off warning")
	}
	t.Logf("airborne fractions %.3g", tm.LiftOffProbability)
}

func TestBumpStopsLimitTravel(t *testing.T) {
	t.Parallel()
	// With rubbers 8 mm from rest (about 3 mm left at 30 m/s under
	// downforce) on a bumpy road the travel beyond the gap is counted with
	// or without them; with them the peak travel is smaller, and since the
	// force curve rises monotonically the largest stop force is the curve
	// at the largest travel from the operating point, exactly.
	v := demoCar()
	s := tdLinearSetup(0.5)
	rc := RoadCase{Name: "bumpy", Speed: 30, Class: "B"}
	op, err := v.OperatingPoint(rc.Speed)
	if err != nil {
		t.Fatal(err)
	}
	stop := BumpStop{Deflection: []float64{0.004, 0.008}, Force: []float64{800, 4000}}
	free, held := v, v
	for i := FL; i <= FR; i++ {
		free.Corners[i].BumpStopGap, held.Corners[i].BumpStopGap = 0.008, 0.008
		free.Corners[i].BumpStop = BumpStop{Deflection: []float64{0.3}, Force: []float64{0}}
		held.Corners[i].BumpStop = stop
	}
	freeM, err := SimulateCase(&free, &rc, &s, TimeOptions{Duration: 20}, rand.New(rand.NewPCG(3, 3)))
	if err != nil {
		t.Fatal(err)
	}
	heldM, err := SimulateCase(&held, &rc, &s, TimeOptions{Duration: 20}, rand.New(rand.NewPCG(3, 3)))
	if err != nil {
		t.Fatal(err)
	}
	for i := FL; i <= FR; i++ {
		if freeM.BumpStopProbability[i] <= 0 || heldM.BumpStopProbability[i] <= 0 || heldM.Peaks.TravelMax[i] >= freeM.Peaks.TravelMax[i] {
			t.Errorf("%s: beyond the gap %.3g / %.3g of the time, peak travel %.4g m with stops, %.4g without",
				CornerNames[i], heldM.BumpStopProbability[i], freeM.BumpStopProbability[i], heldM.Peaks.TravelMax[i], freeM.Peaks.TravelMax[i])
		}
		want := stop.force(heldM.Peaks.TravelMax[i] - (0.008 - op.Compression[i]))
		if !scalar.EqualWithinRel(heldM.Peaks.BumpStopForceMax[i], want, 1e-12) {
			t.Errorf("%s: peak stop force %g, curve at peak travel %g", CornerNames[i], heldM.Peaks.BumpStopForceMax[i], want)
		}
		if freeM.Peaks.BumpStopForceMax[i] != 0 {
			t.Errorf("%s: a zero-force rubber gave %g N", CornerNames[i], freeM.Peaks.BumpStopForceMax[i])
		}
	}
	// The rear corners have no rubber and their gap is the corner's 35 mm
	// less the compression at speed.
	if heldM.BumpStopProbability[RL] != 0 || heldM.Peaks.BumpStopForceMax[RL] != 0 {
		t.Errorf("rear: %g of the time beyond 35 mm, stop force %g", heldM.BumpStopProbability[RL], heldM.Peaks.BumpStopForceMax[RL])
	}
}

func TestSimulateCaseRejectsBadInput(t *testing.T) {
	t.Parallel()
	v := demoCar()
	s := demoSetup()
	rc := demoCases()[0]
	tests := []struct {
		name  string
		v     Vehicle
		s     Setup
		opt   TimeOptions
		field string
	}{
		{"step beyond stability", v, s, TimeOptions{Duration: 1, Step: 0.05}, "step_s"},
		{"negative duration", v, s, TimeOptions{Duration: -1}, "duration_s"},
		{"bad setup", v, Setup{}, TimeOptions{}, "setup.front.bump_ratio"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := SimulateCase(&tc.v, &rc, &tc.s, tc.opt, rand.New(rand.NewPCG(1, 1)))
			synthWantField(t, err, tc.field)
		})
	}
	if _, err := SimulateCase(&v, &rc, &s, TimeOptions{Duration: 1}, nil); err == nil {
		t.Error("no error without a random source")
	}
}

// BenchmarkSimulateCase measures simulated seconds per wall second on one
// core for the demo car on its fast track case with the demo setup, at
// the chosen step, road synthesis included.
func BenchmarkSimulateCase(b *testing.B) {
	v := demoCar()
	s := demoSetup()
	rc := demoCases()[0]
	b.ReportAllocs()
	simulated := 0.0
	start := time.Now()
	for i := 0; i < b.N; i++ {
		tm, err := SimulateCase(&v, &rc, &s, TimeOptions{Duration: 60}, rand.New(rand.NewPCG(1, uint64(i))))
		if err != nil {
			b.Fatal(err)
		}
		simulated += tm.Duration + tm.Settle
		b.ReportMetric(tm.Step*1e3, "step-ms")
	}
	b.ReportMetric(simulated/time.Since(start).Seconds(), "sim-s/s")
}

// BenchmarkIntegrate is the hot loop alone (no synthesis): it must not
// allocate.
func BenchmarkIntegrate(b *testing.B) {
	v := demoCar()
	s := demoSetup()
	m := timeModelAt(b, &v, &s, 50)
	const steps, h = 1000, 1e-3
	in := tdHarmonic(steps, h, 12, 1e-3, [4]float64{0, 1, 2, 3})
	st := newTimeStats(m.gap, steps)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		m.integrate(in, steps, 0, h, [nDOF]float64{}, st)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*steps), "ns/step")
}
