package study

import (
	"context"
	"errors"
	"math"
	"slices"
	"sort"
	"testing"

	"dampfront/model"
)

// testSpec is an invented GT-style car on two invented track cases,
// smoother than ISO 8608 class A; expected values never come from it.
func testSpec() *Spec {
	corner := func(k, mr, mu, kt, gap float64) model.Corner {
		return model.Corner{SpringRate: k, SpringMotionRatio: mr, DamperMotionRatio: mr, UnsprungMass: mu,
			TyreRate: kt, TyreDamping: 120, TyreEnvelopeLength: 0.2, BumpStopGap: gap}
	}
	front, rear := corner(150e3, 0.82, 42, 310e3, 0.028), corner(170e3, 0.76, 48, 330e3, 0.034)
	seed := uint64(7)
	return &Spec{
		DisplayName: "study test job",
		Vehicle: model.Vehicle{Name: "Test car (invented)", SprungMass: 1120, PitchInertia: 1750, RollInertia: 430,
			CGToFrontAxle: 1.36, CGToRearAxle: 1.29, TrackFront: 1.64, TrackRear: 1.60,
			Corners:  [4]model.Corner{front, front, rear, rear},
			AntiRoll: [2]model.AntiRollBar{{WheelRate: 55e3}, {WheelRate: 28e3}}},
		RoadCases: []model.RoadCase{
			{Name: "Test ring", Speed: 60, Gd0: 2.5e-6},
			{Name: "Test streets", Speed: 28, Gd0: 10e-6, Waviness: 2.2, Weight: 0.5},
		},
		Grid:   model.Grid{MinHz: 0.2, MaxHz: 120, Points: 121},
		Search: Search{PopulationSize: 8, Generations: 3, Seed: &seed},
	}
}

// problemPaths returns the sorted field paths of a *model.ValidationError.
func problemPaths(t *testing.T, err error) []string {
	t.Helper()
	var ve *model.ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("error %v (%T) is not a *model.ValidationError", err, err)
	}
	var out []string
	for _, p := range ve.Problems {
		if p.Reason == "" {
			t.Errorf("problem at %s without a reason", p.Field)
		}
		out = append(out, p.Field)
	}
	sort.Strings(out)
	return out
}

// Check reports every problem of a spec at once, each once, at its path
// in the spec: the car, a road case, the grid, the design space, the
// objectives, the constraints, the curves and several search settings
// (the optimiser's own checks, every one of them, not the first).
func TestCheckReportsEveryProblemAtOnce(t *testing.T) {
	t.Parallel()
	s := testSpec()
	s.Vehicle.SprungMass = 0
	s.RoadCases[1].Speed = -3
	s.Grid.Points = 100
	s.Design.Ratios[0] = &model.Range{Min: 1, Max: 0.5}
	s.Objectives = []model.Objective{{Kind: model.ObjectiveGrip}, {Kind: model.ObjectiveGrip}}
	s.Constraints = []model.Constraint{{Kind: model.ConstraintLiftOff, Limit: -1}}
	s.Curves.Points = 2
	s.Search.PopulationSize = 2
	s.Search.Islands = -1
	eta := math.Inf(1)
	s.Search.MutationEta = &eta
	_, err := Check(s)
	want := []string{
		"constraints[0].limit",
		"curves.points",
		"design_space.ratios.front_bump.max",
		"grid.points",
		"objectives[1].kind",
		"road_cases[1].speed_m_per_s",
		"search.islands",
		"search.mutation_eta",
		"search.population_size",
		"vehicle.sprung_mass_kg",
	}
	if got := problemPaths(t, err); !slices.Equal(got, want) {
		t.Errorf("problems at\n%v\nwant\n%v", got, want)
	}
}

// WithDefaults fills every default and is idempotent; the spec given is
// left as it was.
func TestWithDefaultsIsIdempotent(t *testing.T) {
	t.Parallel()
	s := testSpec()
	d := WithDefaults(s)
	if s.Objectives != nil || s.Design.Ratios[0] != nil || s.Search.MutationProbability != nil || s.RoadCases[0].Weight != 0 {
		t.Fatal("WithDefaults changed the spec it was given")
	}
	if len(d.Objectives) != 2 || *d.Design.Ratios[3] != (model.Range{Min: DefaultRatioMin, Max: DefaultRatioMax}) ||
		*d.Design.Base[1] != DefaultAxle() || d.Curves.Points != DefaultCurvePoints || d.RoadCases[0].Weight != 1 ||
		*d.Search.MutationProbability != 0.25 || *d.Search.Seed != 7 || d.Search.Islands != 1 {
		t.Errorf("defaults %+v", d)
	}
	dd := WithDefaults(d)
	if *dd.Search.MutationProbability != *d.Search.MutationProbability || *dd.Design.Ratios[0] != *d.Design.Ratios[0] ||
		dd.Grid != d.Grid || len(dd.Objectives) != len(d.Objectives) {
		t.Error("WithDefaults is not idempotent")
	}
}

// Size counts without compiling, and saturates rather than wrap.
func TestSize(t *testing.T) {
	t.Parallel()
	c, err := Check(testSpec())
	if err != nil {
		t.Fatal(err)
	}
	if got, want := c.Size(), (Size{Cases: 2, GridPoints: 121, Work: 8 * 1 * 3 * 2, FrontBound: 8 * 1 * (3 + 1)}); got != want {
		t.Errorf("Size %+v, want %+v", got, want)
	}
	s := testSpec()
	s.Search.PopulationSize, s.Search.Islands, s.Search.Generations = math.MaxInt32, math.MaxInt32, math.MaxInt32
	if c, err = Check(s); err != nil {
		t.Fatal(err)
	}
	if w := c.Size().Work; w != math.MaxInt64 {
		t.Errorf("work of (2^31-1)^3 x 2 = %d, want the largest int64", w)
	}
}

// The polish's neighbourhood rounds and the refinement count in Size,
// each by its bound worked out by hand (testSpec: population 8, one
// island, 3 generations, 2 road cases, four ratio genes). The front holds
// at most 8 × 1 × (3 + 1) = 32 points. Polish budget 4: per point 8
// rounds × (1 twin + 2^4 corners + 2 model steps + 4) = 184 evaluations,
// × 2 cases × 32 points = 11 776, beside the search's 8 × 1 × (3 + 4) ×
// 2 = 112.
// Refinement of 10 s: ⌈8 × 10⌉ = 80 per point and road case, × 2 × 32 =
// 5120.
func TestSizeCountsPolishRoundsAndRefinement(t *testing.T) {
	t.Parallel()
	s := testSpec()
	s.Search.PolishBudget = 4
	c, err := Check(s)
	if err != nil {
		t.Fatal(err)
	}
	if got := c.Size(); got.PolishRounds != 11_776 || got.Refine != 0 || got.Work != 112+11_776 {
		t.Errorf("polished: Size %+v, want PolishRounds 11776, Refine 0, Work 11888", got)
	}
	s = testSpec()
	s.Refinement = Refinement{Enabled: true, Duration: 10}
	if c, err = Check(s); err != nil {
		t.Fatal(err)
	}
	if got := c.Size(); got.Refine != 5120 || got.PolishRounds != 0 || got.Work != 48+5120 {
		t.Errorf("refined: Size %+v, want Refine 5120, PolishRounds 0, Work 5168", got)
	}
}

// Compile stops with the context's error when the context is done, and a
// car that is not stable at a case's speed is a problem at that case.
func TestCompile(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Compile(ctx, testSpec()); !errors.Is(err, context.Canceled) {
		t.Errorf("Compile with a done context: %v, want context.Canceled", err)
	}
	pl, err := Compile(context.Background(), testSpec())
	if err != nil {
		t.Fatal(err)
	}
	if pl.Evaluator().Cases() != 2 || len(pl.GeneNames()) != 4 || pl.Settings(3, nil).Workers != 3 {
		t.Errorf("plan of %d cases, genes %v", pl.Evaluator().Cases(), pl.GeneNames())
	}
	// An aero stiffness larger than the suspension's: no stationary
	// response at speed (model.ErrUnstable).
	s := testSpec()
	s.Vehicle.Aero = model.Aero{ReferenceSpeed: 60, Stiffness: [2]float64{5e6, 5e6}}
	_, err = Compile(context.Background(), s)
	var ve *model.ValidationError
	if !errors.As(err, &ve) || len(ve.Problems) == 0 {
		t.Fatalf("Compile of an unstable car: %v, want a *model.ValidationError", err)
	}
}
