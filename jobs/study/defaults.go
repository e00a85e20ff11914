package study

import (
	"maps"
	"slices"

	"dampfront/model"
	"dampfront/optimizer"
)

// Defaults where a spec is silent; the one place for each. A stored spec
// has them filled in, so a stored job does not change meaning when they
// change.
const (
	// DefaultPopulationSize and DefaultGenerations size the search: 48
	// survivors for 60 generations, a few thousand evaluations, enough for
	// a front of four ratio genes on two objectives (a figure from this
	// project's demo runs, not a published one).
	DefaultPopulationSize = 48
	DefaultGenerations    = 60
	// DefaultSeed is the seed of a spec that gives none.
	DefaultSeed = 1

	// DefaultRatioMin and DefaultRatioMax bound every damping ratio that
	// the design space leaves unbounded: from well under-damped to over
	// critical (common practice for race cars, no single source).
	DefaultRatioMin = 0.2
	DefaultRatioMax = 1.6

	// DefaultKnee is the knee velocity at the damper (m/s) and
	// DefaultHighSpeedFactor the high-speed over low-speed slope of a
	// base setup that gives none: a digressive race damper (common
	// practice, no single source).
	DefaultKnee            = 0.05
	DefaultHighSpeedFactor = 0.5

	// DefaultCurveMaxVelocity (m/s) and DefaultCurvePoints tabulate the
	// damper curves: ±0.3 m/s covers the low- and high-speed ranges of a
	// race damper (common practice); 61 points give a 0.01 m/s step.
	DefaultCurveMaxVelocity = 0.3
	DefaultCurvePoints      = 61

	// DefaultCrossoverProbability, DefaultCrossoverEta and
	// DefaultMutationEta are the operator settings of Deb et al. (2002),
	// §V; the mutation probability defaults to 1/genes, also theirs.
	DefaultCrossoverProbability = 0.9
	DefaultCrossoverEta         = 20
	DefaultMutationEta          = 20
)

// DefaultAxle is the base setting of an axle a spec does not give: knees
// and high-speed factors, no ratios (those are genes).
func DefaultAxle() model.AxleDamping {
	return model.AxleDamping{KneeBump: DefaultKnee, KneeRebound: DefaultKnee,
		HighSpeedBump: DefaultHighSpeedFactor, HighSpeedRebound: DefaultHighSpeedFactor}
}

// WithDefaults returns a copy of s with every default filled in. It is
// idempotent, and s is left as it is.
func WithDefaults(s *Spec) *Spec {
	out := *s
	out.Labels = maps.Clone(s.Labels)
	out.RoadCases = slices.Clone(s.RoadCases)
	for i := range out.RoadCases {
		if out.RoadCases[i].Weight == 0 {
			out.RoadCases[i].Weight = 1
		}
	}
	if out.Grid.MinHz == 0 {
		out.Grid.MinHz = model.DefaultGrid.MinHz
	}
	if out.Grid.MaxHz == 0 {
		out.Grid.MaxHz = model.DefaultGrid.MaxHz
	}
	if out.Grid.Points == 0 {
		out.Grid.Points = model.DefaultGrid.Points
	}

	d := &out.Design
	for i, r := range d.Ratios {
		if r == nil {
			d.Ratios[i] = &model.Range{Min: DefaultRatioMin, Max: DefaultRatioMax}
		}
	}
	for ax, a := range d.Base {
		if a == nil {
			b := DefaultAxle()
			d.Base[ax] = &b
		}
	}

	if len(out.Objectives) == 0 {
		out.Objectives = model.DefaultObjectives()
	} else {
		out.Objectives = slices.Clone(s.Objectives)
	}
	if s.Reference != nil {
		ref := *s.Reference
		out.Reference = &ref
	} else if normalises(out.Objectives) {
		// The default reference: the middle of every gene's bounds.
		md := d.model()
		ref := md.Middle()
		out.Reference = &ref
	}
	out.Constraints = slices.Clone(s.Constraints)
	if out.Curves.MaxVelocity == 0 {
		out.Curves.MaxVelocity = DefaultCurveMaxVelocity
	}
	if out.Curves.Points == 0 {
		out.Curves.Points = DefaultCurvePoints
	}

	q := &out.Search
	q.ReferencePoint = slices.Clone(s.Search.ReferencePoint)
	if q.PopulationSize == 0 {
		q.PopulationSize = DefaultPopulationSize
	}
	if q.Generations == 0 {
		q.Generations = DefaultGenerations
	}
	if q.Islands == 0 {
		q.Islands = 1
	}
	if q.Islands > 1 && q.MigrationEvery > 0 && q.Migrants == 0 {
		q.Migrants = max(1, q.PopulationSize/8)
	}
	orDefault := func(p **float64, v float64) {
		if *p == nil {
			*p = &v
		}
	}
	if q.Seed == nil {
		seed := uint64(DefaultSeed)
		q.Seed = &seed
	}
	orDefault(&q.CrossoverProbability, DefaultCrossoverProbability)
	orDefault(&q.CrossoverEta, DefaultCrossoverEta)
	orDefault(&q.MutationProbability, 1/float64(out.Design.geneCount()))
	orDefault(&q.MutationEta, DefaultMutationEta)
	if q.Variation == optimizer.VariationDifferential {
		orDefault(&q.DifferentialWeight, optimizer.DefaultDifferentialWeight)
		orDefault(&q.DifferentialCrossover, optimizer.DefaultDifferentialCrossover)
	}
	out.Refinement = s.Refinement.withDefaults(*q.Seed)
	if s.Uncertainty != nil {
		// The method, measure and point count are the model's defaults;
		// the sample's seed is the job's one seed.
		u := s.Uncertainty.WithDefaults()
		u.Seed = *q.Seed
		out.Uncertainty = &u
	}
	return &out
}

// geneCount is the number of genes of the design space.
func (d *Design) geneCount() int { return len(d.GeneNames()) }

// model returns the design space in the model's terms. A nil range or
// base axle (only in a spec without its defaults) is the zero range or
// axle.
func (d *Design) model() model.DesignSpace {
	out := model.DesignSpace{Symmetric: d.Symmetric, Knee: d.Knee, HighSpeed: d.HighSpeed, HeaveRatio: d.HeaveRatio}
	for i, r := range d.Ratios {
		if r != nil {
			out.Ratios[i] = *r
		}
	}
	for ax, a := range d.Base {
		if a != nil {
			out.Base.Axles[ax] = *a
		}
	}
	for ax, a := range d.HeaveBase {
		if a != nil {
			out.Base.Heave[ax] = *a
		}
	}
	return out
}

// GeneNames lists the names of the genes of the design space in order,
// as model.DesignSpace.Genes gives them.
func (d *Design) GeneNames() []string {
	md := d.model()
	var out []string
	for _, g := range md.Genes() {
		out = append(out, g.Name)
	}
	return out
}

// normalises reports whether any objective is normalised against a
// reference setup.
func normalises(objectives []model.Objective) bool {
	for _, o := range objectives {
		if o.Aggregation == model.AggregateNormalised {
			return true
		}
	}
	return false
}

// MaxTransientCases bounds a job's manoeuvre and kerb cases together:
// each runs the time-domain model at every evaluation.
const MaxTransientCases = 16
