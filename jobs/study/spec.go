package study

import (
	"dampfront/model"
	"dampfront/optimizer"
)

// Spec is a job: the car, its road cases, what is searched and how. Zero
// and nil fields take the defaults of WithDefaults; a stored spec has
// them filled in, so that it keeps its meaning when a default changes.
type Spec struct {
	DisplayName string            // free text naming the job
	Labels      map[string]string // for filtering; checked by the job engine
	Vehicle     model.Vehicle
	RoadCases   []model.RoadCase // weight 0 means 1
	// Manoeuvres and Kerbs are the driver-input and kerb cases, run on
	// the nonlinear time-domain model beside the road cases (see
	// model.Evaluator.SetTransientCases); the transient objectives and
	// constraints read them.
	Manoeuvres []model.Manoeuvre
	Kerbs      []model.Kerb
	// LoadFraction is the fraction of static load below which a tyre
	// counts as unloaded on those cases; 0 means 0.5.
	LoadFraction float64
	Grid         model.Grid // zero fields take model.DefaultGrid's
	Design       Design
	Objectives   []model.Objective // empty means DefaultObjectives
	// Reference is the setup that normalised objectives are taken
	// relative to (model.AggregateNormalised); nil is the middle of the
	// design space's bounds when an objective is normalised. Only a spec
	// with a normalised objective has one.
	Reference   *model.Setup
	Constraints []model.Constraint
	Adjustment  model.Adjustment // adjuster range shown on the damper curves
	// Adjusters are the dampers' adjusters and clicks (the zero value:
	// none). With them every solution reports its clicks, and the
	// out-of-band check uses them instead of Adjustment.
	Adjusters model.Adjusters
	Curves    Curves
	Search    Search
	// Refinement is the optional stage after the search: every front
	// point checked on the nonlinear car (see Refinement); off by default.
	Refinement Refinement
	// Uncertainty, when not nil, makes the objectives robust: every setup
	// is evaluated on the uncertain cars of its ranges, the objectives
	// are their mean, worst or mean + k·sd, each constraint the worst
	// over them (model.NewRobustProblem). Its Seed is the search's seed.
	Uncertainty *model.Uncertainty
}

// Design is the design space as a spec gives it: model.DesignSpace with
// a nil for every range or base axle left to its default.
type Design struct {
	// Ratios bounds front bump, front rebound, rear bump and rear rebound
	// damping ratios (-); nil is [DefaultRatioMin, DefaultRatioMax].
	Ratios [4]*model.Range
	// Symmetric makes bump = rebound per axle (two ratio genes).
	Symmetric bool
	// Knee and HighSpeed, per axle, search a knee velocity at the damper
	// (m/s) and a high-speed factor (-); nil keeps the base's.
	Knee, HighSpeed [2]*model.Range
	// Base gives every value that is not a gene, per axle; nil is
	// DefaultAxle. Its ratios are genes and never used.
	Base [2]*model.AxleDamping
	// SnapToClicks evaluates every setup on the clicks of the spec's
	// Adjusters (model.DesignSpace.Snap); it needs adjusters.
	SnapToClicks bool
	// HeaveRatio, per axle, searches the heave damper's ratio (bump =
	// rebound, of the axle's heave critical damping); nil searches none
	// (the default, so a spec without heave dampers searches what it
	// always did). Only an axle with a heave element may have one.
	HeaveRatio [2]*model.Range
	// HeaveBase, per axle, is the heave damper where it is not searched,
	// or its knees and factors where HeaveRatio searches its ratio; nil
	// is no heave damper (or a linear one when HeaveRatio is given).
	HeaveBase [2]*model.AxleDamping
}

// Curves is how the damper curves of a solution are tabulated.
type Curves struct {
	MaxVelocity float64 // m/s at the damper; 0 means DefaultCurveMaxVelocity
	Points      int     // 0 means DefaultCurvePoints
}

// Search is the optimiser's settings as a spec gives them (see
// optimizer.Settings for each); zero or nil takes the default.
type Search struct {
	PopulationSize int
	Generations    int
	Seed           *uint64
	Islands        int
	MigrationEvery int
	Migrants       int // 0 with migration means max(1, PopulationSize/8)

	CrossoverProbability *float64
	CrossoverEta         *float64
	MutationProbability  *float64 // nil means 1/genes
	MutationEta          *float64

	// ReferencePoint is the hypervolume reference point, one value per
	// objective in its SI unit; nil lets the search fix its own.
	ReferencePoint []float64

	// StagnationWindow and StagnationTolerance stop the search early once
	// the hypervolume grows by no more than the tolerance (a fraction of
	// it) over the window (generations); a window of 0 (the default)
	// runs every generation (optimizer.Settings).
	StagnationWindow    int
	StagnationTolerance float64
	// PolishBudget is the number of evaluations per front point of the
	// local polish after the last generation (optimizer.Polish); 0 (the
	// default) polishes nothing, at most MaxPolishBudget.
	PolishBudget int

	// Variation breeds the children (optimizer.Settings.Variation); the
	// zero value is SBX. DifferentialWeight and DifferentialCrossover
	// are DE's F and CR, only for optimizer.VariationDifferential, where
	// nil means DefaultDifferentialWeight and DefaultDifferentialCrossover.
	Variation             optimizer.Variation
	DifferentialWeight    *float64
	DifferentialCrossover *float64
}
