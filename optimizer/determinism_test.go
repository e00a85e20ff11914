package optimizer

import (
	"bytes"
	"context"
	"testing"
)

// determinismCases are small runs exercising every path that could break
// bit-identity: constraints, three objectives, islands with migration.
func determinismCases() []struct {
	name string
	p    Problem
	s    Settings
} {
	base := func(n int) Settings {
		s := DefaultSettings(n)
		s.PopulationSize, s.Generations, s.Seed = 24, 12, 7
		return s
	}
	islands := base(30)
	islands.Islands, islands.MigrationEvery, islands.Migrants = 3, 2, 5
	odd := base(12)
	odd.PopulationSize = 13
	deIslands := withVariation(islands, VariationDifferential)
	deOdd := withVariation(odd, VariationDifferential)
	deOdd.DifferentialCrossover = 0.7
	return []struct {
		name string
		p    Problem
		s    Settings
	}{
		{"ZDT1", zdt{n: 30, h: zdt1H}, base(30)},
		{"ZDT1 three islands", zdt{n: 30, h: zdt1H}, islands},
		{"CONSTR", constr{}, base(2)},
		{"DTLZ2 odd population", dtlz2{n: 12}, odd},
		{"faulty", faulty{}, base(10)},
		{"no feasible point", unreachable{}, base(2)},
		{"ZDT1 differential", zdt{n: 30, h: zdt1H}, withVariation(base(30), VariationDifferential)},
		{"ZDT1 differential three islands", zdt{n: 30, h: zdt1H}, deIslands},
		{"CONSTR differential", constr{}, withVariation(base(2), VariationDifferential)},
		{"DTLZ2 differential odd population", dtlz2{n: 12}, deOdd},
	}
}

// finish runs a study to its end and returns its checkpoint.
func finish(t *testing.T, st *Search) []byte {
	t.Helper()
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	cp, err := st.Checkpoint()
	if err != nil {
		t.Fatal(err)
	}
	return cp
}

func mustNew(t *testing.T, p Problem, s Settings) *Search {
	t.Helper()
	st, err := New(p, s)
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// TestWorkersBitIdentical checks that serial and parallel evaluation give
// the same final state, byte for byte (checkpoints hold populations,
// archive, counters and history with exact float bits).
func TestWorkersBitIdentical(t *testing.T) {
	t.Parallel()
	for _, tc := range determinismCases() {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var want []byte
			for _, workers := range []int{1, 2, 3} {
				s := tc.s
				s.Workers = workers
				got := finish(t, mustNew(t, tc.p, s))
				if want == nil {
					want = got
					continue
				}
				if !bytes.Equal(got, want) {
					t.Errorf("Workers=%d: final state differs from Workers=1", workers)
				}
			}
		})
	}
}

// TestRestoreBitIdentical checkpoints at generation k, restores and
// finishes, and compares with the uninterrupted run.
func TestRestoreBitIdentical(t *testing.T) {
	t.Parallel()
	for _, tc := range determinismCases() {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			want := finish(t, mustNew(t, tc.p, tc.s))
			for _, k := range []int{-1, 0, 1, 2, 5, tc.s.Generations - 1, tc.s.Generations} {
				st := mustNew(t, tc.p, tc.s)
				if k >= 0 {
					if _, err := st.Step(context.Background(), k); err != nil {
						t.Fatal(err)
					}
				}
				cp, err := st.Checkpoint()
				if err != nil {
					t.Fatal(err)
				}
				s := tc.s
				s.Workers = 2 // restoring on another machine with more cores
				back, err := Restore(tc.p, s, cp)
				if err != nil {
					t.Fatalf("k=%d: %v", k, err)
				}
				again, _ := back.Checkpoint()
				if !bytes.Equal(again, cp) {
					t.Errorf("k=%d: checkpoint of the restored study differs from the one it came from", k)
				}
				if got := finish(t, back); !bytes.Equal(got, want) {
					t.Errorf("k=%d: restored run ends differently from the uninterrupted one", k)
				}
			}
		})
	}
}

// TestStepChunksBitIdentical runs in steps of one and three generations.
func TestStepChunksBitIdentical(t *testing.T) {
	t.Parallel()
	for _, tc := range determinismCases() {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			want := finish(t, mustNew(t, tc.p, tc.s))
			for _, chunk := range []int{1, 3} {
				st := mustNew(t, tc.p, tc.s)
				for {
					done, err := st.Step(context.Background(), chunk)
					if err != nil {
						t.Fatal(err)
					}
					if done {
						break
					}
				}
				if got := finish(t, st); !bytes.Equal(got, want) {
					t.Errorf("chunk %d: stepped run ends differently", chunk)
				}
			}
		})
	}
}

// TestSeedsDiffer guards the bit-identity tests against a run that does
// not depend on its random streams: another seed must give another state.
func TestSeedsDiffer(t *testing.T) {
	t.Parallel()
	for _, tc := range determinismCases() {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			a := finish(t, mustNew(t, tc.p, tc.s))
			s := tc.s
			s.Seed++
			b := finish(t, mustNew(t, tc.p, s))
			// The seed is stored in the checkpoint; compare what follows.
			if bytes.Equal(a[len(a)/2:], b[len(b)/2:]) {
				t.Error("seeds differ, states do not")
			}
			st := mustNew(t, tc.p, tc.s)
			_ = finish(t, st)
			if p := st.Progress(); p.Generation != tc.s.Generations || p.Evaluations != st.Evaluations() {
				t.Errorf("Progress() = %+v at generation %d", p, st.Generation())
			}
		})
	}
}
