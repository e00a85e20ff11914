package api

import (
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/optimizer"
)

// specFromProto converts a JobSpec to the study's spec. Problems of shape
// that only the message can have (a missing message, a wrong number of
// corners, a spectrum not set, an enum value out of range) are recorded
// under prefix (for example "spec."); every value is the study's to
// check.
func specFromProto(s *pb.JobSpec, prefix string, p *problems) *study.Spec {
	at := under(prefix)
	out := &study.Spec{
		DisplayName:  s.GetDisplayName(),
		Labels:       s.GetLabels(),
		Vehicle:      vehicleFromProto(s.GetVehicle(), at("vehicle"), p),
		RoadCases:    roadCasesFromProto(s.GetRoadCases(), at("road_cases"), p),
		Manoeuvres:   manoeuvresFromProto(s.GetManoeuvres(), at("manoeuvres"), p),
		Kerbs:        kerbsFromProto(s.GetKerbs(), at("kerbs"), p),
		LoadFraction: s.GetLoadFraction(),
		Grid:         gridFromProto(s.GetGrid()),
		Design:       designFromProto(s.GetDesignSpace(), at("design_space"), p),
		Objectives:   objectivesFromProto(s.GetObjectives(), at("objectives"), p),
		Constraints:  constraintsFromProto(s.GetConstraints(), at("constraints"), p),
		Adjustment:   adjustmentFromProto(s.GetAdjustment()),
		Adjusters:    adjustersFromProto(s.GetAdjusters()),
		Curves:       study.Curves{MaxVelocity: s.GetCurves().GetMaxVelocityMPerS(), Points: int(s.GetCurves().GetPoints())},
		Refinement:   refinementFromProto(s.GetRefinement()),
		Uncertainty:  uncertaintyFromProto(s.GetUncertainty(), at("uncertainty"), p),
	}
	if ref := s.GetReferenceSetup(); ref != nil {
		r := setupFromProto(ref, at("reference_setup"), p)
		out.Reference = &r
	}
	q := s.GetSearch()
	if q == nil {
		return out
	}
	variation, ok := variations[q.GetVariation()]
	if !ok {
		p.add(at("search.variation"), "must be VARIATION_SBX or VARIATION_DIFFERENTIAL, got %d", int32(q.GetVariation()))
	}
	out.Search = study.Search{
		PopulationSize: int(q.GetPopulationSize()),
		Generations:    int(q.GetGenerations()),
		Seed:           q.Seed,
		Islands:        int(q.GetIslands()),
		MigrationEvery: int(q.GetMigrationEvery()),
		Migrants:       int(q.GetMigrants()),

		CrossoverProbability: q.CrossoverProbability,
		CrossoverEta:         q.CrossoverEta,
		MutationProbability:  q.MutationProbability,
		MutationEta:          q.MutationEta,
		ReferencePoint:       cloneOrNil(q.GetReferencePoint()),

		StagnationWindow:    int(q.GetStagnationWindow()),
		StagnationTolerance: q.GetStagnationTolerance(),
		PolishBudget:        int(q.GetPolishBudget()),

		Variation:             variation,
		DifferentialWeight:    q.DifferentialWeight,
		DifferentialCrossover: q.DifferentialCrossover,
	}
	return out
}

// variations maps the spec's variation to the optimiser's; unset is SBX,
// and stays unset in a stored spec.
var variations = map[pb.Variation]optimizer.Variation{
	pb.Variation_VARIATION_UNSPECIFIED:  optimizer.VariationSBX,
	pb.Variation_VARIATION_SBX:          optimizer.VariationSBX,
	pb.Variation_VARIATION_DIFFERENTIAL: optimizer.VariationDifferential,
}

// withDefaults returns a copy of spec with the study's defaults (see
// study.WithDefaults) written into every field it leaves unset. It is
// idempotent: withDefaults(withDefaults(s)) equals withDefaults(s).
func withDefaults(spec *pb.JobSpec) *pb.JobSpec {
	var p problems
	return fillDefaults(spec, study.WithDefaults(specFromProto(spec, "", &p)))
}

// fillDefaults returns a copy of spec with the values of d, the study's
// spec of it with the defaults filled in, in every field spec leaves
// unset. Only the copying is here; which value a field defaults to is
// the study's.
func fillDefaults(spec *pb.JobSpec, d *study.Spec) *pb.JobSpec {
	s := proto.CloneOf(spec)
	if s == nil {
		s = &pb.JobSpec{}
	}
	for i, rc := range s.GetRoadCases() {
		if rc != nil && rc.Weight == 0 {
			rc.Weight = d.RoadCases[i].Weight
		}
	}
	s.Grid = &pb.Grid{MinHz: d.Grid.MinHz, MaxHz: d.Grid.MaxHz, Points: int32(d.Grid.Points)}

	if s.DesignSpace == nil {
		s.DesignSpace = &pb.DesignSpace{}
	}
	ds := s.DesignSpace
	if ds.Ratios == nil {
		ds.Ratios = &pb.RatioBounds{}
	}
	for i, r := range []**pb.Range{&ds.Ratios.FrontBump, &ds.Ratios.FrontRebound, &ds.Ratios.RearBump, &ds.Ratios.RearRebound} {
		if *r == nil {
			*r = &pb.Range{Min: d.Design.Ratios[i].Min, Max: d.Design.Ratios[i].Max}
		}
	}
	if ds.Base == nil {
		ds.Base = &pb.Setup{}
	}
	for ax, a := range []**pb.AxleDamping{&ds.Base.Front, &ds.Base.Rear} {
		if *a == nil {
			*a = axleToProto(*d.Design.Base[ax])
		}
	}

	if len(s.Objectives) == 0 {
		for _, o := range d.Objectives {
			s.Objectives = append(s.Objectives, objectiveToProto(o))
		}
	}
	for i, o := range s.Objectives {
		if o != nil && o.Aggregation == pb.Aggregation_AGGREGATION_UNSPECIFIED {
			o.Aggregation = objectiveToProto(d.Objectives[i]).Aggregation
		}
	}

	if s.ReferenceSetup == nil && d.Reference != nil {
		s.ReferenceSetup = setupToProto(*d.Reference)
	}

	fillUncertaintyDefaults(s.Uncertainty, d.Uncertainty)

	if s.Curves == nil {
		s.Curves = &pb.CurveSettings{}
	}
	if s.Curves.MaxVelocityMPerS == 0 {
		s.Curves.MaxVelocityMPerS = d.Curves.MaxVelocity
	}
	if s.Curves.Points == 0 {
		s.Curves.Points = int32(d.Curves.Points)
	}

	if s.Search == nil {
		s.Search = &pb.SearchSettings{}
	}
	q, dq := s.Search, &d.Search
	if q.PopulationSize == 0 {
		q.PopulationSize = int32(dq.PopulationSize)
	}
	if q.Generations == 0 {
		q.Generations = int32(dq.Generations)
	}
	if q.Seed == nil {
		q.Seed = proto.Uint64(*dq.Seed)
	}
	if q.Islands == 0 {
		q.Islands = int32(dq.Islands)
	}
	if q.Migrants == 0 {
		q.Migrants = int32(dq.Migrants)
	}
	for _, f := range []struct{ to, from **float64 }{
		{&q.CrossoverProbability, &dq.CrossoverProbability}, {&q.CrossoverEta, &dq.CrossoverEta},
		{&q.MutationProbability, &dq.MutationProbability}, {&q.MutationEta, &dq.MutationEta},
		{&q.DifferentialWeight, &dq.DifferentialWeight}, {&q.DifferentialCrossover, &dq.DifferentialCrossover},
	} {
		if *f.to == nil && *f.from != nil {
			*f.to = proto.Float64(**f.from)
		}
	}
	fillRefinementDefaults(s.Refinement, &d.Refinement)
	return s
}
