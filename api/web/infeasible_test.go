package web

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestInfeasibleText checks the verdict's wording and trade units on a
// job made by hand: a jacking limit of 3 mm missed by 0.42 mm on one case,
// and the badge, which must not be the green "succeeded".
func TestInfeasibleText(t *testing.T) {
	t.Parallel()
	j := &pb.Job{State: pb.JobState_JOB_STATE_SUCCEEDED, Infeasible: true, Closest: []*pb.ConstraintShortfall{{
		Kind: pb.ConstraintKind_CONSTRAINT_KIND_JACKING, Limit: 0.003, Worst: 0.00342, Over: 0.00042,
		RoadCase: "Port Vellan streets", Violation: 0.14,
	}}}
	want := "Infeasible: no setup met ride-height shift ≤ 3.00 mm; the closest was 0.42 mm over the limit (Port Vellan streets)"
	if got := InfeasibleText(j); got != want {
		t.Errorf("verdict\n%q\nwant\n%q", got, want)
	}
	if b := badge(j); b != "infeasible" {
		t.Errorf("badge %q, want infeasible", b)
	}
	j.Infeasible = false
	if got, b := InfeasibleText(j), badge(j); got != "" || b != "succeeded" {
		t.Errorf("feasible job: verdict %q, badge %q; want none and succeeded", got, b)
	}
}
