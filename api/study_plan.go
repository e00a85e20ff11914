package api

import (
	"fmt"
	"math"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/optimizer"
)

// plan is a JobSpec compiled into what the model and the optimiser run:
// the evaluator of the car on the road cases, the search problem, the
// optimiser settings and the damper-curve settings. A plan is safe for
// concurrent use.
type plan struct {
	spec        *pb.JobSpec // with defaults filled in
	eval        *model.Evaluator
	study       *model.Problem
	settings    optimizer.Settings // without Workers and Progress
	adjustment  model.Adjustment
	curveMax    float64 // m/s
	curvePoints int
}

// compile fills in the defaults of spec, converts it and checks all of
// it: shape problems of the messages, every model validation, the search
// settings, the stability of the car at each speed. Problems come back as
// one InvalidArgument status whose paths start with prefix (for example
// "spec."), as many as can be found in one pass.
func compile(spec *pb.JobSpec, prefix string) (*plan, error) {
	s := withDefaults(spec)
	var p problems
	at := under(prefix)
	if why := model.TextProblem(s.GetDisplayName()); why != "" {
		p.add(at("display_name"), "%s", why)
	}

	v := vehicleFromProto(s.GetVehicle(), at("vehicle"), &p)
	if len(s.GetRoadCases()) == 0 {
		p.add(at("road_cases"), "needs at least one road case")
	}
	cases := roadCasesFromProto(s.GetRoadCases(), at("road_cases"), &p)
	grid := gridFromProto(s.GetGrid())
	design := designFromProto(s.GetDesignSpace(), at("design_space"), &p)
	objectives := objectivesFromProto(s.GetObjectives(), at("objectives"), &p)
	constraints := constraintsFromProto(s.GetConstraints(), at("constraints"), &p)
	adjustment := adjustmentFromProto(s.GetAdjustment())
	settings := searchSettings(s.GetSearch(), len(objectives), at("search"), &p)

	for i := range cases {
		p.mergeModel(under(fmt.Sprintf("%sroad_cases[%d].", prefix, i)), cases[i].Validate())
	}
	p.mergeModel(under(prefix+"grid."), grid.Validate())
	p.mergeModel(under(prefix+"design_space."), design.Validate())
	// DamperCurves checks the vehicle, the base setup (with valid
	// placeholder ratios, which are genes), the adjustment and the
	// curve settings in one pass.
	base := design.Base
	for ax := range base.Axles {
		base.Axles[ax].BumpRatio, base.Axles[ax].ReboundRatio = 1, 1
	}
	_, err := model.DamperCurves(&v, &base, adjustment, s.GetCurves().GetMaxVelocityMPerS(), int(s.GetCurves().GetPoints()))
	p.mergeModel(curvePaths(prefix, prefix+"design_space.base."), err)
	if err := p.err(); err != nil {
		return nil, err
	}

	// With every part valid on its own, what is left is the system: the
	// car's stability at each speed and the objectives together.
	eval, err := model.NewEvaluator(v, cases, model.EvaluatorOptions{Grid: grid})
	if err != nil {
		return nil, specStatus(prefix, err)
	}
	study, err := model.NewProblem(eval, design, objectives, constraints)
	if err != nil {
		return nil, specStatus(prefix, err)
	}
	pl := &plan{
		spec: s, eval: eval, study: study, settings: settings, adjustment: adjustment,
		curveMax: s.GetCurves().GetMaxVelocityMPerS(), curvePoints: int(s.GetCurves().GetPoints()),
	}
	// The optimiser's own check of the settings against the problem.
	if _, err := optimizer.New(pl.problem(), pl.optimizerSettings(1, nil)); err != nil {
		return nil, specStatus(prefix, err)
	}
	return pl, nil
}

// curvePaths maps the field paths of model.DamperCurves's validation
// errors: its "setup." is the design space's base, its curve settings
// are the spec's "curves", the rest lies under the spec.
func curvePaths(prefix, setupPrefix string) pathMapper {
	return func(path string) string {
		switch {
		case strings.HasPrefix(path, "setup."):
			return setupPrefix + strings.TrimPrefix(path, "setup.")
		case path == "max_velocity_m_per_s" || path == "points":
			return prefix + "curves." + path
		}
		return joinPath(prefix, path)
	}
}

// specStatus maps a model or optimiser error about a spec to a status
// with paths under prefix.
func specStatus(prefix string, err error) error {
	return toStatus(err, under(prefix))
}

// searchSettings converts search settings with defaults filled in and
// checks what the proto allows but the search does not, naming each
// field; optimizer.New checks the same again.
func searchSettings(q *pb.SearchSettings, nObj int, path string, p *problems) optimizer.Settings {
	s := optimizer.Settings{
		PopulationSize:       int(q.GetPopulationSize()),
		Generations:          int(q.GetGenerations()),
		Seed:                 q.GetSeed(),
		Islands:              int(q.GetIslands()),
		MigrationEvery:       int(q.GetMigrationEvery()),
		Migrants:             int(q.GetMigrants()),
		CrossoverProbability: q.GetCrossoverProbability(),
		CrossoverEta:         q.GetCrossoverEta(),
		MutationProbability:  q.GetMutationProbability(),
		MutationEta:          q.GetMutationEta(),
		ReferencePoint:       cloneOrNil(q.GetReferencePoint()),
	}
	f := func(name string) string { return path + "." + name }
	if s.PopulationSize < 4 {
		p.add(f("population_size"), "must be at least 4, got %d", s.PopulationSize)
	}
	if s.Generations < 1 {
		p.add(f("generations"), "must be at least 1, got %d", s.Generations)
	}
	if s.Islands < 1 {
		p.add(f("islands"), "must be at least 1, got %d", s.Islands)
	}
	if s.MigrationEvery < 0 {
		p.add(f("migration_every"), "must not be negative, got %d", s.MigrationEvery)
	}
	if s.Islands > 1 && s.MigrationEvery > 0 {
		if s.Migrants < 1 || s.Migrants > 2*s.PopulationSize {
			p.add(f("migrants"), "must be 1 to 2 × population_size = %d when islands migrate, got %d", 2*s.PopulationSize, s.Migrants)
		}
	} else if s.Migrants != 0 {
		// The optimiser stores the value in its checkpoint; keep it 0
		// when it has no effect.
		s.Migrants = 0
	}
	for name, v := range map[string]float64{"crossover_probability": s.CrossoverProbability, "mutation_probability": s.MutationProbability} {
		if !(v >= 0 && v <= 1) {
			p.add(f(name), "must be in [0, 1], got %g", v)
		}
	}
	for name, v := range map[string]float64{"crossover_eta": s.CrossoverEta, "mutation_eta": s.MutationEta} {
		if !(v >= 0) || math.IsInf(v, 0) {
			p.add(f(name), "must be finite and not negative, got %g", v)
		}
	}
	if r := s.ReferencePoint; r != nil {
		if len(r) != nObj {
			p.add(f("reference_point"), "needs one value per objective (%d), got %d", nObj, len(r))
		}
		for j, x := range r {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				p.add(fmt.Sprintf("%s[%d]", f("reference_point"), j), "must be finite, got %g", x)
			}
		}
	}
	return s
}

// optimizerSettings are the plan's settings with a worker count and a
// progress callback.
func (pl *plan) optimizerSettings(workers int, progress func(optimizer.Progress)) optimizer.Settings {
	s := pl.settings
	s.ReferencePoint = cloneOrNil(s.ReferencePoint)
	s.Workers = max(1, workers)
	s.Progress = progress
	return s
}

// problem is the plan's search problem as the optimiser sees it.
func (pl *plan) problem() optimizer.Problem { return searchProblem{pl.study} }

// searchProblem adapts a model.Problem to optimizer.Problem: the genes'
// box, the objectives and the constraint violations. model.Problem is safe
// for concurrent use and pure, as the optimiser requires.
type searchProblem struct{ study *model.Problem }

func (q searchProblem) Bounds() []optimizer.Bound {
	genes := q.study.Genes()
	b := make([]optimizer.Bound, len(genes))
	for i, g := range genes {
		b[i] = optimizer.Bound{Lo: g.Min, Hi: g.Max}
	}
	return b
}

func (q searchProblem) NumObjectives() int  { return q.study.NumObjectives() }
func (q searchProblem) NumConstraints() int { return q.study.NumConstraints() }

func (q searchProblem) Evaluate(x, obj, viol []float64) error {
	return q.study.EvaluateGenes(x, obj, viol)
}

// geneNames lists the genes' names in order.
func (pl *plan) geneNames() []string {
	genes := pl.study.Genes()
	out := make([]string, len(genes))
	for i, g := range genes {
		out[i] = g.Name
	}
	return out
}

// objectivesProto and constraintsProto are the spec's, in order.
func (pl *plan) objectivesProto() []*pb.Objective   { return pl.spec.GetObjectives() }
func (pl *plan) constraintsProto() []*pb.Constraint { return pl.spec.GetConstraints() }

// work is the size of a job as the server limits it: population ×
// islands × generations × road cases, the number of case evaluations
// the search makes, to within the initial population.
func (pl *plan) work() int64 {
	return int64(pl.settings.PopulationSize) * int64(pl.settings.Islands) * int64(pl.settings.Generations) * int64(pl.eval.Cases())
}
