package api

import (
	"slices"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// hardwareSpec is testSpec with nine-click low-speed adjusters from 1.2
// (click 0) to 0.4 in both directions, a two-stage bump curve with
// friction and gas force on the front base axle, and snapping on.
func hardwareSpec() *pb.JobSpec {
	s := testSpec(2)
	lo := &pb.Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4}
	d := &pb.DamperAdjusters{LowBump: lo, LowRebound: lo}
	s.Adjusters = &pb.Adjusters{Front: d, Rear: d}
	s.DesignSpace = &pb.DesignSpace{SnapToClicks: true, Base: &pb.Setup{
		Front: &pb.AxleDamping{KneeBumpMPerS: 0.04, HighSpeedBumpFactor: 0.5, KneeReboundMPerS: 0.05, HighSpeedReboundFactor: 0.6,
			StagesBump: []*pb.DamperStage{{VelocityMPerS: 0.15, Factor: 0.3}}, FrictionN: 40, GasForceN: 180},
		Rear: &pb.AxleDamping{KneeBumpMPerS: 0.05, KneeReboundMPerS: 0.05, HighSpeedBumpFactor: 0.5, HighSpeedReboundFactor: 0.5},
	}}
	return s
}

// TestEvaluatedSetupsShowClicksAndTheBand: EvaluateSetups answers the
// clicks of each corner (nearest click, worked by hand: step 0.1) and
// flags a setup beyond the stiffest click, with a warning; the hardware
// comes back in the curves.
func TestEvaluatedSetupsShowClicksAndTheBand(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	spec := hardwareSpec()
	su := proto.Clone(spec.DesignSpace.Base).(*pb.Setup)
	su.Front.BumpRatio, su.Front.ReboundRatio, su.Rear.BumpRatio, su.Rear.ReboundRatio = 1.5, 0.81, 0.62, 0.4
	resp, err := b.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec},
		Setups: []*pb.Setup{su}, View: pb.SolutionView_SOLUTION_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	sol := resp.GetEvaluations()[0]
	var got []string
	for _, c := range sol.GetClicks() {
		got = append(got, ClicksText(c))
	}
	want := []string{"FL: LS bump 0, LS rebound 4", "FR: LS bump 0, LS rebound 4", "RL: LS bump 6, LS rebound 8", "RR: LS bump 6, LS rebound 8"}
	if !slices.Equal(got, want) {
		t.Errorf("clicks %q, want %q", got, want)
	}
	if ob := sol.GetOutOfBand(); len(ob) != 2 || !ob[0].GetAbove() || ob[0].GetRebound() || ob[0].GetCorner() != pb.CornerPosition_CORNER_POSITION_FRONT_LEFT {
		t.Errorf("out of band %v, want front bump above the stiffest on both sides", ob)
	}
	warned := false
	for _, w := range sol.GetWarnings() {
		warned = warned || strings.HasPrefix(w, "outside the adjuster range: FL bump")
	}
	if !warned {
		t.Errorf("warnings %q", sol.GetWarnings())
	}
	fl := sol.GetDamperCurves()[0]
	if len(fl.GetStagesBump()) != 1 || fl.GetFrictionN() != 40 || fl.GetGasForceN() != 180 {
		t.Errorf("front-left curve hardware: stages %v, friction %g, gas %g", fl.GetStagesBump(), fl.GetFrictionN(), fl.GetGasForceN())
	}
}

// TestStoredFrontShowsClicks: a job that snaps to clicks stores setups
// on their clicks, and GetFront answers the clicks of each.
func TestStoredFrontShowsClicks(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	job := b.submit(t, hardwareSpec())
	if _, final := b.watch(t, job.GetName()); final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("job ended %v", final.GetState())
	}
	front, _ := b.wholeFront(t, job.GetName(), 100)
	for _, sol := range front.GetSolutions() {
		if len(sol.GetClicks()) != 4 {
			t.Fatalf("solution %d: clicks %v", sol.GetIndex(), sol.GetClicks())
		}
		c := sol.GetClicks()[0]
		want := 1.2 - 0.1*float64(c.GetLowBump())
		if d := sol.GetSetup().GetFront().GetBumpRatio() - want; d > 1e-12 || d < -1e-12 {
			t.Errorf("solution %d: front bump ratio %g is not on its click %d (%g)", sol.GetIndex(), sol.GetSetup().GetFront().GetBumpRatio(), c.GetLowBump(), want)
		}
		if len(sol.GetOutOfBand()) != 0 {
			t.Errorf("solution %d on its clicks is out of band: %v", sol.GetIndex(), sol.GetOutOfBand())
		}
	}
}

// TestBadHardwareNamesTheField: bad hardware and adjusters in a spec are
// refused, each naming its field in the request.
func TestBadHardwareNamesTheField(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	spec := hardwareSpec()
	f := spec.DesignSpace.Base.Front
	f.StagesBump = []*pb.DamperStage{{VelocityMPerS: 0.15, Factor: 0.3}, {VelocityMPerS: 0.1, Factor: 0.2}}
	f.FrictionN = -3
	spec.Adjusters.Rear = &pb.DamperAdjusters{LowBump: &pb.Adjuster{Clicks: 3, Dyno: &pb.DynoTable{VelocityMPerS: []float64{0.05, 0.1},
		Rows: []*pb.DynoRow{{ForceN: []float64{500, 800}}, {ForceN: []float64{550, 700}}, {ForceN: []float64{300}}}}}}
	_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
	got := violations(t, "bad hardware", err)
	want := []string{
		"spec.adjusters.rear.low_bump.dyno.rows[1].force_n[0]",
		"spec.adjusters.rear.low_bump.dyno.rows[2].force_n",
		"spec.design_space.base.front.friction_n",
		"spec.design_space.base.front.stages_bump[1].velocity_m_per_s",
	}
	slices.Sort(got)
	if !slices.Equal(got, want) {
		t.Errorf("violations %q, want %q", got, want)
	}
	md := (&pb.SubmitJobRequest{}).ProtoReflect().Descriptor()
	for _, v := range got {
		if err := resolvePath(md, v); err != nil {
			t.Errorf("%s: %v", v, err)
		}
	}
}
