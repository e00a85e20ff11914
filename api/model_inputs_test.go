package api

import (
	"testing"

	"google.golang.org/grpc/codes"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// SpecToModel is the server's own conversion: the same spec gives the
// same metrics in-process as through EvaluateSetups (bit for bit: one
// code path, one evaluation order).
func TestSpecToModelMatchesTheServer(t *testing.T) {
	t.Parallel()
	spec := testSpec(2)
	in, err := SpecToModel(spec)
	if err != nil {
		t.Fatal(err)
	}
	if in.Vehicle.Corners[model.RL].TyreRate != 330e3 || len(in.RoadCases) != 2 || in.Options.Grid.Points != 121 {
		t.Errorf("converted %+v", in)
	}
	setup := &pb.Setup{Front: defaultAxle(), Rear: defaultAxle()}
	setup.Front.BumpRatio, setup.Front.ReboundRatio = 0.5, 0.8
	setup.Rear.BumpRatio, setup.Rear.ReboundRatio = 0.6, 0.9
	s, err := SetupToModel(setup, "setup")
	if err != nil {
		t.Fatal(err)
	}
	var r model.Result
	if err := in.Evaluator.Evaluate(s, &r); err != nil {
		t.Fatal(err)
	}
	b := setup2(t)
	resp, err := b.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}, Setups: []*pb.Setup{setup}, View: pb.SolutionView_SOLUTION_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	got := resp.GetEvaluations()[0].GetCaseMetrics()[1].GetCorners()[model.FL].GetTyreLoadSdN()
	if got != r.Cases[1].TyreLoadSD[model.FL] {
		t.Errorf("EvaluateSetups FL tyre load sd %v, in-process %v", got, r.Cases[1].TyreLoadSD[model.FL])
	}

	spec.Vehicle.SprungMassKg = -1
	_, err = SpecToModel(spec)
	wantCode(t, "bad spec", err, codes.InvalidArgument, "INVALID_ARGUMENT")
	if v := violations(t, "bad spec", err); len(v) != 1 || v[0] != "spec.vehicle.sprung_mass_kg" {
		t.Errorf("violations %v", v)
	}
	_, err = SetupToModel(&pb.Setup{Front: setup.Front}, "setup")
	if v := violations(t, "no rear", err); len(v) != 1 || v[0] != "setup.rear" {
		t.Errorf("violations %v", v)
	}
}

func setup2(t *testing.T) *testBundle { return setup(t, Options{}) }
