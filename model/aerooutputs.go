package model

import (
	"fmt"
	"math"
)

// ReferencePoint is a point of the body's underside whose height above
// the ground matters to the aero (a splitter's leading edge, the plank's
// ends, a diffuser's lip).
//
// The point lies X behind the front axle (or at WheelbaseFraction of the
// wheelbase behind it; negative ahead of the front axle, above 1 behind the
// rear) and Y to the left of the centre line. Give one of X and
// WheelbaseFraction: both 0 is the front axle.
//
// Ground under a point. The ground a point is measured from is the
// surface through the four tyre contacts: interpolated linearly along the
// car between the two axles' road inputs (extrapolated ahead of the front
// axle and behind the rear) and across it between each axle's left and
// right tyre. Its height is then the same linear combination of the
// front and rear ride heights and the axles' roll relative to the road,
//
//	h(s, y) = (1-s) h_f + s h_r + y ((1-s) r_f + s r_r),   s = X / wheelbase,
//
// with r_a = φ - (w_aL - w_aR)/t_a the body roll relative to the axle's
// road, so every point's variance follows from one 4×4 covariance of
// (h_f, h_r, r_f, r_r), at no cost per point. Why this ground and not the
// road under the point itself (the front track delayed by X/V): it is the
// reference the car's ride heights are set and measured against on the
// rig and in the set-up pad, the wheels' ground plane, and for wavelengths
// longer than the wheelbase the two are the same. What it leaves out is a
// single bump shorter than the wheelbase passing under the floor between
// the wheels, which the linear four-post model cannot see anyway.
type ReferencePoint struct {
	Name              string
	X                 float64 // distance behind the front axle (m), negative ahead of it
	WheelbaseFraction float64 // the same as a fraction of the wheelbase (-); give one of X and this
	Y                 float64 // distance left of the centre line (m)
	RestHeight        float64 // height above the ground with the car at rest (m)
}

// MaxReferencePoints bounds a vehicle's reference points (each case's
// metrics hold them in a fixed array, so evaluating allocates nothing).
const MaxReferencePoints = 8

// fraction is the point's position as a fraction of the wheelbase l.
func (r *ReferencePoint) fraction(l float64) float64 {
	if r.WheelbaseFraction != 0 {
		return r.WheelbaseFraction
	}
	return r.X / l
}

// validateReferencePoints names every bad field of the vehicle's points.
func (v *Vehicle) validateReferencePoints(p *problems) {
	if len(v.ReferencePoints) > MaxReferencePoints {
		p.add("reference_points", "at most %d reference points, got %d", MaxReferencePoints, len(v.ReferencePoints))
	}
	seen := map[string]int{}
	for i, r := range v.ReferencePoints {
		f := fmt.Sprintf("reference_points[%d].", i)
		p.text(f+"name", r.Name)
		if r.Name == "" {
			p.add(f+"name", "needs a name")
		} else if j, ok := seen[r.Name]; ok {
			p.add(f+"name", "%q is also reference point %d: give each point its own name", r.Name, j)
		} else {
			seen[r.Name] = i
		}
		p.in(f+"x_from_front_axle_m", r.X, "ReferencePoint.x_from_front_axle_m")
		p.in(f+"wheelbase_fraction", r.WheelbaseFraction, "ReferencePoint.wheelbase_fraction")
		if r.X != 0 && r.WheelbaseFraction != 0 {
			p.add(f+"wheelbase_fraction", "give one of x_from_front_axle_m and wheelbase_fraction, not both: got %s m and %s", num(r.X), num(r.WheelbaseFraction))
		}
		p.in(f+"y_m", r.Y, "ReferencePoint.y_m")
		if minTrack := math.Min(v.TrackFront, v.TrackRear); minTrack > 0 && math.Abs(r.Y) > minTrack/2 {
			p.add(f+"y_m", "must lie between the wheels (|y| <= %g m), got %g", minTrack/2, r.Y)
		}
		p.in(f+"rest_height_m", r.RestHeight, "ReferencePoint.rest_height_m")
	}
}

// PointMetrics are one reference point's figures on one road case.
type PointMetrics struct {
	Name string
	// HeightAtSpeed is the point's height above the ground at the
	// operating point (m): its rest height plus the body's rise there
	// under downforce.
	HeightAtSpeed float64
	Shift         float64 // mean height change from jacking, + up (m)
	SD            float64 // height standard deviation relative to the ground (m)
	// ContactProbability is P(height < 0) = Φ(-(HeightAtSpeed + Shift)/SD),
	// a Gaussian tail (-).
	ContactProbability float64
}

// Indices of the platform basis g = (h_f, h_r, r_f, r_r) (see
// ReferencePoint): the ride heights and the roll relative to each axle's
// road.
const nPlatform = 4

// platformRows are what a case needs to turn the platform covariance into
// the aero figures: the rows of total downforce and of balance in the ride
// heights, and each point's row in g.
type platformRows struct {
	downforce [2]float64 // dD = downforce · dh (N/m)
	balance   [2]float64 // dβ = balance · dh (1/m)
	points    [MaxReferencePoints]pointRow
	nPoints   int
}

// pointRow is one reference point's row in g, its height at the
// operating point and its rise per unit state (for the jacking shift).
type pointRow struct {
	name   string
	g      [nPlatform]float64
	height float64
	rise   [nDOF]float64
}

// newPlatformRows linearises the downforce and the balance at the
// operating point, and places the reference points.
//
// With K_a = -∂F/∂h at speed, a ride-height change dh changes the axle
// loads by dF = -K_a dh, the total D = F_f + F_r by dD = -1ᵀ K_a dh and
// the balance β = F_f / D (front share) by
//
//	dβ = ((1-β) dF_f - β dF_r) / D
//
// (first order; the quotient rule). Without downforce the balance is
// undefined and its row is 0.
func newPlatformRows(v *Vehicle, op *OperatingPoint) platformRows {
	var pr platformRows
	ka := &op.AeroStiffness
	d := op.Downforce[0] + op.Downforce[1]
	for b := 0; b < 2; b++ {
		pr.downforce[b] = -(ka[0][b] + ka[1][b])
		if d > 0 {
			beta := op.Downforce[0] / d
			pr.balance[b] = -((1-beta)*ka[0][b] - beta*ka[1][b]) / d
		}
	}
	l := v.Wheelbase()
	for i := range v.ReferencePoints {
		if i == MaxReferencePoints {
			break
		}
		r := &v.ReferencePoints[i]
		s := r.fraction(l)
		row := pointRow{name: r.Name, g: [nPlatform]float64{1 - s, s, r.Y * (1 - s), r.Y * s}}
		row.rise = [nDOF]float64{1, v.CGToFrontAxle - s*l, r.Y - v.CGLateral}
		row.height = r.RestHeight
		for a := 0; a < nDOF; a++ {
			row.height += row.rise[a] * op.state[a]
		}
		pr.points[i] = row
		pr.nPoints = i + 1
	}
	return pr
}

// Balance is the front share of the downforce at the operating point,
// F_f / (F_f + F_r) (-); 0 without downforce.
func (op *OperatingPoint) Balance() float64 {
	if d := op.Downforce[0] + op.Downforce[1]; d > 0 {
		return op.Downforce[0] / d
	}
	return 0
}

// platformCovariance is the covariance of g = (h_f, h_r, r_f, r_r) from
// the variances of the platform outputs: the four variances and, by
// polarisation, cov(g_i, g_j) = (var(g_i + g_j) - var g_i - var g_j) / 2.
// Every spectrum integrated is a variance (non-negative), so the analytic
// tails of the grid apply to each.
func platformCovariance(v *[nOut]float64) (c [nPlatform][nPlatform]float64) {
	diag := [nPlatform]float64{v[outRide], v[outRide+1], v[outRollAxle], v[outRollAxle+1]}
	k := 0
	for i := 0; i < nPlatform; i++ {
		c[i][i] = diag[i]
		for j := i + 1; j < nPlatform; j++ {
			c[i][j] = (v[outPlatformPair+k] - diag[i] - diag[j]) / 2
			c[j][i] = c[i][j]
			k++
		}
	}
	return c
}

// quadratic is uᵀ C u over the first n coordinates.
func quadratic(u []float64, c *[nPlatform][nPlatform]float64) float64 {
	s := 0.0
	for i := range u {
		for j := range u {
			s += u[i] * c[i][j] * u[j]
		}
	}
	return s
}

// fillPlatform fills the aero figures of m from the output variances v and
// the mean displacement xbar of the jacking.
func (pr *platformRows) fillPlatform(m *CaseMetrics, v *[nOut]float64, xbar *[nDOF]float64, threshold float64) {
	c := platformCovariance(v)
	m.RideHeightCovariance = c[0][1]
	m.DownforceSD = math.Sqrt(math.Max(0, quadratic(pr.downforce[:], &c)))
	m.BalanceSD = math.Sqrt(math.Max(0, quadratic(pr.balance[:], &c)))
	sh := &m.RideHeightShift
	m.DownforceShift = pr.downforce[0]*sh[0] + pr.downforce[1]*sh[1]
	m.BalanceShift = pr.balance[0]*sh[0] + pr.balance[1]*sh[1]
	m.NumPoints = pr.nPoints
	for i := 0; i < pr.nPoints; i++ {
		row := &pr.points[i]
		pm := PointMetrics{Name: row.name, HeightAtSpeed: row.height}
		for a := 0; a < nDOF; a++ {
			pm.Shift += row.rise[a] * xbar[a]
		}
		pm.SD = math.Sqrt(math.Max(0, quadratic(row.g[:], &c)))
		// P(h + X < 0) = P(X > h) for X ~ N(0, σ²) symmetric: Φ(-h/σ).
		pm.ContactProbability = tailProb(pm.HeightAtSpeed+pm.Shift, pm.SD)
		if pm.ContactProbability > threshold {
			m.Warnings |= WarnFloorContact
		}
		m.Points[i] = pm
	}
}

// ReferencePoints returns the case's reference-point figures (a slice of
// m.Points; do not keep it past the next evaluation into m).
func (m *CaseMetrics) ReferencePoints() []PointMetrics { return m.Points[:m.NumPoints] }

// MaxFloorContact is the largest contact probability over the case's
// reference points (0 without points).
func (m *CaseMetrics) MaxFloorContact() float64 {
	worst := 0.0
	for _, p := range m.ReferencePoints() {
		worst = math.Max(worst, p.ContactProbability)
	}
	return worst
}
