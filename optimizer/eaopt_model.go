package optimizer

import (
	"fmt"
	"math"
	"math/rand"
	"slices"

	"github.com/MaxHalford/eaopt"
)

// nsga2 is NSGA-II as an eaopt.Model. An eaopt population handed to Apply
// holds 2N evaluated individuals, R_t = P_t ∪ Q_t; Apply leaves in it the N
// survivors P_t+1, with eaopt Fitness 0…N−1 from the crowded-comparison
// order, and their N unevaluated children Q_t+1, which eaopt evaluates
// next. Survivors and children alternate in the slice so that eaopt's
// parallel evaluation, which cuts the slice into contiguous chunks, gives
// each worker the same share of children.
//
// Apply uses nothing but the population and pop.RNG, so islands may run
// it at once.
type nsga2 struct {
	n         int // survivors per island
	crossProb float64
	selector  eaopt.SelTournament
	// variation breeds the children; with VariationDifferential, deF and
	// deCR are its F and CR.
	variation Variation
	deF, deCR float64
}

var _ eaopt.Model = (*nsga2)(nil)

// Validate implements eaopt.Model.
func (m *nsga2) Validate() error {
	if m.n < minPopulation {
		return fmt.Errorf("optimizer: NSGA-II model needs at least %d survivors, has %d", minPopulation, m.n)
	}
	return m.selector.Validate()
}

// Apply implements eaopt.Model: survival, then breeding (see nsga2).
func (m *nsga2) Apply(pop *eaopt.Population) error {
	indis := pop.Individuals
	if len(indis) != 2*m.n {
		return fmt.Errorf("optimizer: NSGA-II population has %d individuals, want %d", len(indis), 2*m.n)
	}
	born := int(pop.Generations) + 1

	order := crowdedOrder(indis)
	survivors := make(eaopt.Individuals, m.n)
	for k := range survivors {
		s := indis[order[k]]
		s.Fitness, s.Evaluated = float64(k), true
		survivors[k] = s
	}

	var children eaopt.Individuals
	var err error
	if m.variation == VariationDifferential {
		children, err = m.breedDifferential(survivors, born, pop.RNG)
	} else {
		children, err = m.breedSBX(survivors, born, pop.RNG)
	}
	if err != nil {
		return err
	}
	for k := 0; k < m.n; k++ {
		indis[2*k] = survivors[k]
		indis[2*k+1] = children[k]
	}
	return nil
}

// breedSBX breeds N children from the survivors: pairs of binary
// tournament winners, SBX with probability p_c, polynomial mutation.
func (m *nsga2) breedSBX(survivors eaopt.Individuals, born int, rng *rand.Rand) (eaopt.Individuals, error) {
	children := make(eaopt.Individuals, 0, m.n+1)
	for len(children) < m.n {
		// SelTournament returns clones of two distinct winners of binary
		// tournaments on Fitness, which is the crowded-comparison order.
		pair, _, err := m.selector.Apply(2, survivors, rng)
		if err != nil {
			return nil, err
		}
		a, b := pair[0].Genome.(*genome), pair[1].Genome.(*genome)
		if rng.Float64() < m.crossProb {
			a.Crossover(b, rng)
		}
		a.Mutate(rng)
		b.Mutate(rng)
		for k, c := range [2]*genome{a, b} {
			if len(children) == m.n {
				break // N odd: the second child of the last pair is dropped
			}
			c.born = born
			c.fitness = float64(m.n + len(children))
			children = append(children, eaopt.Individual{Genome: c, Fitness: c.fitness, ID: pair[k].ID})
		}
	}
	return children, nil
}

// breedDifferential breeds N children from the survivors, one per binary
// tournament winner, by deChild.
func (m *nsga2) breedDifferential(survivors eaopt.Individuals, born int, rng *rand.Rand) (eaopt.Individuals, error) {
	children := make(eaopt.Individuals, 0, m.n)
	for len(children) < m.n {
		pick, _, err := m.selector.Apply(1, survivors, rng)
		if err != nil {
			return nil, err
		}
		// A survivor's Fitness is its index in survivors (Apply).
		c := deChild(survivors, int(pick[0].Fitness), m.deF, m.deCR, rng)
		c.born = born
		c.fitness = float64(m.n + len(children))
		children = append(children, eaopt.Individual{Genome: c, Fitness: c.fitness, ID: pick[0].ID})
	}
	return children, nil
}

// crowdedOrder returns the indices of indis in NSGA-II's crowded-comparison
// order: front index ascending (constrained domination), crowding distance
// descending, index ascending. Fronts of failed evaluations have NaN
// objectives and get crowding 0.
func crowdedOrder(indis eaopt.Individuals) []int {
	obj := make([][]float64, len(indis))
	viol := make([]float64, len(indis))
	for i, indi := range indis {
		g := indi.Genome.(*genome)
		obj[i], viol[i] = g.obj, g.total
	}
	order := make([]int, 0, len(indis))
	var crowd []float64
	for _, front := range NonDominatedSort(obj, viol) {
		crowd = slices.Grow(crowd[:0], len(front))[:len(front)]
		if math.IsInf(viol[front[0]], 1) {
			clear(crowd)
		} else {
			CrowdingDistance(crowd, obj, front)
		}
		pos := make([]int, len(front))
		for k := range pos {
			pos[k] = k
		}
		slices.SortStableFunc(pos, func(a, b int) int {
			switch {
			case crowd[a] > crowd[b]:
				return -1
			case crowd[a] < crowd[b]:
				return 1
			}
			return 0
		})
		for _, k := range pos {
			order = append(order, front[k])
		}
	}
	return order
}
