package optimizer

import (
	"bytes"
	"context"
	"errors"
	"slices"
	"testing"

	"github.com/MaxHalford/eaopt"
)

// deSurvivors returns n ≤ 9 evaluated survivors in the box [0, 10]^genes,
// survivor k at index k with Fitness k, whose genes differ from every
// other survivor's gene by gene.
func deSurvivors(n, genes int) eaopt.Individuals {
	bounds := make([]Bound, genes)
	for j := range bounds {
		bounds[j] = Bound{0, 10}
	}
	env := &evalEnv{shape: problemShape{bounds: bounds, nObj: 2}}
	out := make(eaopt.Individuals, n)
	for k := range out {
		x := make([]float64, genes)
		for j := range x {
			x[j] = 1 + 0.8*float64(k) + 0.1*float64(j)
		}
		g := newGenome(env, x, 0, float64(k))
		g.evaluated = true
		out[k] = eaopt.Individual{Genome: g, Fitness: float64(k), Evaluated: true}
	}
	return out
}

// TestDifferentialChildLaw checks deChild against the definition of
// DE/rand/1/bin (Storn & Price 1997, eqs. 2 and 4): with CR = 1 every
// gene of the child is x1 + F (x2 − x3) for one pair of survivors x2, x3
// distinct from each other and from the base x1 (clipped to the box);
// with CR < 1 each gene comes from the mutant with probability CR, and
// one gene drawn uniformly always does, so the expected share of mutant
// genes is (1 + (n−1) CR)/n. Without mutation (p_m = 0) nothing else
// moves the child. The share must lie within 4 binomial standard errors
// of draws × n genes (a child's count, 1 + B(n−1, CR), varies less than
// B(n, share), so the band is conservative).
func TestDifferentialChildLaw(t *testing.T) {
	t.Parallel()
	const (
		genes = 5
		f     = 0.5
		draws = 20_000
		z     = 4 // standard errors
	)
	surv := deSurvivors(9, genes)
	rng := streamRand(3, 0, 0, 0)
	for range 200 {
		base := rng.Intn(len(surv))
		c := deChild(surv, base, f, 1, rng)
		x1 := surv[base].Genome.(*genome).genes
		found := false
		for r2 := range surv {
			for r3 := range surv {
				if r2 == r3 || r2 == base || r3 == base {
					continue
				}
				x2, x3 := surv[r2].Genome.(*genome).genes, surv[r3].Genome.(*genome).genes
				ok := true
				for j := range x1 {
					want := min(max(x1[j]+f*(x2[j]-x3[j]), 0), 10)
					if c.genes[j] != want {
						ok = false
						break
					}
				}
				found = found || ok
			}
		}
		if !found {
			t.Fatalf("child %v of base %v is not x1 + F (x2 − x3) for distinct survivors", c.genes, x1)
		}
		if changed := !slices.Equal(c.genes, x1); c.evaluated == changed {
			t.Fatalf("child %v of %v: evaluated %v", c.genes, x1, c.evaluated)
		}
	}
	const cr = 0.3
	fromMutant := 0
	for range draws {
		base := rng.Intn(len(surv))
		c := deChild(surv, base, f, cr, rng)
		x1 := surv[base].Genome.(*genome).genes
		moved := 0
		for j := range x1 {
			if c.genes[j] != x1[j] {
				moved++
			}
		}
		if moved == 0 {
			t.Fatal("no gene of the child came from the mutant")
		}
		fromMutant += moved
	}
	// Survivors differ in every gene, and a clipped mutant gene is at a
	// bound the survivors are not on, so a gene moved exactly when it
	// came from the mutant.
	want := (1 + (genes-1)*cr) / genes
	if !fractionWithin(fromMutant, draws*genes, want, z) {
		t.Errorf("share of mutant genes %.4f, want %.4f", float64(fromMutant)/float64(draws*genes), want)
	}
}

// TestDifferentialCheckpoint checks that a search with the differential
// variation writes version 4 checkpoints that restore bit for bit (also
// polished), and that a checkpoint is refused for the other variation or
// other weights, naming the field.
func TestDifferentialCheckpoint(t *testing.T) {
	t.Parallel()
	p := zdt{n: 10, h: zdt1H}
	s := withVariation(DefaultSettings(10), VariationDifferential)
	s.PopulationSize, s.Generations = 12, 6
	st := mustNew(t, p, s)
	if _, err := st.Step(context.Background(), 3); err != nil {
		t.Fatal(err)
	}
	ck, err := st.Checkpoint()
	if err != nil {
		t.Fatal(err)
	}
	if v := ck[len(checkpointMagic)]; v != 4 {
		t.Errorf("checkpoint version %d, want 4", v)
	}
	for _, tc := range []struct {
		edit  func(*Settings)
		field string
	}{
		{func(s *Settings) {
			*s = withVariation(*s, VariationSBX)
			s.DifferentialWeight, s.DifferentialCrossover = 0, 0
		}, "Settings.Variation"},
		{func(s *Settings) { s.DifferentialWeight = 0.6 }, "Settings.DifferentialWeight"},
		{func(s *Settings) { s.DifferentialCrossover = 0.9 }, "Settings.DifferentialCrossover"},
	} {
		s2 := s
		tc.edit(&s2)
		_, err := Restore(p, s2, ck)
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != tc.field {
			t.Errorf("got %v, want a FieldError on %s", err, tc.field)
		}
	}
	back, err := Restore(p, s, ck)
	if err != nil {
		t.Fatal(err)
	}
	want := finish(t, st)
	if got := finish(t, back); !bytes.Equal(got, want) {
		t.Error("restored differential search ends differently from the uninterrupted one")
	}
	if _, err := st.Polish(context.Background(), DefaultPolish(1)); err != nil {
		t.Fatal(err)
	}
	polished, _ := st.Checkpoint()
	again, err := Restore(p, s, polished)
	if err != nil {
		t.Fatal(err)
	}
	rep, ok := again.Polished()
	if want, _ := st.Polished(); !ok || rep != want {
		t.Errorf("restored polish report %+v, %v; want %+v", rep, ok, want)
	}
	if ck, _ := again.Checkpoint(); !bytes.Equal(ck, polished) {
		t.Error("polished differential checkpoint does not restore to the same bytes")
	}
}
