package optimizer

import (
	"context"
	"encoding/binary"
	"hash/crc32"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"
)

// unreachable is CONSTR (Deb et al. 2002, §VI-B) with a third constraint
// that no point of the box meets, x1 ≥ 1.2 on x1 ∈ [0.1, 1], reported as
// max(0, 1.2 − x1). On x1 = 1 both of CONSTR's constraints hold (g1 =
// x2 + 3 ≥ 0, g2 = 8 − x2 ≥ 0 for x2 ≤ 5), so the smallest total
// violation is 0.2, reached on the edge x1 = 1 and nowhere else (worked
// by hand).
type unreachable struct{ constr }

func (unreachable) NumConstraints() int { return 3 }
func (u unreachable) Evaluate(x, obj, viol []float64) error {
	_ = u.constr.Evaluate(x, obj, viol[:2])
	viol[2] = max(0, 1.2-x[0])
	return nil
}

// TestArchiveClosestOrderFree checks that, with no feasible point, the
// archive keeps exactly the brute-force set of constrained domination
// (Deb 2000, §3): the points of the smallest total violation, of those the
// ones no other dominates in the objectives, one per objective vector
// with the smallest genes; whatever the order of insertion; and that the
// first feasible point replaces them.
func TestArchiveClosestOrderFree(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(31, 32))
	for trial := range 40 {
		m := 2 + trial%2
		pts := randomPoints(rng, 60, m, true)
		sols := make([]Solution, len(pts))
		for i, p := range pts {
			viol := []float64{float64(rng.IntN(3)) / 4, float64(1+rng.IntN(3)) / 4} // coarse: ties in the total
			sols[i] = Solution{Genes: []float64{float64(rng.IntN(5))}, Objectives: p, Violations: viol}
		}
		sols = append(sols, Solution{Genes: []float64{9}, Objectives: pts[0], Violations: []float64{math.Inf(1), math.Inf(1)}})
		least := math.Inf(1)
		for _, s := range sols {
			least = min(least, TotalViolation(s.Violations))
		}
		want := bruteArchive(sols, func(s Solution) bool { return TotalViolation(s.Violations) == least })
		for range 3 {
			rng.Shuffle(len(sols), func(i, j int) { sols[i], sols[j] = sols[j], sols[i] })
			var a archive
			for _, s := range sols {
				a.add(s)
			}
			got := make([]Solution, len(a.members()))
			for i, s := range a.members() {
				got[i] = *s
			}
			if !reflect.DeepEqual(got, want) {
				t.Fatalf("trial %d: closest %v, want %v", trial, got, want)
			}
			feasible := Solution{Genes: []float64{0}, Objectives: pts[1], Violations: []float64{0, 0}, Feasible: true}
			a.add(feasible)
			if ms := a.members(); len(ms) != 1 || !ms[0].Feasible || len(a.closest) != 0 {
				t.Fatalf("trial %d: after a feasible point the archive holds %v", trial, ms)
			}
		}
	}
}

// TestInfeasibleSearchKeepsClosest runs a problem no point of which is
// feasible: the front must not be empty, must say it is infeasible, and
// must hold points near the hand-worked least total violation 0.2 (on
// x1 = 1). Tolerance 0.02, 2 % of x1's range: the search only approaches
// the bound, and 30 generations of 24 get well within that (observed
// about 1e-3); a search that kept no points or arbitrary ones fails it.
func TestInfeasibleSearchKeepsClosest(t *testing.T) {
	t.Parallel()
	s := DefaultSettings(2)
	s.PopulationSize, s.Generations, s.Seed = 24, 30, 3
	st := mustNew(t, unreachable{}, s)
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	front := st.Front()
	if len(front) == 0 {
		t.Fatal("an infeasible search ends with an empty front")
	}
	if st.Feasible() {
		t.Error("Feasible() is true for a problem with no feasible point")
	}
	for _, sol := range front {
		v := TotalViolation(sol.Violations)
		if sol.Feasible || sol.Reason == "" || v < 0.2-1e-12 || v > 0.2+0.02 {
			t.Errorf("front holds %v: feasible %v, reason %q, total violation %v (want 0.2 to 0.22)", sol.Genes, sol.Feasible, sol.Reason, v)
		}
	}
	if p := st.Progress(); p.Hypervolume != 0 || p.Best != nil {
		t.Errorf("progress of an infeasible search: hypervolume %v, best %v; want 0 and none", p.Hypervolume, p.Best)
	}
}

// TestRestoreVersion1Checkpoint checks that a checkpoint of the first
// format (no closest part) still restores and finishes bit for bit like
// the uninterrupted run, for a feasible search, where the two formats
// hold the same state.
func TestRestoreVersion1Checkpoint(t *testing.T) {
	t.Parallel()
	s := DefaultSettings(2)
	s.PopulationSize, s.Generations, s.Seed = 16, 8, 5
	want := finish(t, mustNew(t, constr{}, s))
	st := mustNew(t, constr{}, s)
	if _, err := st.Step(context.Background(), 3); err != nil {
		t.Fatal(err)
	}
	cp, err := st.Checkpoint()
	if err != nil {
		t.Fatal(err)
	}
	// The history is last: count, then per entry generation, evaluations,
	// hypervolume and best (present byte and M values).
	hist := 4
	for _, p := range st.History() {
		hist += 8 + 8 + 8 + 1 + 8*len(p.Best)
	}
	body := cp[:len(cp)-4]
	at := len(body) - hist - 4 // the closest part's count, 0 here
	if binary.LittleEndian.Uint32(body[at:]) != 0 {
		t.Fatal("closest part not where expected")
	}
	v1 := slices.Concat(body[:at], body[at+4:])
	binary.LittleEndian.PutUint32(v1[len(checkpointMagic):], 1)
	v1 = binary.LittleEndian.AppendUint32(v1, crc32.ChecksumIEEE(v1))
	back, err := Restore(constr{}, s, v1)
	if err != nil {
		t.Fatal(err)
	}
	if got := finish(t, back); !slices.Equal(got, want) {
		t.Error("a version 1 checkpoint resumes to another end than the uninterrupted run")
	}
}
