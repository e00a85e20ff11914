package model

import (
	"errors"
	"fmt"
	"math"
)

// ErrNoEquilibrium is wrapped by the error returned when the car has no
// usable static equilibrium at a speed: the aero stiffness exceeds the
// suspension's, the downforce runs away, or it puts the car on its bump
// stops or the floor on the ground.
var ErrNoEquilibrium = errors.New("model: no equilibrium at speed")

// OperatingPoint is the car's static equilibrium on a flat road at a
// speed: the car at rest pressed down by its downforce. Every probability
// and the time-domain check start from it. Changes are from the car at
// rest (signs as in the package doc).
type OperatingPoint struct {
	Speed float64 // (m/s)

	// RideHeight is the ride height at speed, front and rear (m): the rest
	// ride height plus RideHeightChange (the change alone when the
	// vehicle gives no rest ride height).
	RideHeight       [2]float64
	RideHeightChange [2]float64 // ride height at speed minus at rest, + up (m)
	Pitch            float64    // pitch at speed from rest, + nose up (rad)
	Compression      [4]float64 // suspension travel from rest, + bump (m)
	// BumpStopGap is the bump-stop gap left at speed (m): the corner's
	// gap at rest minus its compression; 0 where no gap is given.
	BumpStopGap [4]float64
	// HeaveTravel is each axle's heave element travel at speed from rest,
	// MR3 times the mean of the axle's compressions, + bump (m); 0 where
	// the axle has no heave element.
	HeaveTravel [2]float64
	// PackerGap is the packer gap left at speed (m): the element's gap
	// at rest minus HeaveTravel; 0 where no packer gap is given.
	PackerGap [2]float64
	TyreLoad  [4]float64 // static tyre load at speed, weight and downforce (N)

	Downforce [2]float64 // downforce per axle at this point and speed (N)
	// AeroStiffness is K_a[a][b] = -∂F_a/∂h_b at this point and speed
	// (N/m): how much axle a's downforce grows per metre axle b's ride
	// height falls. It enters the stiffness matrix (see system).
	AeroStiffness [2][2]float64

	Iterations int // Newton iterations (1 for a linear map, 0 without aero)

	state [nDOF]float64 // displacement from rest (m, rad)
}

// Newton's stopping rule for the operating point: the last step moved no
// coordinate by more than newtonTol (m or rad; 1e-12 m is far below any
// ride height's resolution and well above rounding of ~1e-17 m), within
// newtonMaxIter steps.
const (
	newtonTol     = 1e-12
	newtonMaxIter = 50
)

// OperatingPoint solves the static equilibrium at speed (m/s) on a flat
// road. With x the displacement from rest, K_m the mechanical stiffness
// (springs, bars, tyres: newSystem without aero), T_a the axle rows and
// F(h) the aero map at the speed,
//
//	r(x) = K_m x + Σ_a F_a(h_rest + T x) T_aᵀ = 0
//
// (downforce pushes the body down at each axle's centre line), solved by
// Newton's method with the Jacobian J = K_m - Σ_(a,b) K_a[a][b] T_aᵀ T_b,
// K_a = -∂F/∂h; for the linear map J is constant and one solve is exact.
// For a single corner this is x = F/(k_w - k_a) (statics). The tyre loads
// are the rest loads plus k_t times each tyre's compression, which sum to
// weight plus downforce.
//
// It refuses (an error wrapping ErrNoEquilibrium, naming the speed and
// why) a car whose stiffness at the point is not positive (see
// stiffEnough), whose Newton iteration does not settle, whose compression
// reaches a bump-stop or packer gap, whose ride height at speed is not above the
// ground, or whose point leaves an aero table's grid.
func (v *Vehicle) OperatingPoint(speed float64) (OperatingPoint, error) {
	var p problems
	p.merge("vehicle.", v.Validate())
	p.nonNegative("speed_m_per_s", speed)
	if err := p.err(); err != nil {
		return OperatingPoint{}, err
	}
	return v.operatingPoint(speed)
}

func (v *Vehicle) operatingPoint(speed float64) (OperatingPoint, error) {
	op := OperatingPoint{Speed: speed}
	sc := v.Aero.speedScale(speed)
	mech := newSystem(v, &[2][2]float64{})
	t := v.axleRows()
	fail := func(format string, args ...any) (OperatingPoint, error) {
		return OperatingPoint{}, fmt.Errorf("%w: at %g m/s %s", ErrNoEquilibrium, speed, fmt.Sprintf(format, args...))
	}
	var x [nDOF]float64
	var f [2]float64
	var jac [2][2]float64
	if sc > 0 {
		maxIter := newtonMaxIter
		if v.Aero.linear() {
			maxIter = 1
		}
		converged := false
		for op.Iterations < maxIter && !converged {
			op.Iterations++
			f, jac = v.Aero.at(v.RestRideHeight, rideChange(&t, &x))
			setAero(&op, sc, f, jac)
			sys := newSystem(v, &op.AeroStiffness)
			stiff := sys.stiffEnough()
			if !stiff && op.Iterations > 1 {
				dh := rideChange(&t, &x)
				return fail("the downforce grows faster than the suspension holds it: Newton's iteration reached ride-height changes of %.4g and %.4g mm, where the aero stiffness exceeds the suspension's", dh[0]*1e3, dh[1]*1e3)
			}
			if !stiff {
				return fail("the aero stiffness exceeds the suspension's (front %.4g, rear %.4g N/mm on the axles; cross %.4g, %.4g N/mm): the stiffness matrix is not positive definite",
					op.AeroStiffness[0][0]/1e3, op.AeroStiffness[1][1]/1e3, op.AeroStiffness[0][1]/1e3, op.AeroStiffness[1][0]/1e3)
			}
			var r [nDOF]float64
			for a := 0; a < nDOF; a++ {
				for b := 0; b < nDOF; b++ {
					r[a] -= mech.k[a][b] * x[b]
				}
				r[a] -= sc * (f[0]*t[0][a] + f[1]*t[1][a])
			}
			dx, err := sys.staticSolve(r)
			if err != nil {
				return fail("the stiffness matrix is singular: %v", err)
			}
			step := 0.0
			for a := range x {
				x[a] += dx[a]
				step = math.Max(step, math.Abs(dx[a]))
			}
			converged = step <= newtonTol || v.Aero.linear()
			if math.IsNaN(step) || math.IsInf(step, 0) {
				break
			}
		}
		if !converged {
			return fail("the downforce grows faster than the suspension holds it: no equilibrium found in %d Newton steps", op.Iterations)
		}
		f, jac = v.Aero.at(v.RestRideHeight, rideChange(&t, &x))
		setAero(&op, sc, f, jac)
		if sys := newSystem(v, &op.AeroStiffness); !sys.stiffEnough() {
			return fail("the aero stiffness at the operating point exceeds the suspension's: the equilibrium is not stable")
		}
	}
	op.state = x
	op.RideHeightChange = rideChange(&t, &x)
	op.Pitch = x[dofPitch]
	op.TyreLoad = v.restTyreLoads()
	for ax := 0; ax < 2; ax++ {
		op.RideHeight[ax] = v.RestRideHeight[ax] + op.RideHeightChange[ax]
		if v.RestRideHeight[ax] > 0 && op.RideHeight[ax] <= 0 {
			return fail("the %s ride height would be %.4g mm: the body is on the ground", AxleNames[ax], op.RideHeight[ax]*1e3)
		}
	}
	if tb := v.Aero.Table; tb != nil && sc > 0 && !tb.contains(op.RideHeight) {
		return fail("the ride heights at speed (front %.4g, rear %.4g mm) leave the aero table's grid", op.RideHeight[0]*1e3, op.RideHeight[1]*1e3)
	}
	for i := 0; i < 4; i++ {
		s := 0.0
		for a := 0; a < nDOF; a++ {
			s += mech.d[i][a] * x[a]
		}
		op.Compression[i] = s
		op.TyreLoad[i] -= v.Corners[i].TyreRate * x[dofWheel+i]
		if gap := v.Corners[i].BumpStopGap; gap > 0 {
			op.BumpStopGap[i] = gap - s
			if s >= gap {
				return fail("the downforce compresses corner %s by %.4g mm, onto its bump stop (gap %.4g mm)", CornerNames[i], s*1e3, gap*1e3)
			}
		}
	}
	for ax := 0; ax < 2; ax++ {
		h := &v.Heave[ax]
		if !h.has() {
			continue
		}
		op.HeaveTravel[ax] = h.MotionRatio * (op.Compression[2*ax] + op.Compression[2*ax+1]) / 2
		if h.PackerGap > 0 {
			op.PackerGap[ax] = h.PackerGap - op.HeaveTravel[ax]
			if op.PackerGap[ax] <= 0 {
				return fail("the downforce strokes the %s heave element by %.4g mm, onto its packer (gap %.4g mm)", AxleNames[ax], op.HeaveTravel[ax]*1e3, h.PackerGap*1e3)
			}
		}
	}
	return op, nil
}

// setAero stores the downforce and aero stiffness at speed from the map's
// values at the reference speed.
func setAero(op *OperatingPoint, sc float64, f [2]float64, jac [2][2]float64) {
	for a := 0; a < 2; a++ {
		op.Downforce[a] = sc * f[a]
		for b := 0; b < 2; b++ {
			op.AeroStiffness[a][b] = 0 - sc*jac[a][b] // 0 - x: no negative zero in reports
		}
	}
}

// rideChange is T x, the ride-height change of each axle (m).
func rideChange(t *[2][nDOF]float64, x *[nDOF]float64) (dh [2]float64) {
	for ax := 0; ax < 2; ax++ {
		for a := 0; a < nDOF; a++ {
			dh[ax] += t[ax][a] * x[a]
		}
	}
	return dh
}
