package optimizer

import (
	"math"
	"slices"
)

// archive holds every feasible point seen that no other feasible point seen
// dominates, one per objective vector: of points with equal objectives it
// keeps the one with the lexicographically smallest genes, so that the
// archive does not fill with copies that differ only in genes no objective
// depends on. Its content depends only on the set of points offered, not
// on their order, and it is kept sorted by (objectives, genes)
// lexicographically.
//
// While no feasible point has been seen it keeps instead the least
// violating ones, by constrained domination (Deb 2000, §3): the evaluated
// infeasible points of the smallest total violation, and of those the ones
// that no other dominates in the objectives, one per objective vector as
// above. A failed evaluation (total violation +Inf) never enters. The
// first feasible point empties that set for good, so a job whose
// constraints cannot be met still ends with the setups that came closest.
//
// Solutions in the archive share their slices with immutable genomes or
// own them; they are never modified.
type archive struct {
	sols []*Solution // feasible; pointers: insertion moves 8 bytes per member
	// closest holds the least violating infeasible points while sols is
	// empty, sorted like sols; all have the same total violation.
	closest []*Solution
}

// solutionOrder sorts by objectives, then genes.
func solutionOrder(a, b *Solution) int {
	if c := lexicographic(a.Objectives, b.Objectives); c != 0 {
		return c
	}
	return lexicographic(a.Genes, b.Genes)
}

// add offers s to the archive and reports whether it entered. An
// infeasible solution enters only the closest set (see archive). With two
// objectives the archive, sorted by f1, has f2 strictly falling, so a binary search finds both the one member that
// could dominate s and the run of members s dominates: O(log n) plus the
// move of the tail. Otherwise it scans the archive, O(n M).
func (a *archive) add(sol Solution) bool {
	if !sol.Feasible {
		return a.addInfeasible(sol)
	}
	a.closest = nil
	s := &sol
	if len(s.Objectives) == 2 {
		return a.add2(s)
	}
	return addNonDominated(&a.sols, s)
}

// addInfeasible offers an infeasible s to the closest set, which exists
// only while no feasible point does.
func (a *archive) addInfeasible(sol Solution) bool {
	v := TotalViolation(sol.Violations)
	if len(a.sols) > 0 || math.IsInf(v, 0) || math.IsNaN(v) || v == 0 {
		return false
	}
	if len(a.closest) > 0 {
		switch held := TotalViolation(a.closest[0].Violations); {
		case v > held:
			return false
		case v < held:
			a.closest = a.closest[:0]
		}
	}
	return addNonDominated(&a.closest, &sol)
}

// addNonDominated offers s to the sorted mutually non-dominated set *set,
// by a scan of O(n M).
func addNonDominated(set *[]*Solution, s *Solution) bool {
	sols := *set
	dominated := 0
	for i, t := range sols {
		if Dominates(t.Objectives, s.Objectives) {
			return false
		}
		if slices.Equal(t.Objectives, s.Objectives) {
			if lexicographic(s.Genes, t.Genes) >= 0 {
				return false
			}
			// Same objectives, smaller genes: s takes t's place, and as t
			// dominated nothing in the set neither does s.
			sols[i] = s
			return true
		}
		if Dominates(s.Objectives, t.Objectives) {
			dominated++
		}
	}
	if dominated > 0 {
		sols = slices.DeleteFunc(sols, func(t *Solution) bool { return Dominates(s.Objectives, t.Objectives) })
	}
	i, _ := slices.BinarySearchFunc(sols, s, solutionOrder)
	*set = slices.Insert(sols, i, s)
	return true
}

// members returns the feasible archive, or the closest infeasible points
// while there is no feasible one.
func (a *archive) members() []*Solution {
	if len(a.sols) == 0 {
		return a.closest
	}
	return a.sols
}

// add2 is add for two objectives.
func (a *archive) add2(s *Solution) bool {
	f := s.Objectives
	i, _ := slices.BinarySearchFunc(a.sols, s, solutionOrder)
	// A member with the same objectives sits next to position i.
	for _, k := range [2]int{i - 1, i} {
		if k >= 0 && k < len(a.sols) && slices.Equal(a.sols[k].Objectives, f) {
			if k == i {
				a.sols[k] = s // s has the smaller genes
				return true
			}
			return false
		}
	}
	// Members before i have f1 ≤ s.f1; the lowest f2 among them is the
	// last one's.
	if i > 0 && a.sols[i-1].Objectives[1] <= f[1] {
		return false
	}
	// Members from i on have f1 ≥ s.f1; those with f2 ≥ s.f2 come first.
	j := i
	for j < len(a.sols) && a.sols[j].Objectives[1] >= f[1] {
		j++
	}
	a.sols = slices.Replace(a.sols, i, j, s)
	return true
}

// points returns the objective vectors of the archive (shared slices).
func (a *archive) points() [][]float64 {
	pts := make([][]float64, len(a.sols))
	for i, s := range a.sols {
		pts[i] = s.Objectives
	}
	return pts
}

// best returns the lowest value of each of the m objectives in the
// archive, nil when it is empty.
func (a *archive) best(m int) []float64 {
	if len(a.sols) == 0 {
		return nil
	}
	b := make([]float64, m)
	for j := range b {
		b[j] = math.Inf(1)
	}
	for _, s := range a.sols {
		for j, f := range s.Objectives {
			b[j] = min(b[j], f)
		}
	}
	return b
}
