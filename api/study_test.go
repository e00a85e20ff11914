package api

import (
	"bytes"
	"context"
	"math"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/study"
	"dampfront/model"
)

// sumTol is the relative tolerance of a value recomputed here from the
// reported metrics by a different order of the same sums: a few ulps per
// operation over a handful of terms.
const sumTol = 1e-12

func TestWithDefaultsFillsAndIsIdempotent(t *testing.T) {
	t.Parallel()
	s := withDefaults(&pb.JobSpec{Vehicle: testVehicle(), RoadCases: testRoadCases()})
	q := s.GetSearch()
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"population_size", float64(q.GetPopulationSize()), study.DefaultPopulationSize},
		{"generations", float64(q.GetGenerations()), study.DefaultGenerations},
		{"seed", float64(q.GetSeed()), study.DefaultSeed},
		{"islands", float64(q.GetIslands()), 1},
		{"crossover_probability", q.GetCrossoverProbability(), study.DefaultCrossoverProbability},
		{"mutation_probability (1/4 genes)", q.GetMutationProbability(), 0.25},
		{"ratios.front_bump.min", s.GetDesignSpace().GetRatios().GetFrontBump().GetMin(), study.DefaultRatioMin},
		{"ratios.rear_rebound.max", s.GetDesignSpace().GetRatios().GetRearRebound().GetMax(), study.DefaultRatioMax},
		{"base.front.knee_bump_m_per_s", s.GetDesignSpace().GetBase().GetFront().GetKneeBumpMPerS(), study.DefaultKnee},
		{"base.rear.high_speed_rebound_factor", s.GetDesignSpace().GetBase().GetRear().GetHighSpeedReboundFactor(), study.DefaultHighSpeedFactor},
		{"grid.points", float64(s.GetGrid().GetPoints()), float64(model.DefaultGrid.Points)},
		{"curves.points", float64(s.GetCurves().GetPoints()), study.DefaultCurvePoints},
		{"road_cases[0].weight", s.GetRoadCases()[0].GetWeight(), 1},
		{"road_cases[1].weight (given)", s.GetRoadCases()[1].GetWeight(), 0.5},
		{"objectives", float64(len(s.GetObjectives())), 2},
	} {
		if c.got != c.want {
			t.Errorf("%s = %g, want %g", c.name, c.got, c.want)
		}
	}
	if !proto.Equal(withDefaults(s), s) {
		t.Error("withDefaults is not idempotent")
	}
	a, _ := MarshalSpec(s)
	b, _ := MarshalSpec(withDefaults(s))
	if !bytes.Equal(a, b) {
		t.Error("MarshalSpec differs for a spec and its defaults")
	}
}

// frontOf runs a study from its spec to the end in steps of step
// generations, reopening it from its checkpoint after every step when
// resume is set, and returns its front.
func frontOf(t *testing.T, spec []byte, step int, resume bool) []jobs.Solution {
	t.Helper()
	f, _ := runWithSummary(t, spec, step, resume)
	return f
}

// TestStudyResumeIsBitIdentical runs one seeded spec in one go and in
// steps of two generations through checkpoints and fresh studies; the
// fronts, details included, must be equal byte for byte.
func TestStudyResumeIsBitIdentical(t *testing.T) {
	t.Parallel()
	spec, err := MarshalSpec(testSpec(6))
	if err != nil {
		t.Fatal(err)
	}
	sameResumedFront(t, spec)
}

// sameResumedFront runs spec in one go and in steps of two generations
// through checkpoints and fresh studies, and fails unless the fronts,
// details included, are equal byte for byte.
func sameResumedFront(t *testing.T, spec []byte) {
	t.Helper()
	whole := frontOf(t, spec, 100, false)
	sliced := frontOf(t, spec, 2, true)
	if len(whole) == 0 || len(whole) != len(sliced) {
		t.Fatalf("front sizes %d and %d", len(whole), len(sliced))
	}
	for i := range whole {
		a, b := whole[i], sliced[i]
		if geneKey(a.Genes) != geneKey(b.Genes) || geneKey(a.Objectives) != geneKey(b.Objectives) ||
			geneKey(a.Violations) != geneKey(b.Violations) || !bytes.Equal(a.Detail, b.Detail) || a.Index != i {
			t.Fatalf("solution %d differs after resume", i)
		}
	}
}

// TestFrontDetailIsConsistent decodes the details of a front and checks
// them against the definitions they report on: the grip and platform
// objectives recomputed from the case metrics (definitions of DESIGN.md
// "Optimisation" and model.ObjectiveGrip/ObjectivePlatform), the genes
// decoding to the setup, and the damper curves' low-speed slopes from
// c_crit = 2 sqrt(k m), the critical damping of a mass-spring oscillator
// (W. T. Thomson and M. D. Dahleh, Theory of Vibration with Applications,
// 5th ed., §2.6), referred to the damper by MR².
func TestFrontDetailIsConsistent(t *testing.T) {
	t.Parallel()
	specMsg := testSpec(4)
	spec, _ := MarshalSpec(specMsg)
	front := frontOf(t, spec, 100, false)
	if len(front) == 0 {
		t.Fatal("empty front")
	}
	weights := []float64{1, 0.5} // testRoadCases
	veh := testVehicle()
	for _, s := range front {
		var sol pb.Solution
		if err := proto.Unmarshal(s.Detail, &sol); err != nil {
			t.Fatal(err)
		}
		if len(sol.CaseMetrics) != 2 || len(sol.DamperCurves) != 4 {
			t.Fatalf("solution %d: %d cases, %d curves", s.Index, len(sol.CaseMetrics), len(sol.DamperCurves))
		}
		var grip, plat, wsum float64
		for c, cm := range sol.CaseMetrics {
			g := 0.0
			for _, k := range cm.Corners {
				g += k.RelativeTyreLoadSd * k.RelativeTyreLoadSd
			}
			g = math.Sqrt(g / 4)
			axle := func(a *pb.AxleMetrics) float64 {
				return a.RideHeightSdM*a.RideHeightSdM + a.RideHeightShiftM*a.RideHeightShiftM
			}
			pc := math.Sqrt((axle(cm.Front) + axle(cm.Rear)) / 2)
			grip += weights[c] * g * g
			plat += weights[c] * pc * pc
			wsum += weights[c]
		}
		grip, plat = math.Sqrt(grip/wsum), math.Sqrt(plat/wsum)
		for j, want := range []float64{grip, plat} {
			if got := s.Objectives[j]; math.Abs(got-want) > sumTol*math.Abs(want) {
				t.Errorf("solution %d objective %d = %.17g, recomputed %.17g", s.Index, j, got, want)
			}
		}
		if !s.Feasible || len(s.Violations) != 1 {
			t.Errorf("solution %d: feasible %v, %d violations", s.Index, s.Feasible, len(s.Violations))
		}
		// Genes are front bump, front rebound, rear bump, rear rebound.
		if got := []float64{sol.Setup.Front.BumpRatio, sol.Setup.Front.ReboundRatio, sol.Setup.Rear.BumpRatio, sol.Setup.Rear.ReboundRatio}; geneKey(got) != geneKey(s.Genes) {
			t.Errorf("solution %d: setup %v does not carry genes %v", s.Index, got, s.Genes)
		}
		// Low-speed bump slope at the damper of the front left corner.
		c := veh.Corners[0]
		l := veh.CgToFrontAxleM + veh.CgToRearAxleM
		ms := veh.SprungMassKg * veh.CgToRearAxleM / l / 2 // lever rule, symmetric car
		kw := c.SpringRateNPerM * c.SpringMotionRatio * c.SpringMotionRatio
		want := sol.Setup.Front.BumpRatio * 2 * math.Sqrt(kw*ms) / (c.DamperMotionRatio * c.DamperMotionRatio)
		if got := sol.DamperCurves[0].BumpSlopeNSPerM; math.Abs(got-want) > sumTol*want {
			t.Errorf("solution %d: front left bump slope %.17g N s/m, 2 sqrt(k m) gives %.17g", s.Index, got, want)
		}
		if n := len(sol.DamperCurves[0].StiffestForceN); n != 11 {
			t.Errorf("solution %d: %d points on the stiffest curve, want the spec's 11", s.Index, n)
		}
	}
}

// TestOpenRejectsForeignCheckpoint: a checkpoint of another spec (other
// seed) must not be restored silently.
func TestOpenRejectsForeignCheckpoint(t *testing.T) {
	t.Parallel()
	a := testSpec(4)
	b := testSpec(4)
	b.Search.Seed = proto.Uint64(8)
	sa, _ := MarshalSpec(a)
	sb, _ := MarshalSpec(b)
	o := NewOpener(1)
	st, err := o.Open(sa, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.Step(context.Background(), 1); err != nil {
		t.Fatal(err)
	}
	ck, _ := st.Checkpoint()
	if _, err := o.Open(sb, ck); err == nil {
		t.Error("a checkpoint of seed 7 was restored into a study of seed 8")
	}
	if _, err := o.Open([]byte("not a spec"), nil); err == nil {
		t.Error("garbage spec bytes opened")
	}
}
