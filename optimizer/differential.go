package optimizer

import (
	"fmt"
	"math/rand"

	"github.com/MaxHalford/eaopt"
)

// Variation is the operator that breeds an island's children from its
// survivors. The zero value is NSGA-II's own, so settings that leave it
// unset run as before.
type Variation int

const (
	// VariationSBX is simulated binary crossover of two tournament
	// winners with probability CrossoverProbability, then polynomial
	// mutation (Deb et al. 2002; operators.go).
	VariationSBX Variation = iota
	// VariationDifferential is differential evolution's DE/rand/1/bin,
	// then polynomial mutation (see deChild).
	VariationDifferential
)

// String names the variation as the settings' errors print it.
func (v Variation) String() string {
	switch v {
	case VariationSBX:
		return "SBX"
	case VariationDifferential:
		return "differential"
	}
	return fmt.Sprintf("Variation(%d)", int(v))
}

// Defaults of the differential variation: F = 0.5 and CR = 1, the
// settings of Li & Zhang (2009) for their MOEA/D-DE and NSGA-II-DE (from
// memory; see deChild).
const (
	DefaultDifferentialWeight    = 0.5
	DefaultDifferentialCrossover = 1.0
)

// deChild breeds one child from the survivors (in crowded-comparison
// order, survivor k at index k) by DE/rand/1/bin,
//
//	R. Storn and K. Price, "Differential evolution - a simple and
//	efficient heuristic for global optimization over continuous spaces",
//	Journal of Global Optimization 11(4):341-359, 1997,
//	doi:10.1023/A:1008202821328,
//
// as a variation operator inside NSGA-II, the NSGA-II-DE of
//
//	H. Li and Q. Zhang, "Multiobjective optimization problems with
//	complicated Pareto sets, MOEA/D and NSGA-II", IEEE Transactions on
//	Evolutionary Computation 13(2):284-302, 2009,
//	doi:10.1109/TEVC.2008.925798
//
// (both cited from memory), who found it to follow Pareto sets with
// linked genes, such as sets that run diagonally through the box, far
// better than SBX, which recombines each gene on its own. A damper front is such a set: along it all four
// ratios grow together. With x1 the survivor at base (a binary
// tournament winner on the crowded-comparison order, which keeps
// NSGA-II's selection pressure), x2 and x3 two other survivors drawn
// uniformly, all three distinct, and j_r a gene drawn uniformly, gene j
// of the child is
//
//	y_j = x1_j + F (x2_j − x3_j)   if u_j < CR or j = j_r,
//	y_j = x1_j                     otherwise,
//
// clipped to [Lo_j, Hi_j], then mutated as an SBX child is (polyMutate).
// Clipping is this package's choice of repair (Li & Zhang reset a gene
// outside the box at random, as we recall): a front that ends on a bound,
// as a rough road's stiffest corner does, is then reached exactly. The
// child inherits x1's evaluation when its genes equal x1's.
func deChild(survivors eaopt.Individuals, base int, f, cr float64, rng *rand.Rand) *genome {
	n := len(survivors)
	r2 := rng.Intn(n - 1)
	if r2 >= base {
		r2++
	}
	lo, hi := min(base, r2), max(base, r2)
	r3 := rng.Intn(n - 2)
	if r3 >= lo {
		r3++
	}
	if r3 >= hi {
		r3++
	}
	x1 := survivors[base].Genome.(*genome)
	x2 := survivors[r2].Genome.(*genome).genes
	x3 := survivors[r3].Genome.(*genome).genes
	c := x1.Clone().(*genome)
	bounds := c.env.shape.bounds
	jr := rng.Intn(len(c.genes))
	changed := false
	for j := range c.genes {
		if rng.Float64() >= cr && j != jr {
			continue
		}
		y := min(max(x1.genes[j]+f*(x2[j]-x3[j]), bounds[j].Lo), bounds[j].Hi)
		if y != c.genes[j] {
			changed = true
		}
		c.genes[j] = y
	}
	if changed {
		c.invalidate()
	}
	c.Mutate(rng)
	return c
}
