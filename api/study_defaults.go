package api

import (
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// Defaults where a JobSpec is silent. SubmitJob writes them into the
// stored spec, so a stored job does not change meaning when they change.
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

// defaultAxle is the base setting of an axle a spec does not give.
func defaultAxle() *pb.AxleDamping {
	return &pb.AxleDamping{
		KneeBumpMPerS: DefaultKnee, KneeReboundMPerS: DefaultKnee,
		HighSpeedBumpFactor: DefaultHighSpeedFactor, HighSpeedReboundFactor: DefaultHighSpeedFactor,
	}
}

// withDefaults returns a copy of spec with every default filled in. It
// is idempotent: withDefaults(withDefaults(s)) equals withDefaults(s).
func withDefaults(spec *pb.JobSpec) *pb.JobSpec {
	s := proto.CloneOf(spec)
	if s == nil {
		s = &pb.JobSpec{}
	}
	for _, rc := range s.GetRoadCases() {
		if rc != nil && rc.Weight == 0 {
			rc.Weight = 1
		}
	}

	g := gridFromProto(s.Grid)
	s.Grid = &pb.Grid{MinHz: g.MinHz, MaxHz: g.MaxHz, Points: int32(g.Points)}

	if s.DesignSpace == nil {
		s.DesignSpace = &pb.DesignSpace{}
	}
	d := s.DesignSpace
	if d.Ratios == nil {
		d.Ratios = &pb.RatioBounds{}
	}
	for _, r := range []**pb.Range{&d.Ratios.FrontBump, &d.Ratios.FrontRebound, &d.Ratios.RearBump, &d.Ratios.RearRebound} {
		if *r == nil {
			*r = &pb.Range{Min: DefaultRatioMin, Max: DefaultRatioMax}
		}
	}
	if d.Base == nil {
		d.Base = &pb.Setup{}
	}
	if d.Base.Front == nil {
		d.Base.Front = defaultAxle()
	}
	if d.Base.Rear == nil {
		d.Base.Rear = defaultAxle()
	}

	if len(s.Objectives) == 0 {
		s.Objectives = []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM}}
	}
	for _, o := range s.Objectives {
		if o != nil && o.Aggregation == pb.Aggregation_AGGREGATION_UNSPECIFIED {
			o.Aggregation = pb.Aggregation_AGGREGATION_MEAN_SQUARE
		}
	}

	if s.Curves == nil {
		s.Curves = &pb.CurveSettings{}
	}
	if s.Curves.MaxVelocityMPerS == 0 {
		s.Curves.MaxVelocityMPerS = DefaultCurveMaxVelocity
	}
	if s.Curves.Points == 0 {
		s.Curves.Points = DefaultCurvePoints
	}

	if s.Search == nil {
		s.Search = &pb.SearchSettings{}
	}
	q := s.Search
	if q.PopulationSize == 0 {
		q.PopulationSize = DefaultPopulationSize
	}
	if q.Generations == 0 {
		q.Generations = DefaultGenerations
	}
	if q.Seed == nil {
		q.Seed = proto.Uint64(DefaultSeed)
	}
	if q.Islands == 0 {
		q.Islands = 1
	}
	if q.Islands > 1 && q.MigrationEvery > 0 && q.Migrants == 0 {
		q.Migrants = max(1, q.PopulationSize/8)
	}
	if q.CrossoverProbability == nil {
		q.CrossoverProbability = proto.Float64(DefaultCrossoverProbability)
	}
	if q.CrossoverEta == nil {
		q.CrossoverEta = proto.Float64(DefaultCrossoverEta)
	}
	if q.MutationProbability == nil {
		q.MutationProbability = proto.Float64(1 / float64(geneCount(d)))
	}
	if q.MutationEta == nil {
		q.MutationEta = proto.Float64(DefaultMutationEta)
	}
	return s
}

// geneCount is the number of genes of a design space (see
// model.DesignSpace.Genes): two or four ratios, plus one per searched
// knee and high-speed range.
func geneCount(d *pb.DesignSpace) int {
	n := 4
	if d.GetSymmetric() {
		n = 2
	}
	for _, r := range []*pb.Range{d.GetFrontKneeMPerS(), d.GetRearKneeMPerS(), d.GetFrontHighSpeedFactor(), d.GetRearHighSpeedFactor()} {
		if r != nil {
			n++
		}
	}
	return n
}
