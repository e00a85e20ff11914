package study

import (
	"context"
	"strings"

	"dampfront/optimizer"
)

// The check of a front in decision space, reported by every job: each
// front point against its same-sum twin (bump = rebound on each axle,
// with the axle's sum kept; only for a design that is not symmetric) and
// against CheckNeighbours seeded neighbours that move every ratio gene by
// ±CheckRadius (a random corner, clipped to the bounds). A point is
// beaten when a candidate is feasible and lower in every objective by
// more than CheckMargin of the front's extent in it. The figures are this
// project's choice (common practice for a sensitivity check, no published
// source).
const (
	CheckNeighbours = 4
	CheckRadius     = 0.03  // in each damping ratio (-)
	CheckMargin     = 0.001 // fraction of the front's extent per objective
	// MaxPolishBudget bounds Search.PolishBudget (evaluations per point).
	MaxPolishBudget = 1000
	// PolishRounds bounds the neighbourhood rounds that close a polish
	// (optimizer.Neighbourhood): each point the check's neighbourhood
	// (the twin and every corner of the ±CheckRadius box) beats by more
	// than PolishMargin is replaced by the neighbour that beats it, which
	// is polished in turn. This project's choice: on the demo job one or
	// two rounds clear the front.
	PolishRounds = 8
	// PolishMargin is the rounds' margin, half the check's, so that a
	// front the rounds cleared stays clear under the check's margin
	// although its extent may shrink a little after the rounds it was
	// measured on.
	PolishMargin = CheckMargin / 2
)

// FrontCheck is the check of a finished job's front in decision space,
// with what the polish did.
type FrontCheck struct {
	Points            int     // feasible front points checked
	Polished          int     // archive points the polish replaced by one that dominates them
	PolishEvaluations int     // evaluations of the polish; 0 without one
	PolishRounds      int     // neighbourhood rounds the polish ran (PolishRounds at most)
	PolishReplaced    int     // points those rounds replaced by a neighbour that beats them
	Twins             int     // points whose same-sum twin differs from them
	Neighbours        int     // random neighbours per point (CheckNeighbours)
	Radius            float64 // half-width of the neighbours in each ratio (CheckRadius)
	Margin            float64 // fraction of the front's extent (CheckMargin)
	BeatenByTwin      int     // points their twin beats
	BeatenByNeighbour int     // points a neighbour beats and their twin does not
	Beaten            int     // BeatenByTwin + BeatenByNeighbour
	Evaluations       int     // evaluations of the check
	// Points beaten, with the genes that beat them, in front order (not
	// stored; for tests and reports in-process).
	BeatenPoints []BeatenPoint
}

// BeatenPoint is a front point the check found beaten.
type BeatenPoint struct {
	Index  int       // in the front
	ByTwin bool      // beaten by its twin, else by a neighbour
	By     []float64 // genes of the candidate that beats it
}

// twin writes into dst the same-sum twin of genes x: on each axle bump
// and rebound ratios both become their mean, clipped to their bounds; it
// reports false for a symmetric design, whose points are their own twins.
func (pl *Plan) twin(x, dst []float64) bool {
	d := pl.problem.Design()
	if d.Symmetric {
		return false
	}
	y := d.Encode(d.Decode(x).SameSumTwin())
	for i, g := range pl.problem.Genes() {
		dst[i] = min(g.Max, max(g.Min, y[i]))
	}
	return true
}

// checkRadius is CheckRadius for every damping-ratio gene (its name ends
// in "ratio") and 0 for the others (knees, high-speed factors).
func (pl *Plan) checkRadius() []float64 {
	genes := pl.problem.Genes()
	r := make([]float64, len(genes))
	for i, g := range genes {
		if isRatioGene(g.Name) {
			r[i] = CheckRadius
		}
	}
	return r
}

// isRatioGene reports whether a gene is a damping ratio, which the check's
// neighbourhood moves: its name ends in "ratio".
func isRatioGene(name string) bool { return strings.HasSuffix(name, "ratio") }

// PolishSettings returns the plan's polish settings (nil without one) with the
// same-sum twin as the first poll point, closed by the neighbourhood
// rounds on the check's neighbourhood.
func (pl *Plan) PolishSettings(workers int) *optimizer.Polish {
	b := pl.spec.Search.PolishBudget
	if b == 0 {
		return nil
	}
	p := optimizer.DefaultPolish(pl.settings.Seed)
	p.Budget, p.Twin, p.Workers = b, pl.twin, max(1, workers)
	p.Neighbourhood = &optimizer.Neighbourhood{Radius: pl.checkRadius(), Margin: PolishMargin, Rounds: PolishRounds}
	return &p
}

// CheckFront checks front (a finished search's) in decision space; see
// FrontCheck. polished is what the polish did, nil without one. The
// result depends on the plan, the front and the seed only.
func (pl *Plan) CheckFront(ctx context.Context, front []optimizer.Solution, polished *optimizer.PolishReport, workers int) (*FrontCheck, error) {
	rep, err := optimizer.CheckFront(ctx, pl.SearchProblem(), front, optimizer.FrontCheck{
		Twin: pl.twin, Radius: pl.checkRadius(), Perturbations: CheckNeighbours,
		Margin: CheckMargin, Seed: pl.settings.Seed, Workers: max(1, workers),
	})
	if err != nil {
		return nil, err
	}
	fc := &FrontCheck{
		Points: rep.Points, Twins: rep.Twins, Neighbours: CheckNeighbours, Radius: CheckRadius, Margin: CheckMargin,
		BeatenByTwin: rep.BeatenByTwin, BeatenByNeighbour: rep.BeatenByNeighbour, Beaten: rep.Beaten,
		Evaluations: rep.Evaluations,
	}
	if polished != nil {
		fc.Polished, fc.PolishEvaluations = polished.Improved, polished.Evaluations
		fc.PolishRounds, fc.PolishReplaced = polished.Rounds, polished.Replaced
	}
	for i, pc := range rep.Checks {
		if pc.Beaten {
			fc.BeatenPoints = append(fc.BeatenPoints, BeatenPoint{Index: i, ByTwin: pc.ByTwin, By: pc.By.Genes})
		}
	}
	return fc, nil
}
