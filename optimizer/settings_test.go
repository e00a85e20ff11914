package optimizer

import (
	"context"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"math"
	"testing"
)

// badProblem is a Problem with adjustable shape.
type badProblem struct {
	bounds []Bound
	m, c   int
}

func (b badProblem) Bounds() []Bound                { return b.bounds }
func (b badProblem) NumObjectives() int             { return b.m }
func (b badProblem) NumConstraints() int            { return b.c }
func (badProblem) Evaluate(_, _, _ []float64) error { return nil }

// TestNewFieldErrors checks that each invalid input is refused with a
// *FieldError naming the field.
func TestNewFieldErrors(t *testing.T) {
	t.Parallel()
	good := badProblem{bounds: []Bound{{0, 1}}, m: 2}
	valid := DefaultSettings(1)
	cases := []struct {
		name  string
		p     Problem
		edit  func(*Settings)
		field string
	}{
		{"nil problem", nil, nil, "Problem"},
		{"no genes", badProblem{m: 2}, nil, "Problem.Bounds"},
		{"reversed bound", badProblem{bounds: []Bound{{0, 1}, {2, 1}}, m: 2}, nil, "Problem.Bounds[1]"},
		{"infinite bound", badProblem{bounds: []Bound{{0, math.Inf(1)}}, m: 2}, nil, "Problem.Bounds[0]"},
		{"no objectives", badProblem{bounds: []Bound{{0, 1}}}, nil, "Problem.NumObjectives"},
		{"four objectives", badProblem{bounds: []Bound{{0, 1}}, m: 4}, nil, "Problem.NumObjectives"},
		{"negative constraints", badProblem{bounds: []Bound{{0, 1}}, m: 2, c: -1}, nil, "Problem.NumConstraints"},
		{"population", good, func(s *Settings) { s.PopulationSize = 3 }, "Settings.PopulationSize"},
		{"generations", good, func(s *Settings) { s.Generations = -1 }, "Settings.Generations"},
		{"islands", good, func(s *Settings) { s.Islands = 0 }, "Settings.Islands"},
		{"migration every", good, func(s *Settings) { s.MigrationEvery = -2 }, "Settings.MigrationEvery"},
		{"migrants", good, func(s *Settings) { s.Islands, s.MigrationEvery, s.Migrants = 2, 5, 0 }, "Settings.Migrants"},
		{"too many migrants", good, func(s *Settings) { s.Islands, s.MigrationEvery, s.Migrants = 2, 5, 201 }, "Settings.Migrants"},
		{"crossover probability", good, func(s *Settings) { s.CrossoverProbability = 1.5 }, "Settings.CrossoverProbability"},
		{"crossover probability NaN", good, func(s *Settings) { s.CrossoverProbability = math.NaN() }, "Settings.CrossoverProbability"},
		{"crossover eta", good, func(s *Settings) { s.CrossoverEta = -1 }, "Settings.CrossoverEta"},
		{"mutation probability", good, func(s *Settings) { s.MutationProbability = -0.1 }, "Settings.MutationProbability"},
		{"mutation eta", good, func(s *Settings) { s.MutationEta = math.Inf(1) }, "Settings.MutationEta"},
		{"variation", good, func(s *Settings) { s.Variation = 2 }, "Settings.Variation"},
		{"differential weight with SBX", good, func(s *Settings) { s.DifferentialWeight = 0.5 }, "Settings.DifferentialWeight"},
		{"differential crossover with SBX", good, func(s *Settings) { s.DifferentialCrossover = 1 }, "Settings.DifferentialCrossover"},
		{"differential weight", good, func(s *Settings) { *s = withVariation(*s, VariationDifferential); s.DifferentialWeight = 0 }, "Settings.DifferentialWeight"},
		{"differential weight above 2", good, func(s *Settings) { *s = withVariation(*s, VariationDifferential); s.DifferentialWeight = 2.5 }, "Settings.DifferentialWeight"},
		{"differential crossover", good, func(s *Settings) { *s = withVariation(*s, VariationDifferential); s.DifferentialCrossover = math.NaN() }, "Settings.DifferentialCrossover"},
		{"workers", good, func(s *Settings) { s.Workers = 0 }, "Settings.Workers"},
		{"stagnation window", good, func(s *Settings) { s.StagnationWindow = -1 }, "Settings.StagnationWindow"},
		{"stagnation tolerance", good, func(s *Settings) { s.StagnationTolerance = 1 }, "Settings.StagnationTolerance"},
		{"stagnation tolerance NaN", good, func(s *Settings) { s.StagnationTolerance = math.NaN() }, "Settings.StagnationTolerance"},
		{"reference length", good, func(s *Settings) { s.ReferencePoint = []float64{1} }, "Settings.ReferencePoint"},
		{"reference NaN", good, func(s *Settings) { s.ReferencePoint = []float64{1, math.NaN()} }, "Settings.ReferencePoint[1]"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			s := valid
			if tc.edit != nil {
				tc.edit(&s)
			}
			_, err := New(tc.p, s)
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Field != tc.field {
				t.Errorf("got %v, want a FieldError on %s", err, tc.field)
			}
		})
	}
	if _, err := New(good, valid); err != nil {
		t.Errorf("valid settings refused: %v", err)
	}
}

// TestRestoreRefusals checks that a checkpoint is refused for other
// settings or another problem shape, naming the field, and that damaged
// bytes give ErrCheckpoint.
func TestRestoreRefusals(t *testing.T) {
	t.Parallel()
	p := zdt{n: 30, h: zdt1H}
	s := DefaultSettings(30)
	s.PopulationSize, s.Generations = 10, 4
	st := mustNew(t, p, s)
	if _, err := st.Step(context.Background(), 2); err != nil {
		t.Fatal(err)
	}
	cp, err := st.Checkpoint()
	if err != nil {
		t.Fatal(err)
	}

	fields := []struct {
		name  string
		p     Problem
		edit  func(*Settings)
		field string
	}{
		{"population", p, func(s *Settings) { s.PopulationSize = 12 }, "Settings.PopulationSize"},
		{"seed", p, func(s *Settings) { s.Seed = 2 }, "Settings.Seed"},
		{"islands", p, func(s *Settings) { s.Islands = 2 }, "Settings.Islands"},
		{"mutation", p, func(s *Settings) { s.MutationEta = 15 }, "Settings.MutationEta"},
		{"reference", p, func(s *Settings) { s.ReferencePoint = []float64{1, 1} }, "Settings.ReferencePoint"},
		{"variation", p, func(s *Settings) { *s = withVariation(*s, VariationDifferential) }, "Settings.Variation"},
		{"genes", zdt{n: 10, h: zdt1H}, func(s *Settings) {}, "Problem.Bounds"},
		{"constraints", constrainedZDT{p}, func(s *Settings) {}, "Problem.NumConstraints"},
	}
	for _, tc := range fields {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			s2 := s
			tc.edit(&s2)
			_, err := Restore(tc.p, s2, cp)
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Field != tc.field {
				t.Errorf("got %v, want a FieldError on %s", err, tc.field)
			}
		})
	}

	t.Run("allowed changes", func(t *testing.T) {
		t.Parallel()
		s2 := s
		s2.Workers, s2.Generations, s2.Progress = 2, 9, func(Progress) {}
		if _, err := Restore(p, s2, cp); err != nil {
			t.Errorf("Restore with other Workers, Generations and Progress: %v", err)
		}
	})

	damaged := []struct {
		name string
		b    []byte
	}{
		{"empty", nil},
		{"truncated", cp[:len(cp)/2]},
		{"flipped byte", flip(cp, len(cp)/3)},
		{"wrong magic", flip(cp, 0)},
		{"future version", resum(flip(cp, len(checkpointMagic)))},
		{"trailing bytes", resum(append(append([]byte(nil), cp[:len(cp)-4]...), 0, 0, 0, 0, 0))},
	}
	for _, tc := range damaged {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			if _, err := Restore(p, s, tc.b); !errors.Is(err, ErrCheckpoint) {
				t.Errorf("got %v, want ErrCheckpoint", err)
			}
		})
	}
}

// resum replaces the trailing checksum of b, so that only the structure
// can reject it.
func resum(b []byte) []byte {
	body := b[:len(b)-4]
	return binary.LittleEndian.AppendUint32(append([]byte(nil), body...), crc32.ChecksumIEEE(body))
}

func flip(b []byte, i int) []byte {
	c := append([]byte(nil), b...)
	c[i] ^= 0x40
	return c
}

// constrainedZDT is ZDT1 with one never-violated constraint.
type constrainedZDT struct{ zdt }

func (constrainedZDT) NumConstraints() int { return 1 }
func (c constrainedZDT) Evaluate(x, obj, viol []float64) error {
	viol[0] = 0
	return c.zdt.Evaluate(x, obj, nil)
}

// TestInheritedEvaluations checks the evaluation count: with p_c = p_m = 0
// every child equals a parent and inherits its evaluation, so only the
// initial 2N per island are evaluated; with the defaults each generation
// evaluates at most N per island.
func TestInheritedEvaluations(t *testing.T) {
	t.Parallel()
	p := zdt{n: 30, h: zdt1H}
	s := DefaultSettings(30)
	s.PopulationSize, s.Generations, s.Islands, s.MigrationEvery, s.Migrants = 10, 5, 2, 2, 3
	frozen := s
	frozen.CrossoverProbability, frozen.MutationProbability = 0, 0
	cp := &countingProblem{Problem: p}
	st := mustNew(t, cp, frozen)
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	if st.Evaluations() != 40 || cp.calls.Load() != 40 {
		t.Errorf("frozen run: %d evaluations counted, %d made, want 40", st.Evaluations(), cp.calls.Load())
	}
	cp = &countingProblem{Problem: p}
	st = mustNew(t, cp, s)
	if err := st.Run(context.Background()); err != nil {
		t.Fatal(err)
	}
	h := st.History()
	for g := 1; g < len(h); g++ {
		if d := h[g].Evaluations - h[g-1].Evaluations; d < 1 || d > 20 {
			t.Errorf("generation %d made %d evaluations, want 1 to 20", g, d)
		}
	}
	if int64(st.Evaluations()) != cp.calls.Load() {
		t.Errorf("%d evaluations counted, %d made", st.Evaluations(), cp.calls.Load())
	}
}
