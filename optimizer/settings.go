package optimizer

import (
	"errors"
	"fmt"
	"math"
)

// Settings configure a Search. Every field is read when the search is made;
// Workers, Generations and Progress may differ between a search and the
// search restored from its checkpoint, every other field must match.
type Settings struct {
	// PopulationSize is N, the number of survivors per island and per
	// generation; each generation breeds N children per island. At
	// least 4.
	PopulationSize int
	// Generations is the total number of generations after the initial
	// population. 0 runs the initial population only.
	Generations int
	// Seed selects the random streams. The same seed and settings give
	// the same run.
	Seed uint64
	// Islands is the number of populations evolved side by side
	// (eaopt's NPops). At least 1.
	Islands int
	// MigrationEvery is the number of generations between migrations
	// (eaopt's MigFrequency); 0 never migrates. Ignored with one island.
	MigrationEvery int
	// Migrants is the number of individuals exchanged between each pair
	// of neighbouring islands at a migration (eaopt's MigRing), 1 to
	// 2 PopulationSize. Ignored without migration.
	Migrants int
	// CrossoverProbability is p_c, the probability that a pair of parents
	// is recombined by SBX; in [0, 1]. Deb et al. (2002) used 0.9.
	CrossoverProbability float64
	// CrossoverEta is η_c, the distribution index of SBX; larger values
	// keep children closer to their parents. Deb et al. (2002) used 20.
	CrossoverEta float64
	// MutationProbability is p_m, the probability that each gene of a
	// child is mutated; in [0, 1]. Deb et al. (2002) used 1/n for n genes.
	MutationProbability float64
	// MutationEta is η_m, the distribution index of polynomial mutation.
	// Deb et al. (2002) used 20.
	MutationEta float64
	// Variation is the operator that breeds children: VariationSBX (the
	// zero value, NSGA-II's SBX and polynomial mutation) or
	// VariationDifferential (DE/rand/1/bin and polynomial mutation, see
	// deChild), which reaches a damper front in a fraction of SBX's
	// evaluations. CrossoverProbability and CrossoverEta are not used
	// by VariationDifferential; the mutation settings are.
	Variation Variation
	// DifferentialWeight is DE's F, in (0, 2]; DifferentialCrossover is
	// its CR, in [0, 1] (see DefaultDifferentialWeight). Both are used
	// only by VariationDifferential and must be 0 with VariationSBX.
	DifferentialWeight    float64
	DifferentialCrossover float64
	// Workers is the largest number of evaluations run at once. 1 runs
	// them one after the other; more turns on eaopt's parallel
	// evaluation, which starts GOMAXPROCS goroutines per island, so the
	// effective number is at most Islands × GOMAXPROCS. The result does
	// not depend on it.
	Workers int
	// StagnationWindow, when above 0, ends the search before Generations
	// once the archive's hypervolume has grown by no more than
	// StagnationTolerance of its value over the last StagnationWindow
	// generations (see Search.Done):
	//
	//	HV_t − HV_{t−W} ≤ tol · HV_t,  HV_t > 0.
	//
	// 0 (the default) runs every generation. Like Generations it may
	// differ between a search and its restored self: it only decides
	// where the run stops, and the history it reads is in the checkpoint.
	StagnationWindow int
	// StagnationTolerance is tol above, a fraction in [0, 1).
	StagnationTolerance float64
	// ReferencePoint is the hypervolume reference point, one value per
	// objective in the objectives' units. When nil the search fixes one
	// from the first generation with a feasible point (see
	// autoReference) and keeps it in its state.
	ReferencePoint []float64
	// Progress, when not nil, is called on the stepping goroutine after
	// each completed generation, the initial one included. It may read the
	// search but must not step it.
	Progress func(Progress)
}

// DefaultSettings returns the settings of Deb et al. (2002), §V, for a
// problem of nGenes genes: N = 100, p_c = 0.9, η_c = 20, p_m = 1/n,
// η_m = 20, here with 250 generations, one island and one worker.
func DefaultSettings(nGenes int) Settings {
	pm := 1.0
	if nGenes > 0 {
		pm = 1 / float64(nGenes)
	}
	return Settings{
		PopulationSize:       100,
		Generations:          250,
		Seed:                 1,
		Islands:              1,
		CrossoverProbability: 0.9,
		CrossoverEta:         20,
		MutationProbability:  pm,
		MutationEta:          20,
		Workers:              1,
	}
}

// minPopulation is the smallest PopulationSize: a binary tournament for the
// second parent of a pair needs two contestants besides the first winner
// (eaopt's SelTournament draws without replacement).
const minPopulation = 4

// Validate checks s against a problem with nObj objectives and returns
// every problem found, not only the first: nil, or an error that wraps one
// *FieldError per bad field, in the order of the fields above (errors.As
// finds the first). These are the only checks of the settings; callers
// that take settings from users (a job spec) call Validate and map the
// fields.
func (s Settings) Validate(nObj int) error {
	var errs []error
	bad := func(field, format string, args ...any) {
		errs = append(errs, &FieldError{Field: "Settings." + field, Msg: fmt.Sprintf(format, args...)})
	}
	if s.PopulationSize < minPopulation {
		bad("PopulationSize", "must be at least %d, got %d", minPopulation, s.PopulationSize)
	}
	if s.Generations < 0 {
		bad("Generations", "must not be negative, got %d", s.Generations)
	}
	if s.Islands < 1 {
		bad("Islands", "must be at least 1, got %d", s.Islands)
	}
	if s.MigrationEvery < 0 {
		bad("MigrationEvery", "must not be negative, got %d", s.MigrationEvery)
	}
	switch {
	case s.migrates() && (s.Migrants < 1 || s.Migrants > 2*s.PopulationSize):
		bad("Migrants", "must be 1 to 2×PopulationSize = %d when islands migrate, got %d", 2*s.PopulationSize, s.Migrants)
	case s.Migrants < 0:
		bad("Migrants", "must not be negative, got %d", s.Migrants)
	}
	if !(s.CrossoverProbability >= 0 && s.CrossoverProbability <= 1) {
		bad("CrossoverProbability", "must be in [0, 1], got %g", s.CrossoverProbability)
	}
	if !(s.CrossoverEta >= 0) || math.IsInf(s.CrossoverEta, 0) {
		bad("CrossoverEta", "must be finite and not negative, got %g", s.CrossoverEta)
	}
	if !(s.MutationProbability >= 0 && s.MutationProbability <= 1) {
		bad("MutationProbability", "must be in [0, 1], got %g", s.MutationProbability)
	}
	if !(s.MutationEta >= 0) || math.IsInf(s.MutationEta, 0) {
		bad("MutationEta", "must be finite and not negative, got %g", s.MutationEta)
	}
	switch s.Variation {
	case VariationSBX:
		if s.DifferentialWeight != 0 {
			bad("DifferentialWeight", "is used only with the differential variation; leave it 0, got %g", s.DifferentialWeight)
		}
		if s.DifferentialCrossover != 0 {
			bad("DifferentialCrossover", "is used only with the differential variation; leave it 0, got %g", s.DifferentialCrossover)
		}
	case VariationDifferential:
		if !(s.DifferentialWeight > 0 && s.DifferentialWeight <= 2) {
			bad("DifferentialWeight", "must be in (0, 2], got %g", s.DifferentialWeight)
		}
		if !(s.DifferentialCrossover >= 0 && s.DifferentialCrossover <= 1) {
			bad("DifferentialCrossover", "must be in [0, 1], got %g", s.DifferentialCrossover)
		}
	default:
		bad("Variation", "must be SBX (%d) or differential (%d), got %d", VariationSBX, VariationDifferential, int(s.Variation))
	}
	if s.Workers < 1 {
		bad("Workers", "must be at least 1, got %d", s.Workers)
	}
	if s.StagnationWindow < 0 {
		bad("StagnationWindow", "must not be negative, got %d", s.StagnationWindow)
	}
	if !(s.StagnationTolerance >= 0 && s.StagnationTolerance < 1) {
		bad("StagnationTolerance", "must be in [0, 1), got %g", s.StagnationTolerance)
	}
	if s.ReferencePoint != nil {
		if len(s.ReferencePoint) != nObj {
			bad("ReferencePoint", "has %d values for %d objectives", len(s.ReferencePoint), nObj)
		}
		for j, r := range s.ReferencePoint {
			if math.IsNaN(r) || math.IsInf(r, 0) {
				bad(fmt.Sprintf("ReferencePoint[%d]", j), "must be finite, got %g", r)
			}
		}
	}
	switch len(errs) {
	case 0:
		return nil
	case 1:
		return errs[0]
	}
	return errors.Join(errs...)
}

// migrates reports whether islands exchange individuals.
func (s *Settings) migrates() bool { return s.Islands > 1 && s.MigrationEvery > 0 }

// settingField is one setting that fixes the course of a run, as the bits
// a checkpoint stores.
type settingField struct {
	field string
	bits  uint64
	float bool
}

// show renders stored bits of the field for an error message.
func (f settingField) show(bits uint64) any {
	if f.float {
		return math.Float64frombits(bits)
	}
	return bits
}

// fingerprint lists the settings a checkpoint must match, in checkpoint
// order (ReferencePoint is stored after them). Generations, Workers,
// the stagnation rule and Progress are not in it: they do not change the
// course of a run, only where it ends. The variation's settings follow
// in a checkpoint of version 4 only (variationFingerprint).
func (s *Settings) fingerprint() []settingField {
	fl := func(name string, v float64) settingField {
		return settingField{field: name, bits: math.Float64bits(v), float: true}
	}
	return []settingField{
		{field: "PopulationSize", bits: uint64(s.PopulationSize)},
		{field: "Seed", bits: s.Seed},
		{field: "Islands", bits: uint64(s.Islands)},
		{field: "MigrationEvery", bits: uint64(s.MigrationEvery)},
		{field: "Migrants", bits: uint64(s.Migrants)},
		fl("CrossoverProbability", s.CrossoverProbability),
		fl("CrossoverEta", s.CrossoverEta),
		fl("MutationProbability", s.MutationProbability),
		fl("MutationEta", s.MutationEta),
	}
}

// variationFingerprint lists the variation's settings, which a checkpoint
// of version 4 stores after fingerprint's; earlier versions were all
// written by VariationSBX with both weights 0.
func (s *Settings) variationFingerprint() []settingField {
	return []settingField{
		{field: "Variation", bits: uint64(s.Variation)},
		{field: "DifferentialWeight", bits: math.Float64bits(s.DifferentialWeight), float: true},
		{field: "DifferentialCrossover", bits: math.Float64bits(s.DifferentialCrossover), float: true},
	}
}
