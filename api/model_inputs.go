package api

import (
	pb "dampfront/api/gen/dampfront/v1"
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
// SubmitJob does (an InvalidArgument status whose BadRequest paths start
// with "spec.") and returns it in the model's types.
func SpecToModel(spec *pb.JobSpec) (*ModelInputs, error) {
	pl, err := compile(spec, "spec.")
	if err != nil {
		return nil, err
	}
	in := &ModelInputs{
		Vehicle:     *pl.eval.Vehicle(),
		Options:     model.EvaluatorOptions{Grid: gridFromProto(pl.spec.GetGrid())},
		Design:      *pl.study.Design(),
		Objectives:  pl.study.Objectives(),
		Constraints: pl.study.Constraints(),
		Adjustment:  pl.adjustment,
		Evaluator:   pl.eval,
	}
	for i := 0; i < pl.eval.Cases(); i++ {
		in.RoadCases = append(in.RoadCases, *pl.eval.Case(i))
	}
	return in, nil
}

// SetupToModel converts and checks a setup; problems are an
// InvalidArgument status whose paths start with prefix (e.g. "setup").
func SetupToModel(s *pb.Setup, prefix string) (model.Setup, error) {
	var p problems
	out := setupFromProto(s, prefix, &p)
	if err := p.err(); err != nil {
		return out, err
	}
	p.mergeModel(under(prefix+"."), out.Validate())
	return out, p.err()
}
