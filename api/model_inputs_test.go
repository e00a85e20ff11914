package api

import (
	"errors"
	"testing"

	"google.golang.org/grpc/status"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
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
	setup := &pb.Setup{Front: axleToProto(study.DefaultAxle()), Rear: axleToProto(study.DefaultAxle())}
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

	// A command in the user's process gets the problems with the
	// request's paths, and no status: no server is involved.
	spec.Vehicle.SprungMassKg = -1
	_, err = SpecToModel(spec)
	if _, ok := status.FromError(err); ok {
		t.Errorf("SpecToModel of a bad spec gave a status: %v", err)
	}
	if v := modelViolations(t, "bad spec", err); len(v) != 1 || v[0] != "spec.vehicle.sprung_mass_kg" {
		t.Errorf("violations %v", v)
	}
	_, err = SetupToModel(&pb.Setup{Front: setup.Front}, "setup")
	if v := modelViolations(t, "no rear", err); len(v) != 1 || v[0] != "setup.rear" {
		t.Errorf("violations %v", v)
	}
}

// modelViolations returns the field paths of a *model.ValidationError.
func modelViolations(t *testing.T, what string, err error) []string {
	t.Helper()
	var ve *model.ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("%s: error %v (%T) is not a *model.ValidationError", what, err, err)
	}
	var out []string
	for _, q := range ve.Problems {
		if q.Reason == "" {
			t.Errorf("%s: problem at %s has no reason", what, q.Field)
		}
		out = append(out, q.Field)
	}
	return out
}

func setup2(t *testing.T) *testBundle { return setup(t, Options{}) }
