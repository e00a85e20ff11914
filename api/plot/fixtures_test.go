package plot

import (
	"math"

	pb "dampfront/api/gen/dampfront/v1"
)

// Hand-built inputs of the chart tests: an invented front whose grip gets
// worse and platform better as every damping ratio rises, as on a real
// car (more damping holds the body and loads the tyres harder).

var (
	objGrip     = &pb.Objective{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}
	objPlatform = &pb.Objective{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM}
	objPitch    = &pb.Objective{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PITCH, Aggregation: pb.Aggregation_AGGREGATION_WORST}
)

// testFront has n solutions along t in [0, 1]: grip 4.5 % to 8.5 % of
// static load, platform 3.7 mm down to 1.2 mm, and with three objectives
// a pitch variation that is smallest in the middle.
func testFront(n, objectives int) *pb.Front {
	f := &pb.Front{
		Job:        "jobs/test-front",
		GeneNames:  []string{"front_bump_ratio", "front_rebound_ratio", "rear_bump_ratio", "rear_rebound_ratio"},
		Objectives: []*pb.Objective{objGrip, objPlatform},
		TotalSize:  int32(n),
	}
	if objectives == 3 {
		f.Objectives = append(f.Objectives, objPitch)
	}
	for i := range n {
		t := 0.0
		if n > 1 {
			t = float64(i) / float64(n-1)
		}
		g := []float64{0.35 + 0.9*t, 0.6 + 0.7*t, 0.5 + 0.4*t*t, 0.75 + 0.3*t}
		z := []float64{0.045 + 0.04*t, 0.0012 + 0.0025*(1-t)*(1-t)}
		if objectives == 3 {
			z = append(z, 0.0008+0.0012*math.Abs(t-0.45))
		}
		f.Solutions = append(f.Solutions, &pb.Solution{
			Index: int32(i), Genes: g, Objectives: z, Feasible: true,
			Setup: &pb.Setup{
				Front: &pb.AxleDamping{BumpRatio: g[0], ReboundRatio: g[1]},
				Rear:  &pb.AxleDamping{BumpRatio: g[2], ReboundRatio: g[3]},
			},
		})
	}
	return f
}

// pieceForce is the piecewise-linear damper law at the component, written
// out independently of the model: slope c up to the knee vk, r c above it,
// odd in v with the rebound slope on the negative side.
func pieceForce(v, cb, cr, vk, r float64) float64 {
	c := cb
	if v < 0 {
		c = cr
	}
	a := math.Abs(v)
	f := c * a
	if vk > 0 && a > vk {
		f = c*vk + r*c*(a-vk)
	}
	return math.Copysign(f, v)
}

// testCurve tabulates one corner's curve from -0.3 to 0.3 m/s at 61
// points, with a band of 0.6 to 1.6 times the baseline slopes when band.
func testCurve(corner pb.CornerPosition, cb, cr, knee float64, band bool) *pb.DamperCurve {
	const n, vmax, r = 61, 0.3, 0.5
	c := &pb.DamperCurve{Corner: corner, BumpSlopeNSPerM: cb, ReboundSlopeNSPerM: cr,
		KneeBumpMPerS: knee, KneeReboundMPerS: knee, HighSpeedBumpFactor: r, HighSpeedReboundFactor: r}
	for k := range n {
		v := -vmax + 2*vmax*float64(k)/(n-1)
		c.VelocityMPerS = append(c.VelocityMPerS, v)
		c.ForceN = append(c.ForceN, pieceForce(v, cb, cr, knee, r))
		if band {
			c.SoftestForceN = append(c.SoftestForceN, pieceForce(v, 0.6*cb, 0.6*cr, knee, r))
			c.StiffestForceN = append(c.StiffestForceN, pieceForce(v, 1.6*cb, 1.6*cr, knee, r))
		}
	}
	return c
}

// testCurves are a car's four curves: equal sides at the front, the rear
// right with a stiffer table (an asymmetric motion ratio).
func testCurves() []*pb.DamperCurve {
	return []*pb.DamperCurve{
		testCurve(pb.CornerPosition_CORNER_POSITION_FRONT_LEFT, 4200, 7000, 0.05, true),
		testCurve(pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT, 4200, 7000, 0.05, true),
		testCurve(pb.CornerPosition_CORNER_POSITION_REAR_LEFT, 5200, 8600, 0.06, true),
		testCurve(pb.CornerPosition_CORNER_POSITION_REAR_RIGHT, 5600, 9200, 0.06, true),
	}
}
