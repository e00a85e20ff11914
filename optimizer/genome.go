package optimizer

import (
	"context"
	"fmt"
	"math"
	"math/rand"
	"strings"

	"github.com/MaxHalford/eaopt"
)

// evalEnv is what every genome of a search shares: the problem, the
// operator settings and the evaluation gate. It is written only between
// Steps, when no genome is being evaluated.
type evalEnv struct {
	problem Problem
	shape   problemShape
	etaC    float64
	pm      float64
	etaM    float64
	ctx     context.Context
	gate    chan struct{} // holds one token per running evaluation, Workers long
}

// genome is one individual's decision vector with its evaluation. It
// implements eaopt.Genome. Once evaluated it is never modified: genomes are
// shared between the live eaopt population and the committed state of the
// search, and only fresh clones are recombined and mutated.
type genome struct {
	env   *evalEnv
	genes []float64
	obj   []float64
	viol  []float64
	// total is the total constraint violation, +Inf when the evaluation
	// failed.
	total     float64
	reason    string
	evaluated bool
	// fresh is true when Problem.Evaluate ran for this genome, false when
	// the evaluation was inherited from a parent with the same genes.
	fresh bool
	// born is the generation in which the genome was made.
	born int
	// fitness is what Evaluate reports to eaopt: the provisional slot
	// fitness of a child, or the stored fitness of a restored individual.
	fitness float64
}

var _ eaopt.Genome = (*genome)(nil)

func newGenome(env *evalEnv, genes []float64, born int, fitness float64) *genome {
	return &genome{
		env:     env,
		genes:   genes,
		obj:     make([]float64, env.shape.nObj),
		viol:    make([]float64, env.shape.nCon),
		born:    born,
		fitness: fitness,
	}
}

// Evaluate implements eaopt.Genome. It calls Problem.Evaluate unless the
// genome is already evaluated, at most Workers at once across the search,
// and returns the genome's eaopt fitness. Its only error is the
// cancellation of the Step's context, checked before and after waiting for
// a worker; problem errors make the genome infeasible instead.
func (g *genome) Evaluate() (float64, error) {
	if g.evaluated {
		return g.fitness, nil
	}
	ctx := g.env.ctx
	if err := ctx.Err(); err != nil {
		return 0, err
	}
	select {
	case g.env.gate <- struct{}{}:
	case <-ctx.Done():
		return 0, ctx.Err()
	}
	defer func() { <-g.env.gate }()
	if err := ctx.Err(); err != nil {
		return 0, err
	}
	err := g.env.problem.Evaluate(g.genes, g.obj, g.viol)
	g.settle(err)
	g.evaluated, g.fresh = true, true
	return g.fitness, nil
}

// settle turns the problem's answer into the genome's verdict. A failure
// (error, NaN or infinite objective, NaN or infinite violation) sets every
// objective to NaN, every violation to +Inf and total to +Inf. Otherwise
// negative violations become 0 and total is their sum.
func (g *genome) settle(err error) {
	reason := ""
	switch {
	case err != nil:
		reason = "evaluation failed: " + err.Error()
	default:
		for j, f := range g.obj {
			if math.IsNaN(f) || math.IsInf(f, 0) {
				reason = fmt.Sprintf("objective %d is %g", j, f)
				break
			}
		}
		if reason == "" {
			for k, v := range g.viol {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					reason = fmt.Sprintf("constraint %d violation is %g", k, v)
					break
				}
			}
		}
	}
	if reason != "" {
		for j := range g.obj {
			g.obj[j] = math.NaN()
		}
		for k := range g.viol {
			g.viol[k] = math.Inf(1)
		}
		g.total, g.reason = math.Inf(1), reason
		return
	}
	for k, v := range g.viol {
		if v < 0 {
			g.viol[k] = 0
		}
	}
	g.total = TotalViolation(g.viol)
	if g.total > 0 {
		var b strings.Builder
		for k, v := range g.viol {
			if v > 0 {
				if b.Len() > 0 {
					b.WriteString("; ")
				}
				fmt.Fprintf(&b, "constraint %d violated by %g", k, v)
			}
		}
		g.reason = b.String()
	}
}

// feasible reports whether the genome evaluated and satisfies every
// constraint.
func (g *genome) feasible() bool { return g.evaluated && g.total == 0 }

// solution returns the genome as a Solution sharing its slices.
func (g *genome) solution() Solution {
	return Solution{Genes: g.genes, Objectives: g.obj, Violations: g.viol, Feasible: g.feasible(), Reason: g.reason}
}

// Mutate implements eaopt.Genome by polynomial mutation of every gene with
// probability p_m. A changed genome loses its evaluation.
func (g *genome) Mutate(rng *rand.Rand) {
	if polyMutate(g.genes, g.env.shape.bounds, g.env.pm, g.env.etaM, rng) {
		g.invalidate()
	}
}

// Crossover implements eaopt.Genome by SBX of g and mate, both changed in
// place into the two children. A changed genome loses its evaluation.
func (g *genome) Crossover(mate eaopt.Genome, rng *rand.Rand) {
	m := mate.(*genome)
	if sbx(g.genes, m.genes, g.env.shape.bounds, g.env.etaC, rng) {
		g.invalidate()
		m.invalidate()
	}
}

// Clone implements eaopt.Genome. The clone owns its slices and keeps the
// evaluation, which stays valid while its genes are unchanged.
func (g *genome) Clone() eaopt.Genome {
	c := *g
	c.genes = append([]float64(nil), g.genes...)
	c.obj = append([]float64(nil), g.obj...)
	c.viol = append([]float64(nil), g.viol...)
	c.fresh = false
	return &c
}

func (g *genome) invalidate() {
	g.evaluated, g.fresh = false, false
	g.total, g.reason = 0, ""
}
