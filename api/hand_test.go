package api

import (
	"math"
	"slices"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// The hand method agrees with the damper curves a job reports for the
// same setup on the demo car (testdata/demo-job.yaml): per corner the
// low-speed slopes, the force at the knee (50 mm/s, a table point every
// 25 mm/s) and the adjuster band's forces there. The solution comes from
// the path every front point takes (study.Plan.Evaluate). Tolerance relative
// 1e-12: the same products in another order.
func TestEstimateByHandAgreesWithJobCurves(t *testing.T) {
	t.Parallel()
	spec := readDemoJob(t, "demo-job.yaml")
	pl, err := compileSpec(proto.Clone(spec).(*pb.JobSpec))
	if err != nil {
		t.Fatal(err)
	}
	s := model.Setup{Axles: pl.Problem().Design().Decode([]float64{0.62, 0.91, 0.48, 0.77}).Axles}
	sol := solutionToProto(pl.Evaluate(s))
	resp, err := EstimateByHand(&pb.EstimateByHandRequest{Vehicle: spec.GetVehicle(), Targets: sol.GetSetup(), Adjustment: spec.GetAdjustment()})
	if err != nil {
		t.Fatal(err)
	}
	curves := sol.GetDamperCurves()
	if len(curves) != 4 || len(resp.GetCorners()) != 4 {
		t.Fatalf("%d curves, %d hand corners", len(curves), len(resp.GetCorners()))
	}
	at := func(dc *pb.DamperCurve, f []float64, v float64) float64 {
		for k, x := range dc.GetVelocityMPerS() {
			if math.Abs(x-v) < 1e-12 {
				return f[k]
			}
		}
		t.Fatalf("no table point at %g m/s", v)
		return 0
	}
	for i, hc := range resp.GetCorners() {
		dc := curves[i]
		bu, re := hc.GetBump(), hc.GetRebound()
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"bump slope", bu.GetSlopeNSPerM(), dc.GetBumpSlopeNSPerM()},
			{"rebound slope", re.GetSlopeNSPerM(), dc.GetReboundSlopeNSPerM()},
			{"bump knee force", bu.GetKneeForceN(), at(dc, dc.GetForceN(), bu.GetKneeMPerS())},
			{"rebound knee force", -re.GetKneeForceN(), at(dc, dc.GetForceN(), -re.GetKneeMPerS())},
			{"stiffest bump at the knee", bu.GetStiffestKneeForceN(), at(dc, dc.GetStiffestForceN(), bu.GetKneeMPerS())},
			{"softest rebound at the knee", -re.GetSoftestKneeForceN(), at(dc, dc.GetSoftestForceN(), -re.GetKneeMPerS())},
			{"high-speed slope", bu.GetHighSpeedSlopeNSPerM(), dc.GetBumpSlopeNSPerM() * dc.GetHighSpeedBumpFactor()},
		} {
			if math.Abs(c.got-c.want) > 1e-12*math.Abs(c.want) {
				t.Errorf("%v %s: hand %.12g, job's curve %.12g", hc.GetCorner(), c.name, c.got, c.want)
			}
		}
	}
	if len(resp.GetModes()) != 3 || resp.GetModes()[2].GetReason() == "" || resp.GetCaution() == "" {
		t.Errorf("modes %v, caution %q", resp.GetModes(), resp.GetCaution())
	}
}

// Through the server: the defaults are common practice, and bad input is
// InvalidArgument naming each field by its request path.
func TestEstimateByHandRPC(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	ctx := testContext(t)
	spec := testSpec(1)
	resp, err := b.client.EstimateByHand(ctx, &pb.EstimateByHandRequest{Vehicle: spec.GetVehicle()})
	if err != nil {
		t.Fatal(err)
	}
	if f := resp.GetTargets().GetFront(); f.GetBumpRatio() != model.HandBumpRatio || f.GetHighSpeedReboundFactor() != model.HandHighSpeedFactor ||
		resp.GetAdjustment().GetReboundStiffestRatio() != model.HandStiffestRatio {
		t.Errorf("defaults not filled in: %v %v", resp.GetTargets(), resp.GetAdjustment())
	}
	bad := proto.Clone(spec.GetVehicle()).(*pb.Vehicle)
	bad.Corners[2].TyreRateNPerM = -1
	targets := proto.Clone(resp.GetTargets()).(*pb.Setup)
	targets.Rear.BumpRatio = 0
	_, err = b.client.EstimateByHand(ctx, &pb.EstimateByHandRequest{Vehicle: bad, Targets: targets,
		Adjustment: &pb.Adjustment{BumpSoftestRatio: 0.9, BumpStiffestRatio: 0.5}, SpeedMPerS: -3})
	got := violations(t, "bad hand request", err)
	for _, f := range []string{"vehicle.corners[2].tyre_rate_n_per_m", "targets.rear.bump_ratio", "adjustment.bump_stiffest_ratio", "speed_m_per_s"} {
		if !slices.Contains(got, f) {
			t.Errorf("no violation at %s in %v", f, got)
		}
		if err := resolvePath((&pb.EstimateByHandRequest{}).ProtoReflect().Descriptor(), f); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}
