package api

import (
	"slices"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// normalisedSpec is the test job with its grip objective normalised
// against ref (nil for the default reference).
func normalisedSpec(ref *pb.Setup) *pb.JobSpec {
	spec := testSpec(6)
	spec.Objectives = []*pb.Objective{
		{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP, Aggregation: pb.Aggregation_AGGREGATION_NORMALISED},
		{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM},
	}
	spec.ReferenceSetup = ref
	return spec
}

// A job with a normalised grip objective and a reference setup is
// accepted, stores both, and its front differs from the same job's under
// the mean square: the two road cases differ in roughness (the second
// is four times rougher, see testRoadCases), so weighing each by its
// change relative to the reference moves the optimum (model.Aggregation
// gives both definitions).
func TestNormalisedAggregationRuns(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	job := b.submit(t, normalisedSpec(testSetup()))
	stored := job.GetSpec()
	if stored.GetObjectives()[0].GetAggregation() != pb.Aggregation_AGGREGATION_NORMALISED ||
		!proto.Equal(stored.GetReferenceSetup(), testSetup()) {
		t.Fatalf("stored spec: objectives %v, reference %v", stored.GetObjectives(), stored.GetReferenceSetup())
	}
	plain := testSpec(6)
	plain.Objectives = normalisedSpec(nil).Objectives
	plain.Objectives[0].Aggregation = pb.Aggregation_AGGREGATION_MEAN_SQUARE
	other := b.submit(t, plain)
	for _, j := range []*pb.Job{job, other} {
		if _, final := b.watch(t, j.GetName()); final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
			t.Fatalf("job %s ended %v", j.GetName(), final)
		}
	}
	a, _ := b.wholeFront(t, job.GetName(), 0)
	m, _ := b.wholeFront(t, other.GetName(), 0)
	if len(a.GetSolutions()) == 0 || len(m.GetSolutions()) == 0 {
		t.Fatal("empty front")
	}
	if a.GetObjectives()[0].GetAggregation() != pb.Aggregation_AGGREGATION_NORMALISED {
		t.Errorf("front's objectives %v", a.GetObjectives())
	}
	same := len(a.GetSolutions()) == len(m.GetSolutions())
	for i := 0; same && i < len(a.GetSolutions()); i++ {
		same = slices.Equal(a.GetSolutions()[i].GetGenes(), m.GetSolutions()[i].GetGenes())
	}
	if same {
		t.Error("the normalised front has the mean square's genes")
	}
}

// A normalised job without a reference setup stores the default, the
// middle of the design bounds; a job with no normalised objective stores
// none, so its stored spec is as before.
func TestNormalisedDefaultReference(t *testing.T) {
	t.Parallel()
	got := withDefaults(normalisedSpec(nil)).GetReferenceSetup()
	mid := (0.2 + 1.6) / 2 // the default ratio bounds, study.DefaultRatioMin and Max
	if got.GetFront().GetBumpRatio() != mid || got.GetRear().GetReboundRatio() != mid || got.GetFront().GetKneeBumpMPerS() != 0.05 {
		t.Errorf("default reference %v, want ratios %g and the default base", got, mid)
	}
	if r := withDefaults(testSpec(6)).GetReferenceSetup(); r != nil {
		t.Errorf("a spec with no normalised objective got the reference %v", r)
	}
}

// A bad reference setup is refused naming its field: a negative ratio,
// a missing axle, and a reference given with no normalised objective.
func TestBadReferenceSetupRefused(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{}, shortSlices)
	neg := testSetup()
	neg.Front.BumpRatio = -0.5
	noRear := testSetup()
	noRear.Rear = nil
	unused := testSpec(6)
	unused.ReferenceSetup = testSetup()
	for _, c := range []struct {
		name string
		spec *pb.JobSpec
		want string
	}{
		{"negative ratio", normalisedSpec(neg), "spec.reference_setup.front.bump_ratio"},
		{"missing axle", normalisedSpec(noRear), "spec.reference_setup.rear"},
		{"not normalised", unused, "spec.reference_setup"},
	} {
		_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: c.spec})
		if got := violations(t, c.name, err); !slices.Equal(got, []string{c.want}) {
			t.Errorf("%s: violations %v, want [%s]", c.name, got, c.want)
		}
	}
}
