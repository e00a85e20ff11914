package study

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"unicode"

	"dampfront/model"
	"dampfront/optimizer"
)

// Checked is a spec with its defaults filled in that has passed every
// check that needs no compiling: what Size counts and Compile builds.
type Checked struct {
	spec     *Spec
	design   model.DesignSpace
	settings optimizer.Settings // Workers 1, no Progress
}

// Check fills in the defaults of s and checks all of it at once: the
// display name, the vehicle, every road case, the grid, the design space, the objectives
// and constraints, the base setup, the adjustment and curve settings, and
// the search settings. Every problem found comes back in one
// *model.ValidationError (paths as in the package doc). What Check does
// not know is the car's stability at each speed: Compile finds that.
//
// Check does work in proportion to the size of s (its road cases and
// tables) and never compiles; see Size for what compiling will cost.
func Check(s *Spec) (*Checked, error) {
	spec := WithDefaults(s)
	c := &Checked{spec: spec, design: spec.Design.model()}
	var p problems
	if why := model.TextProblem(spec.DisplayName); why != "" {
		p.add("display_name", "%s", why)
	}
	p.merge("vehicle.", spec.Vehicle.Validate())
	if len(spec.RoadCases) == 0 {
		p.add("road_cases", "needs at least one road case")
	}
	for i := range spec.RoadCases {
		p.merge(fmt.Sprintf("road_cases[%d].", i), spec.RoadCases[i].Validate())
	}
	for i := range spec.Manoeuvres {
		p.merge(fmt.Sprintf("manoeuvres[%d].", i), spec.Manoeuvres[i].Validate())
	}
	for i := range spec.Kerbs {
		p.merge(fmt.Sprintf("kerbs[%d].", i), spec.Kerbs[i].Validate())
	}
	if n := len(spec.Manoeuvres) + len(spec.Kerbs); n > MaxTransientCases {
		p.add("manoeuvres", "a job takes at most %d manoeuvre and kerb cases together, got %d", MaxTransientCases, n)
	}
	if len(spec.Manoeuvres) > 0 && !(spec.Vehicle.LoadPaths.CGHeight > 0) {
		p.add("vehicle.load_paths.cg_height_m", "is needed by the manoeuvre cases: give the sprung CG height")
	}
	p.merge("grid.", spec.Grid.Validate())
	p.mergeMapped(problemPath, model.ValidateProblem(c.design, spec.Objectives, spec.Constraints))
	p.mergeMapped(problemPath, model.ValidateAeroOutputs(&spec.Vehicle, spec.Objectives, spec.Constraints))
	if spec.Reference != nil {
		if !normalises(spec.Objectives) {
			p.add("reference_setup", "is used only by objectives with the normalised aggregation, and none has it")
		} else {
			p.merge("reference_setup.", spec.Reference.Validate())
			p.merge("reference_setup.", spec.Vehicle.CheckSetup(spec.Reference))
		}
	}
	// The base setup with valid placeholder ratios, which are genes.
	base := c.design.Base
	for ax := range base.Axles {
		base.Axles[ax].BumpRatio, base.Axles[ax].ReboundRatio = 1, 1
		if c.design.HeaveRatio[ax] != nil {
			base.Heave[ax].BumpRatio, base.Heave[ax].ReboundRatio = 1, 1
		}
	}
	p.merge("design_space.base.", base.Validate())
	p.mergeMapped(func(f string) string { return "design_space." + f }, c.design.ValidateFor(&spec.Vehicle))
	p.merge("adjustment.", spec.Adjustment.Validate())
	p.merge("adjusters.", spec.Adjusters.Validate())
	if spec.Design.SnapToClicks {
		if !spec.Adjusters.Given() {
			p.add("design_space.snap_to_clicks", "needs adjusters with clicks: give adjusters")
		}
		c.design.Snap = &model.ClickSnap{Vehicle: &spec.Vehicle, Adjusters: &spec.Adjusters}
	}
	p.merge("curves.", model.ValidateCurveRange(spec.Curves.MaxVelocity, spec.Curves.Points))
	c.settings = searchSettings(&spec.Search)
	p.mergeMapped(settingsPath, c.settings.Validate(len(spec.Objectives)))
	if b := spec.Search.PolishBudget; b < 0 || b > MaxPolishBudget {
		p.add("search.polish_budget", "must be 0 (no polish) to %d evaluations per front point, got %d", MaxPolishBudget, b)
	}
	spec.Refinement.check(&p)
	if spec.Refinement.Enabled && spec.Uncertainty != nil {
		p.add("refinement.enabled", "cannot go with uncertainty: the time-domain check runs the nominal car, while the objectives are robust over the uncertain cars; leave one of them out")
	}
	if u := spec.Uncertainty; u != nil {
		p.mergeMapped(func(f string) string { return strings.TrimSuffix("uncertainty."+f, ".") }, u.Validate(&spec.Vehicle))
	}
	if err := p.err(); err != nil {
		return nil, err
	}
	return c, nil
}

// Spec returns the spec with its defaults filled in. It must not be
// changed.
func (c *Checked) Spec() *Spec { return c.spec }

// Size is the work a checked spec asks for, counted without compiling.
type Size struct {
	// Cases is the number of road cases.
	Cases int
	// Transients is the number of manoeuvre and kerb cases (each costs
	// about as much as a road case: a few thousand time steps).
	Transients int
	// GridPoints is the number of frequencies of each evaluation.
	GridPoints int
	// Work is the job's work in case evaluations (one setup on one case
	// of the linear model), saturating at the largest int64: the search
	// and the polish budget, population × islands × (generations +
	// polish budget) × (road cases + transient cases) (to within the
	// initial population, and counting the polish budget of a front as
	// large as the population), plus PolishRounds and Refine; with
	// uncertainty, the search's and the polish's parts times the
	// uncertain cars per setup.
	Work int64
	// PolishRounds is the part of Work the polish's neighbourhood rounds
	// may make (0 without a polish): every point of the front (at most
	// FrontBound) in each of PolishRounds rounds evaluates its twin and
	// the 2^n corners of its box (n the ratio genes) and the linear
	// model's step and its half (optimizer.ModelStepEvaluations) and,
	// when it is replaced, gives way to a point polished with the whole
	// budget: FrontBound × PolishRounds × (1 + 2^n + 2 + polish budget) ×
	// cases (× uncertain cars).
	PolishRounds int64
	// Refine is the part of Work the refinement makes (0 without one),
	// in the same unit: FrontBound × road cases × ⌈RefineWorkPerSecond ×
	// duration_s⌉.
	Refine int64
	// FrontBound bounds the points of the search's front: the archive
	// keeps only points the search evaluated, one per objective vector,
	// and the search evaluates population × islands × (generations + 1)
	// setups. It is not bounded by the population (a search of 500 for
	// 16 generations ended with a front of 586 points, README).
	FrontBound int64
	// RobustPoints is the number of uncertain cars each setup is
	// evaluated on; 0 without uncertainty.
	RobustPoints int
}

// RefineWorkPerSecond converts the refinement's time-domain check into
// case evaluations of the linear model: one road case of one front point
// checked for one second of road costs about 8 of them. Measured on this
// project's 2-core machine (README, "Refinement on the nonlinear car" and
// the table of "Uncertain cars"): a front point on three road cases of
// 120 s took 1.01 s CPU, 2.81 ms per case-second, against 0.73 ms CPU for
// one setup on the demo car's two road cases (BenchmarkRobustEvaluate,
// -cpu 1), 0.365 ms per case evaluation: 2.81 / 0.365 = 7.7, rounded up.
const RefineWorkPerSecond = 8

// Size counts the work of the checked spec.
func (c *Checked) Size() Size {
	q := &c.spec.Search
	work := int64(1)
	transients := len(c.spec.Manoeuvres) + len(c.spec.Kerbs)
	cases := len(c.spec.RoadCases) + transients
	for _, n := range []int{q.PopulationSize, q.Islands, q.Generations + q.PolishBudget, cases} {
		work = mulSat(work, int64(n))
	}
	front := mulSat(mulSat(int64(q.PopulationSize), int64(q.Islands)), int64(q.Generations)+1)
	var rounds, refine int64
	if q.PolishBudget > 0 {
		n := 0
		for _, g := range c.design.Genes() {
			if isRatioGene(g.Name) {
				n++
			}
		}
		perPoint := int64(PolishRounds) * (1 + int64(1)<<n + optimizer.ModelStepEvaluations + int64(q.PolishBudget))
		rounds = mulSat(mulSat(front, perPoint), int64(cases))
	}
	points := 0
	if u := c.spec.Uncertainty; u != nil {
		points = u.Points()
		work = mulSat(work, int64(points))
		rounds = mulSat(rounds, int64(points))
	}
	if r := c.spec.Refinement; r.Enabled {
		perCase := int64(math.Ceil(RefineWorkPerSecond * r.Duration))
		refine = mulSat(mulSat(front, int64(len(c.spec.RoadCases))), perCase)
	}
	return Size{Cases: len(c.spec.RoadCases), Transients: transients, GridPoints: c.spec.Grid.Points,
		Work: addSat(addSat(work, rounds), refine), PolishRounds: rounds, Refine: refine, FrontBound: front, RobustPoints: points}
}

// addSat is a+b for a, b >= 0, or the largest int64 when that overflows.
func addSat(a, b int64) int64 {
	const maxInt64 = 1<<63 - 1
	if b > maxInt64-a {
		return maxInt64
	}
	return a + b
}

// mulSat is a×b for a, b >= 0, or the largest int64 when that overflows.
func mulSat(a, b int64) int64 {
	const maxInt64 = 1<<63 - 1
	if a != 0 && b > maxInt64/a {
		return maxInt64
	}
	return a * b
}

// searchSettings converts search settings with defaults filled in. A
// migrant count without migration has no effect and is stored as 0 in
// the optimiser's checkpoint.
func searchSettings(q *Search) optimizer.Settings {
	s := optimizer.Settings{
		PopulationSize:       q.PopulationSize,
		Generations:          q.Generations,
		Seed:                 *q.Seed,
		Islands:              q.Islands,
		MigrationEvery:       q.MigrationEvery,
		Migrants:             q.Migrants,
		CrossoverProbability: *q.CrossoverProbability,
		CrossoverEta:         *q.CrossoverEta,
		MutationProbability:  *q.MutationProbability,
		MutationEta:          *q.MutationEta,
		ReferencePoint:       q.ReferencePoint,
		StagnationWindow:     q.StagnationWindow,
		StagnationTolerance:  q.StagnationTolerance,
		Variation:            q.Variation,
		Workers:              1,
	}
	if q.DifferentialWeight != nil {
		s.DifferentialWeight = *q.DifferentialWeight
	}
	if q.DifferentialCrossover != nil {
		s.DifferentialCrossover = *q.DifferentialCrossover
	}
	if !(s.Islands > 1 && s.MigrationEvery > 0) {
		s.Migrants = 0
	}
	return s
}

// problemPath maps the paths of model.ValidateProblem to the spec's: its
// design space is "design_space".
func problemPath(p string) string {
	if rest, ok := strings.CutPrefix(p, "design."); ok {
		return "design_space." + rest
	}
	return p
}

// settingsPath maps an optimizer *FieldError path, which names Go fields
// ("Settings.PopulationSize", "Settings.ReferencePoint[1]",
// "Problem.Bounds[2]"), to the spec's: search settings live in "search",
// the gene bounds come from "design_space".
func settingsPath(p string) string {
	switch {
	case strings.HasPrefix(p, "Settings."):
		return "search." + snake(strings.TrimPrefix(p, "Settings."))
	case strings.HasPrefix(p, "Problem"):
		return "design_space"
	}
	return snake(p)
}

// snake turns Go's CamelCase names into lower_snake_case, leaving index
// suffixes alone: "ReferencePoint[1]" -> "reference_point[1]".
func snake(s string) string {
	var b strings.Builder
	for i, r := range s {
		if unicode.IsUpper(r) {
			if i > 0 && s[i-1] != '.' && s[i-1] != '[' {
				b.WriteByte('_')
			}
			b.WriteRune(unicode.ToLower(r))
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// problems collects the field problems of a spec.
type problems []model.FieldError

func (p *problems) add(field, format string, args ...any) {
	*p = append(*p, model.FieldError{Field: field, Reason: fmt.Sprintf(format, args...)})
}

// merge adds the problems of a model *ValidationError under prefix;
// another error is added at the prefix itself.
func (p *problems) merge(prefix string, err error) {
	p.mergeMapped(func(f string) string { return prefix + f }, err)
}

// mergeMapped adds the problems of err with their paths mapped: a model
// *ValidationError's, every optimizer *FieldError's it wraps, or err
// itself at path(""), trimmed of a trailing dot.
func (p *problems) mergeMapped(path func(string) string, err error) {
	if err == nil {
		return
	}
	var ve *model.ValidationError
	if errors.As(err, &ve) {
		for _, q := range ve.Problems {
			*p = append(*p, model.FieldError{Field: path(q.Field), Reason: q.Reason})
		}
		return
	}
	if fes := fieldErrors(err); len(fes) > 0 {
		for _, fe := range fes {
			*p = append(*p, model.FieldError{Field: path(fe.Field), Reason: fe.Msg})
		}
		return
	}
	p.add(strings.TrimSuffix(path(""), "."), "%v", err)
}

// fieldErrors lists the optimizer *FieldErrors in err (one, or those an
// errors.Join holds).
func fieldErrors(err error) []*optimizer.FieldError {
	var out []*optimizer.FieldError
	var fe *optimizer.FieldError
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		for _, e := range j.Unwrap() {
			out = append(out, fieldErrors(e)...)
		}
	} else if errors.As(err, &fe) {
		out = append(out, fe)
	}
	return out
}

func (p problems) err() error {
	if len(p) == 0 {
		return nil
	}
	return &model.ValidationError{Problems: p}
}

// History returns the progress of every generation recorded in a
// checkpoint of the checked spec's run, read back without compiling the
// spec: restoring a search needs only the problem's shape.
func (c *Checked) History(checkpoint []byte) ([]optimizer.Progress, error) {
	search, _, err := splitCheckpoint(checkpoint)
	if err != nil {
		return nil, err
	}
	s, err := optimizer.Restore(shapeOnly{c}, c.settings, search)
	if err != nil {
		return nil, err
	}
	return s.History(), nil
}

// shapeOnly is the shape of a checked spec's problem (genes, objectives,
// constraints) with no evaluator behind it.
type shapeOnly struct{ c *Checked }

func (q shapeOnly) Bounds() []optimizer.Bound { return bounds(q.c.design.Genes()) }

func (q shapeOnly) NumObjectives() int  { return len(q.c.spec.Objectives) }
func (q shapeOnly) NumConstraints() int { return len(q.c.spec.Constraints) }

func (q shapeOnly) Evaluate(x, obj, viol []float64) error {
	return errors.New("study: the spec is not compiled; open its run to evaluate")
}
