package api

import (
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/optimizer"
)

// TestDifferentialVariationSpec checks the path of the variation settings
// from a spec to the search: the README's spec line decodes, a spec that leaves the variation unset stores
// none of its fields (so specs stored before them keep their bytes, see
// TestStoredSpecsResumeBitIdentical), one with VARIATION_DIFFERENTIAL
// stores F = 0.5 and CR = 1 and hands them to the optimiser, and a seeded
// differential job gives the same front bit for bit run in one go and
// resumed from its checkpoint every 2 generations.
func TestDifferentialVariationSpec(t *testing.T) {
	t.Parallel()
	base := &pb.JobSpec{Vehicle: testVehicle(), RoadCases: testRoadCases(),
		Search: &pb.SearchSettings{PopulationSize: 8, Generations: 5, Seed: proto.Uint64(3)}}
	sbx := withDefaults(base).GetSearch()
	if sbx.Variation != pb.Variation_VARIATION_UNSPECIFIED || sbx.DifferentialWeight != nil || sbx.DifferentialCrossover != nil {
		t.Errorf("defaults of an SBX spec: variation %v, weight %v, crossover %v; want all unset",
			sbx.Variation, sbx.DifferentialWeight, sbx.DifferentialCrossover)
	}

	// The README's line for an efficient search.
	var readme pb.JobSpec
	if err := DecodeText([]byte("search: {population_size: 24, variation: VARIATION_DIFFERENTIAL}\n"), &readme); err != nil {
		t.Fatal(err)
	}
	if q := readme.GetSearch(); q.GetVariation() != pb.Variation_VARIATION_DIFFERENTIAL || q.GetPopulationSize() != 24 {
		t.Errorf("README's search line decodes to %v", q)
	}
	de := proto.Clone(base).(*pb.JobSpec)
	de.Search.Variation = readme.GetSearch().GetVariation()
	q := withDefaults(de).GetSearch()
	if q.GetDifferentialWeight() != optimizer.DefaultDifferentialWeight || q.GetDifferentialCrossover() != optimizer.DefaultDifferentialCrossover ||
		q.DifferentialWeight == nil || q.DifferentialCrossover == nil {
		t.Errorf("defaults of a differential spec: weight %v, crossover %v; want 0.5 and 1 stored",
			q.DifferentialWeight, q.DifferentialCrossover)
	}
	pl, err := compileSpec(de)
	if err != nil {
		t.Fatal(err)
	}
	s := pl.Settings(1, nil)
	if s.Variation != optimizer.VariationDifferential || s.DifferentialWeight != 0.5 || s.DifferentialCrossover != 1 {
		t.Errorf("optimiser settings: variation %v, F %v, CR %v", s.Variation, s.DifferentialWeight, s.DifferentialCrossover)
	}

	spec, err := MarshalSpec(de)
	if err != nil {
		t.Fatal(err)
	}
	oneGo, resumed := frontOf(t, spec, 100, false), frontOf(t, spec, 2, true)
	if a, b := frontDigest(oneGo), frontDigest(resumed); a != b {
		t.Errorf("differential job: front run in one go %s, resumed every 2 generations %s", a, b)
	}
	sbxSpec, err := MarshalSpec(base)
	if err != nil {
		t.Fatal(err)
	}
	if frontDigest(frontOf(t, sbxSpec, 100, false)) == frontDigest(oneGo) {
		t.Error("the differential job gives the SBX job's front: the variation did not reach the search")
	}
}
