package optimizer

import (
	"context"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"sync"
	"testing"
)

// TestArchiveOrderFree checks that the archive of a set of solutions is the
// same for any order of insertion, and equals the brute-force non-dominated
// subset (one per objective vector, smallest genes) of the feasible ones.
func TestArchiveOrderFree(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(21, 22))
	for trial := range 40 {
		m := 2 + trial%2
		pts := randomPoints(rng, 60, m, true) // coarse: many ties
		sols := make([]Solution, len(pts))
		for i, p := range pts {
			sols[i] = Solution{Genes: []float64{float64(rng.IntN(5))}, Objectives: p, Feasible: rng.IntN(5) > 0}
		}
		want := bruteArchive(sols, func(s Solution) bool { return s.Feasible })
		for range 3 {
			rng.Shuffle(len(sols), func(i, j int) { sols[i], sols[j] = sols[j], sols[i] })
			var a archive
			for _, s := range sols {
				a.add(s)
			}
			got := make([]Solution, len(a.sols))
			for i, s := range a.sols {
				got[i] = *s
			}
			if !reflect.DeepEqual(got, want) {
				t.Fatalf("trial %d: archive %v, want %v", trial, got, want)
			}
		}
	}
}

// bruteArchive is the archive of the members of sols that keep says, by
// brute force: those no other kept member dominates, one per objective
// vector with the smallest genes, in the archive's order.
func bruteArchive(sols []Solution, keep func(Solution) bool) []Solution {
	var want []Solution
	for _, s := range sols {
		if !keep(s) || slices.ContainsFunc(sols, func(o Solution) bool { return keep(o) && Dominates(o.Objectives, s.Objectives) }) {
			continue
		}
		i := slices.IndexFunc(want, func(o Solution) bool { return slices.Equal(o.Objectives, s.Objectives) })
		switch {
		case i < 0:
			want = append(want, s)
		case lexicographic(s.Genes, want[i].Genes) < 0:
			want[i] = s
		}
	}
	slices.SortFunc(want, func(a, b Solution) int { return solutionOrder(&a, &b) })
	return want
}

// freeGene has two genes, objectives f1 = x1 and f2 = 1 − √x1 (the front
// of ZDT1, so every point is Pareto-optimal), and a second gene that no
// objective depends on: the situation the archive's
// one-per-objective-vector rule is for.
type freeGene struct{}

func (freeGene) Bounds() []Bound     { return []Bound{{0, 1}, {0, 1}} }
func (freeGene) NumObjectives() int  { return 2 }
func (freeGene) NumConstraints() int { return 0 }
func (freeGene) Evaluate(x, obj, _ []float64) error {
	obj[0], obj[1] = x[0], 1-math.Sqrt(x[0])
	return nil
}

// recordingProblem wraps a problem and keeps every solution it evaluates.
type recordingProblem struct {
	Problem
	mu   sync.Mutex
	seen []Solution
}

func (r *recordingProblem) Evaluate(x, obj, viol []float64) error {
	err := r.Problem.Evaluate(x, obj, viol)
	r.mu.Lock()
	r.seen = append(r.seen, Solution{Genes: slices.Clone(x), Objectives: slices.Clone(obj)})
	r.mu.Unlock()
	return err
}

// TestFrontWithoutFreeCopies checks that the front has no two solutions
// with the same objectives though the run evaluated such pairs (children
// whose only change is the free gene).
func TestFrontWithoutFreeCopies(t *testing.T) {
	t.Parallel()
	s := DefaultSettings(2)
	s.PopulationSize, s.Generations = 40, 60
	rec := &recordingProblem{Problem: freeGene{}}
	st := mustNew(t, rec, s)
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	twins := func(sols []Solution) int {
		n := 0
		for i := range sols {
			for j := i + 1; j < len(sols); j++ {
				if slices.Equal(sols[i].Objectives, sols[j].Objectives) && !slices.Equal(sols[i].Genes, sols[j].Genes) {
					n++
				}
			}
		}
		return n
	}
	// Every evaluated point is non-dominated, so an archive without the
	// rule would hold both members of each such pair.
	n := twins(rec.seen)
	if n == 0 {
		t.Fatal("the run evaluated no pairs differing only in the free gene; the test shows nothing")
	}
	t.Logf("%d evaluated pairs differ only in the free gene", n)
	if n := twins(st.Front()); n != 0 {
		t.Errorf("front has %d pairs differing only in the free gene", n)
	}
}
