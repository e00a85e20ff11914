package main

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// demoGripShares returns each demo road case's share of the grip figure
// under aggregation agg at the middle of the design bounds (the default
// reference) and at the candidate setup of testdata.
func demoGripShares(t *testing.T, agg pb.Aggregation) (middle, candidate []float64) {
	t.Helper()
	e := &env{getenv: func(string) string { return "" }}
	spec := &pb.JobSpec{}
	if err := readMessage(e, testdataPath("demo-job.yaml"), spec); err != nil {
		t.Fatal(err)
	}
	cand := &pb.Setup{}
	if err := readMessage(e, testdataPath("candidate-setup.yaml"), cand); err != nil {
		t.Fatal(err)
	}
	spec.Objectives = []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP, Aggregation: agg}}
	in, err := api.SpecToModel(spec)
	if err != nil {
		t.Fatal(err)
	}
	p, err := model.NewProblem(in.Evaluator, in.Design, in.Objectives, in.Constraints)
	if err != nil {
		t.Fatal(err)
	}
	c, err := api.SetupToModel(cand, "setup")
	if err != nil {
		t.Fatal(err)
	}
	shares := func(s model.Setup) []float64 {
		var r model.Result
		if err := in.Evaluator.Evaluate(s, &r); err != nil {
			t.Fatal(err)
		}
		return p.CaseShares(0, &r)
	}
	return shares(in.Design.Middle()), shares(c)
}

// The demo's road cases' shares of the grip figure under each
// aggregation, as the README quotes them. Checks against the definitions
// of model.Aggregation: shares sum to 1 (tolerance 1e-12, rounding of
// three terms); under the normalised aggregation at its reference setup
// each case's share is its weight over the total, 1/2.5, 1/2.5 and
// 0.5/2.5 (tolerance 1e-12); the worst case takes all. The README's
// mean-square and normalised figures must be these, to 0.1 %.
func TestDemoGripSharesPerAggregation(t *testing.T) {
	t.Parallel()
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	percent := func(s []float64) string {
		return fmt.Sprintf("%.1f %% / %.1f %% / %.1f %%", 100*s[0], 100*s[1], 100*s[2])
	}
	weights := []float64{0.4, 0.4, 0.2}
	for _, agg := range []pb.Aggregation{pb.Aggregation_AGGREGATION_MEAN_SQUARE, pb.Aggregation_AGGREGATION_WORST, pb.Aggregation_AGGREGATION_NORMALISED} {
		mid, cand := demoGripShares(t, agg)
		t.Logf("%v: middle %.3f, candidate %.3f", agg, mid, cand)
		if agg != pb.Aggregation_AGGREGATION_WORST {
			for _, s := range [][]float64{mid, cand} {
				if !strings.Contains(string(readme), percent(s)) {
					t.Errorf("%v: the README does not quote the shares %s", agg, percent(s))
				}
			}
		}
		for _, s := range [][]float64{mid, cand} {
			sum := 0.0
			for _, x := range s {
				sum += x
			}
			if math.Abs(sum-1) > 1e-12 {
				t.Errorf("%v: shares %v sum to %g", agg, s, sum)
			}
		}
		if agg == pb.Aggregation_AGGREGATION_NORMALISED {
			for c, w := range weights {
				if math.Abs(mid[c]-w) > 1e-12 {
					t.Errorf("normalised at its reference: case %d share %g, want its weight share %g", c, mid[c], w)
				}
			}
		}
	}
}
