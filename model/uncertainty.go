package model

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/integrate/quad"
)

// Uncertainty is what is known of the car only within a range: the fuel
// load, the tyres' rate (pressure, temperature) and the aero figures. The
// vehicle as given is the nominal car; each range is uniform on
// [Min, Max] and says how far the car that runs may differ from it (the
// range need not hold the nominal value). A nil range is not uncertain.
//
// A robust problem (NewRobustProblem) evaluates every setup on the cars
// at the points of Points, the same dampers on each (the setup's ratios
// are taken of the nominal car's critical damping: the hardware does not
// change with the fuel load), and takes each objective's mean, worst or
// mean + k·sd over them (RobustMeasure).
type Uncertainty struct {
	// FuelMass is the fuel load added to the sprung mass (kg); negative
	// values take fuel out of the nominal car.
	FuelMass *Range
	// FuelPosition is the fuel's centre of gravity forward of the
	// nominal sprung CG (m), on the centre line; nil is at the sprung CG.
	// Needs FuelMass.
	FuelPosition *Range
	// FuelHeight is the fuel's centre of gravity above the ground (m), as
	// LoadPaths.CGHeight; nil is at the sprung CG's height. Needs FuelMass
	// and the vehicle's load_paths.cg_height_m.
	FuelHeight *Range
	// TyreRateScaleAll is a factor on every tyre's rate (-), one for all
	// four (a warmer or colder set); nil is 1.
	TyreRateScaleAll *Range
	// TyreRateScale is a factor on each axle's tyre rates (-), front and
	// rear, on top of TyreRateScaleAll; nil is 1.
	TyreRateScale [2]*Range
	// DownforceScale is a factor on the aero map's downforce, slopes
	// included (-); needs aero.
	DownforceScale *Range
	// BalanceShift moves this fraction of the total downforce at rest
	// from the rear axle to the front (-), the same at every ride height:
	// the aero balance's shift. Needs aero.
	BalanceShift *Range
	// AeroStiffnessScale is a factor on the aero map's slopes about the
	// rest ride heights (-): F' = F_rest + s (F - F_rest). Needs aero.
	AeroStiffnessScale *Range

	Method RobustMethod
	// Nodes is the Gauss-Legendre nodes per range of the quadrature,
	// 1 to MaxRobustNodes; 0 means DefaultRobustNodes.
	Nodes int
	// Samples is the number of seeded points of the sample method,
	// 2 to MaxRobustPoints; 0 means DefaultRobustSamples.
	Samples int
	// Seed seeds the sample (the job's seed); unused by the quadrature.
	Seed uint64

	Measure RobustMeasure
	// K is the k of mean + k·sd (RobustMeanSD), in [0, 5].
	K float64
}

// RobustMethod is how the uncertain cars are chosen.
type RobustMethod int

const (
	// RobustQuadrature is a tensor-product Gauss-Legendre rule, Nodes per
	// range (gonum's integrate/quad.Legendre).
	RobustQuadrature RobustMethod = iota + 1
	// RobustSample is Samples points drawn uniformly from the ranges
	// with a PCG source seeded by Seed: plain Monte Carlo.
	RobustSample
)

// RobustMeasure is how the objective values over the uncertain cars make
// one objective.
//
// Deb & Gupta, "Introducing robustness in multi-objective optimization",
// Evolutionary Computation 14(4):463-494, 2006, doi:10.1162/evco.2006.14.4.463
// (cited from memory): their type I robust solution minimises the mean
// effective objective, the mean of f over a neighbourhood of the
// decision (here: over the uncertain car parameters, with the uniform
// density of the ranges): RobustMean. The worst case over the set and
// the mean plus a multiple of the standard deviation are the other
// measures the robust-optimisation literature the paper reviews uses
// (from memory, not the paper's type I or II): RobustWorst and
// RobustMeanSD. The paper's type II (the original objective with a
// constraint on its change) is not offered.
type RobustMeasure int

const (
	// RobustMean is Σ w_j f_j, the mean over the uncertain cars.
	RobustMean RobustMeasure = iota + 1
	// RobustWorst is max_j f_j over the points (the nodes or samples:
	// the Gauss nodes lie inside the ranges, so this is the worst of the
	// cars evaluated, not of the ranges' corners).
	RobustWorst
	// RobustMeanSD is mean + k·sd, sd² = Σ w_j (f_j - mean)².
	RobustMeanSD
)

var robustMethodNames = map[RobustMethod]string{RobustQuadrature: "quadrature", RobustSample: "sample"}
var robustMeasureNames = map[RobustMeasure]string{RobustMean: "mean", RobustWorst: "worst", RobustMeanSD: "mean_sd"}

func (m RobustMethod) String() string {
	if n, ok := robustMethodNames[m]; ok {
		return n
	}
	return fmt.Sprintf("method(%d)", int(m))
}

func (m RobustMeasure) String() string {
	if n, ok := robustMeasureNames[m]; ok {
		return n
	}
	return fmt.Sprintf("measure(%d)", int(m))
}

// Defaults and bounds of the uncertainty's point set (common practice, no
// source: 3 Gauss nodes integrate a quintic per range exactly, and a few
// hundred cars per setup is the most a job can afford).
const (
	DefaultRobustNodes   = 3
	DefaultRobustSamples = 32
	MaxRobustNodes       = 5
	MaxRobustPoints      = 256
)

// uncertainDims is the number of ranges an Uncertainty can hold, in the
// order of ranges().
const uncertainDims = 9

// uncertainNames are the ranges' field names, in the order of ranges().
var uncertainNames = [uncertainDims]string{
	"fuel_mass_kg", "fuel_position_m", "fuel_height_m", "tyre_rate_scale", "front_tyre_rate_scale", "rear_tyre_rate_scale",
	"downforce_scale", "balance_shift", "aero_stiffness_scale",
}

var uncertainLimits = [uncertainDims]string{
	"Uncertainty.fuel_mass_kg", "Uncertainty.fuel_position_m", "LoadPaths.height_m", "Uncertainty.tyre_rate_scale", "Uncertainty.tyre_rate_scale",
	"Uncertainty.tyre_rate_scale", "Uncertainty.downforce_scale", "Uncertainty.balance_shift", "Uncertainty.aero_stiffness_scale",
}

func (u *Uncertainty) ranges() [uncertainDims]*Range {
	return [uncertainDims]*Range{u.FuelMass, u.FuelPosition, u.FuelHeight, u.TyreRateScaleAll, u.TyreRateScale[0], u.TyreRateScale[1],
		u.DownforceScale, u.BalanceShift, u.AeroStiffnessScale}
}

// WithDefaults returns u with Method, Measure, Nodes and Samples filled in.
func (u Uncertainty) WithDefaults() Uncertainty {
	if u.Method == 0 {
		u.Method = RobustQuadrature
	}
	if u.Measure == 0 {
		u.Measure = RobustMean
	}
	if u.Nodes == 0 && u.Method == RobustQuadrature {
		u.Nodes = DefaultRobustNodes
	}
	if u.Samples == 0 && u.Method == RobustSample {
		u.Samples = DefaultRobustSamples
	}
	return u
}

// Validate checks the uncertainty against the nominal car v and names
// every bad field: each range finite, Min <= Max, both ends in its
// plausible range; at least one range; the fuel's position and height
// only with a fuel mass, the height only on a car with a CG height, the
// aero ranges only on a car with aero; the method, measure, nodes,
// samples and k; at most MaxRobustPoints points. Call it on
// WithDefaults' result.
func (u *Uncertainty) Validate(v *Vehicle) error {
	var p problems
	rs := u.ranges()
	given := 0
	for i, r := range rs {
		if r == nil {
			continue
		}
		given++
		p.bounds(uncertainNames[i], *r, uncertainLimits[i])
	}
	if given == 0 {
		p.add("", "gives no range: give at least one (fuel_mass_kg, tyre_rate_scale, downforce_scale, ...) or leave uncertainty out")
	}
	if u.FuelMass == nil && (u.FuelPosition != nil || u.FuelHeight != nil) {
		p.add("fuel_mass_kg", "is needed by fuel_position_m and fuel_height_m")
	}
	if u.FuelHeight != nil && !(v.LoadPaths.CGHeight > 0) {
		p.add("fuel_height_m", "needs the vehicle's load_paths.cg_height_m (the sprung CG's height)")
	}
	for i, r := range []*Range{u.DownforceScale, u.BalanceShift, u.AeroStiffnessScale} {
		if r != nil && !v.Aero.has() {
			p.add(uncertainNames[6+i], "needs aero on the vehicle (vehicle.aero)")
		}
	}
	if _, ok := robustMethodNames[u.Method]; !ok {
		p.add("method", "unknown method %d", int(u.Method))
	}
	if _, ok := robustMeasureNames[u.Measure]; !ok {
		p.add("measure", "unknown measure %d", int(u.Measure))
	}
	p.in("k", u.K, "Uncertainty.k")
	if u.K != 0 && u.Measure != RobustMeanSD {
		p.add("k", "is for the mean_sd measure only, got %g with %s", u.K, u.Measure)
	}
	switch u.Method {
	case RobustQuadrature:
		if u.Nodes < 1 || u.Nodes > MaxRobustNodes {
			p.add("nodes", "must be in [1, %d], got %d", MaxRobustNodes, u.Nodes)
		} else if n := u.count(); n > MaxRobustPoints {
			p.add("nodes", "%d nodes on every range of positive width make %d cars per setup, more than %d: give fewer nodes or ranges, or use the sample method", u.Nodes, n, MaxRobustPoints)
		}
		if u.Samples != 0 {
			p.add("samples", "is for the sample method only, got %d", u.Samples)
		}
	case RobustSample:
		if u.Samples < 2 || u.Samples > MaxRobustPoints {
			p.add("samples", "must be in [2, %d], got %d", MaxRobustPoints, u.Samples)
		}
		if u.Nodes != 0 {
			p.add("nodes", "is for the quadrature method only, got %d", u.Nodes)
		}
	}
	return p.err()
}

// count is the number of points of the quadrature: Nodes per range of
// positive width, 1 per range of zero width.
func (u *Uncertainty) count() int {
	n := 1
	for _, r := range u.ranges() {
		if r != nil && r.Max > r.Min {
			n *= u.Nodes
			if n > MaxRobustPoints {
				return n
			}
		}
	}
	return n
}

// Points returns the number of uncertain cars each setup is evaluated on.
func (u *Uncertainty) Points() int {
	if u.Method == RobustSample {
		return u.Samples
	}
	return u.count()
}

// UncertainPoint is one uncertain car: its weight in the means (the
// weights sum to 1) and its departure from the nominal car.
type UncertainPoint struct {
	Weight float64
	Perturbation
}

// Perturbation is how one car differs from the nominal one (see
// Uncertainty for each field; Apply builds the car).
type Perturbation struct {
	FuelMass     float64 // kg
	FuelPosition float64 // m forward of the sprung CG
	// FuelHeight is the fuel's CG height (m); NaN is at the sprung CG's.
	FuelHeight float64
	// TyreRateScale is the factor on each axle's tyre rates, front and
	// rear (TyreRateScaleAll times the axle's own).
	TyreRateScale      [2]float64
	DownforceScale     float64
	BalanceShift       float64
	AeroStiffnessScale float64
}

// nominalValues are the values of a range not given, in the order of
// ranges().
var nominalValues = [uncertainDims]float64{0, 0, math.NaN(), 1, 1, 1, 1, 0, 1}

func perturbationOf(x *[uncertainDims]float64) Perturbation {
	return Perturbation{FuelMass: x[0], FuelPosition: x[1], FuelHeight: x[2], TyreRateScale: [2]float64{x[3] * x[4], x[3] * x[5]},
		DownforceScale: x[6], BalanceShift: x[7], AeroStiffnessScale: x[8]}
}

// UncertainPoints returns the cars of a validated uncertainty (after
// WithDefaults), in a fixed order.
//
// Quadrature: the tensor product of the n-node Gauss-Legendre rule
// (gonum's quad.Legendre.FixedLocations) on each range of positive
// width, the first range varying slowest; each weight is the product of
// the ranges' weights over their widths, so that the weights sum to 1
// and Σ w f approximates the mean of f under the uniform density. The
// n-node rule is exact for polynomials of degree 2n - 1 in each range
// (Abramowitz & Stegun 25.4.29). A range of zero width is its one value.
//
// Sample: Samples points, each range drawn in turn from
// rand.New(rand.NewPCG(Seed, 0x726f62757374)), weights 1/Samples.
func (u *Uncertainty) UncertainPoints() []UncertainPoint {
	rs := u.ranges()
	if u.Method == RobustSample {
		rnd := rand.New(rand.NewPCG(u.Seed, 0x726f62757374))
		out := make([]UncertainPoint, u.Samples)
		for j := range out {
			x := nominalValues
			for i, r := range rs {
				if r != nil {
					x[i] = r.Min + (r.Max-r.Min)*rnd.Float64()
				}
			}
			out[j] = UncertainPoint{Weight: 1 / float64(u.Samples), Perturbation: perturbationOf(&x)}
		}
		return out
	}
	var nodes, weights [uncertainDims][]float64
	for i, r := range rs {
		switch {
		case r == nil:
			nodes[i], weights[i] = []float64{nominalValues[i]}, []float64{1}
		case r.Max == r.Min:
			nodes[i], weights[i] = []float64{r.Min}, []float64{1}
		default:
			nodes[i], weights[i] = GaussLegendre(u.Nodes, r.Min, r.Max)
		}
	}
	out := []UncertainPoint{{Weight: 1, Perturbation: perturbationOf(&nominalValues)}}
	var xs [][uncertainDims]float64
	xs = append(xs, nominalValues)
	for i := range rs {
		var next []UncertainPoint
		var nextX [][uncertainDims]float64
		for j, pt := range out {
			for k, x := range nodes[i] {
				v := xs[j]
				v[i] = x
				next = append(next, UncertainPoint{Weight: pt.Weight * weights[i][k], Perturbation: perturbationOf(&v)})
				nextX = append(nextX, v)
			}
		}
		out, xs = next, nextX
	}
	return out
}

// GaussLegendre returns the n nodes of the Gauss-Legendre rule on
// [lo, hi] (gonum's quad.Legendre) and their weights divided by hi - lo,
// so that they sum to 1: Σ w_k f(x_k) ≈ (1/(hi-lo)) ∫ f dx, the mean of f
// under the uniform density. It panics unless n >= 1 and lo < hi.
func GaussLegendre(n int, lo, hi float64) (x, w []float64) {
	x, w = make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, lo, hi)
	for k := range w {
		w[k] /= hi - lo
	}
	return x, w
}

// Apply returns the nominal car v changed by the perturbation; the result
// is checked by Vehicle.Validate (a fuel load that takes the sprung mass
// out of its range, a tyre rate scaled out of its range).
//
// The fuel is a point mass m_f at (x_f forward of the sprung CG, on the
// centre line, height h_f) added to the sprung mass m (its own inertia
// about its centre is left out: common practice for a tank's first
// estimate, no source). With M = m + m_f and μ = m m_f / M (parallel-axis
// theorem): the CG moves forward by m_f x_f / M (a, b and the lateral
// offset follow); the pitch inertia gains μ (x_f² + Δz²) and the roll
// inertia μ Δz², Δz = h_f - h the height above the sprung CG; the CG
// height becomes (m h + m_f h_f)/M. Given corner loads gain the fuel's
// weight by the lever rule, half to each side.
//
// The tyre rates are scaled per axle. The aero map becomes, per axle,
// F'(h) = s_d [F_rest + s_k (F(h) - F_rest)] ± β s_d D_rest (+ front,
// - rear), with F_rest the map at the rest ride heights and D_rest their
// sum: the downforce scale s_d, the stiffness scale s_k, the balance
// shift β. On the linear map that is D' = s_d (D ± β D_rest) and
// K' = s_d s_k K; tables and polynomials get the same affine change of
// their values or coefficients.
func (pt *Perturbation) Apply(v *Vehicle) (Vehicle, error) {
	out := *v
	out.ReferencePoints = append([]ReferencePoint(nil), v.ReferencePoints...)
	if pt.FuelMass != 0 {
		out.addFuel(pt.FuelMass, pt.FuelPosition, pt.FuelHeight)
	}
	for i := range out.Corners {
		out.Corners[i].TyreRate *= pt.TyreRateScale[i/2]
	}
	if out.Aero.has() {
		out.Aero = v.Aero.perturbed(v.RestRideHeight, pt.DownforceScale, pt.AeroStiffnessScale, pt.BalanceShift)
	}
	if err := out.Validate(); err != nil {
		return out, err
	}
	return out, nil
}

// addFuel adds the point mass mf at xf forward of the sprung CG and
// height hf (NaN: at the CG's height) to the sprung body (see Apply).
func (v *Vehicle) addFuel(mf, xf, hf float64) {
	m := v.SprungMass
	total := m + mf
	mu := m * mf / total
	dz := 0.0
	if !math.IsNaN(hf) {
		dz = hf - v.LoadPaths.CGHeight
		v.LoadPaths.CGHeight = (m*v.LoadPaths.CGHeight + mf*hf) / total
	}
	if v.Corners[0].SprungLoad != 0 {
		l := v.Wheelbase()
		front := mf * Gravity * (v.CGToRearAxle + xf) / l
		rear := mf*Gravity - front
		for i := range v.Corners {
			share := front
			if i >= 2 {
				share = rear
			}
			v.Corners[i].SprungLoad += share / 2
		}
	}
	dx := mf * xf / total
	v.CGToFrontAxle -= dx
	v.CGToRearAxle += dx
	v.CGLateral = m * v.CGLateral / total
	v.PitchInertia += mu * (xf*xf + dz*dz)
	v.RollInertia += mu * dz * dz
	v.SprungMass = total
}

// perturbed returns the map changed as Perturbation.Apply says.
func (a Aero) perturbed(rest [2]float64, sd, sk, beta float64) Aero {
	frest, _ := a.at(rest, [2]float64{})
	dRest := frest[0] + frest[1]
	alpha := sd * sk
	var c [2]float64
	for ax := 0; ax < 2; ax++ {
		sign := 1.0
		if ax == Rear {
			sign = -1
		}
		c[ax] = sd*(1-sk)*frest[ax] + sign*beta*sd*dRest
	}
	switch {
	case a.Table != nil:
		t := *a.Table
		t.Front, t.Rear = affine(t.Front, alpha, c[0]), affine(t.Rear, alpha, c[1])
		a.Table = &t
	case a.Polynomial != nil:
		p := *a.Polynomial
		p.Terms = make([]AeroTerm, 0, len(a.Polynomial.Terms)+1)
		constant := false
		for _, t := range a.Polynomial.Terms {
			for ax := 0; ax < 2; ax++ {
				t.Coefficient[ax] *= alpha
				if t.PowerFront == 0 && t.PowerRear == 0 && !constant {
					t.Coefficient[ax] += c[ax]
				}
			}
			if t.PowerFront == 0 && t.PowerRear == 0 {
				constant = true
			}
			p.Terms = append(p.Terms, t)
		}
		if !constant {
			p.Terms = append(p.Terms, AeroTerm{Coefficient: c})
		}
		a.Polynomial = &p
	default:
		for ax := 0; ax < 2; ax++ {
			a.Downforce[ax] = alpha*a.Downforce[ax] + c[ax]
			a.Stiffness[ax] *= alpha
		}
	}
	return a
}

// affine returns alpha·x + c elementwise, in a new slice.
func affine(x []float64, alpha, c float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = alpha*v + c
	}
	return out
}
