package api

import (
	"context"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/model"
)

// ModelInputs are a job spec in the model's types, for callers that run
// the model in their own process (the time-domain check, spectra plots).
type ModelInputs struct {
	Vehicle     model.Vehicle
	RoadCases   []model.RoadCase
	Options     model.EvaluatorOptions // the spec's grid
	Design      model.DesignSpace
	Objectives  []model.Objective
	Constraints []model.Constraint
	Adjustment  model.Adjustment
	// Evaluator is the car on the road cases, ready to use.
	Evaluator *model.Evaluator
}

// SpecToModel fills in the defaults of spec, checks all of it as
// SubmitJob does and returns it in the model's types, for a command that
// runs the model in its own process. Problems are a *model.ValidationError
// whose paths are the request's ("spec.vehicle.sprung_mass_kg"), not a
// status: no server is involved. A spec with uncertainty is checked
// whole, and its nominal car returned.
func SpecToModel(spec *pb.JobSpec) (*ModelInputs, error) {
	var p problems
	s := specFromProto(spec, "spec.", &p)
	c, err := study.Check(s)
	p.mergeModel(under("spec."), err)
	if err := p.validationError(); err != nil {
		return nil, err
	}
	// The inputs are the nominal car's: an uncertain car is not built.
	pl, err := c.Nominal().Compile(context.Background())
	if err != nil {
		p.mergeModel(under("spec."), err)
		return nil, p.validationError()
	}
	in := &ModelInputs{
		Vehicle:     *pl.Evaluator().Vehicle(),
		RoadCases:   pl.RoadCases(),
		Options:     pl.EvaluatorOptions(),
		Design:      *pl.Problem().Design(),
		Objectives:  pl.Problem().Objectives(),
		Constraints: pl.Problem().Constraints(),
		Adjustment:  pl.Spec().Adjustment,
		Evaluator:   pl.Evaluator(),
	}
	return in, nil
}

// SetupToModel converts and checks a setup; problems are a
// *model.ValidationError whose paths start with prefix (e.g. "setup").
func SetupToModel(s *pb.Setup, prefix string) (model.Setup, error) {
	var p problems
	out := setupArgument(s, prefix, &p)
	return out, p.validationError()
}
