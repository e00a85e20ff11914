package optimizer

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// BenchmarkStudyZDT1 measures the search's own cost per evaluation on
// ZDT1 (30 genes, an evaluation of about 30 additions): N = 100, 50
// generations (5 200 evaluations) per iteration, with 1 and 2 workers.
// evals/s is mostly overhead here: survival, breeding, archive and
// hypervolume.
func BenchmarkStudyZDT1(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			benchStudy(b, zdt{n: 30, h: zdt1H}, workers)
		})
	}
}

// slowZDT1 is ZDT1 with about 20 µs of extra arithmetic per evaluation,
// standing for a model evaluation; it shows how parallel evaluation
// scales.
type slowZDT1 struct{ zdt }

func (s slowZDT1) Evaluate(x, obj, viol []float64) error {
	acc := x[0]
	for i := range 4000 {
		acc = math.Sqrt(acc + float64(i))
	}
	if err := s.zdt.Evaluate(x, obj, viol); err != nil {
		return err
	}
	obj[0] += acc * 0 // keep the loop, leave the objective alone
	return nil
}

func BenchmarkStudySlowZDT1(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			benchStudy(b, slowZDT1{zdt{n: 30, h: zdt1H}}, workers)
		})
	}
}

func benchStudy(b *testing.B, p Problem, workers int) {
	s := DefaultSettings(30)
	s.Generations, s.Workers = 50, workers
	b.ReportAllocs()
	evals := 0
	for b.Loop() {
		st, err := New(p, s)
		if err != nil {
			b.Fatal(err)
		}
		if err := st.Run(context.Background()); err != nil {
			b.Fatal(err)
		}
		evals += st.Evaluations()
	}
	b.ReportMetric(float64(evals)/b.Elapsed().Seconds(), "evals/s")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(evals), "ns/eval")
}

// BenchmarkGenomeEvaluate measures one evaluation through the genome, the
// per-evaluation hot path; it must not allocate.
func BenchmarkGenomeEvaluate(b *testing.B) {
	p := zdt{n: 30, h: zdt1H}
	shape, _ := readProblem(p)
	env := &evalEnv{problem: p, shape: shape, ctx: context.Background(), gate: make(chan struct{}, 1)}
	g := newGenome(env, make([]float64, 30), 0, 0)
	b.ReportAllocs()
	for b.Loop() {
		g.evaluated = false
		if _, err := g.Evaluate(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkHypervolume(b *testing.B) {
	for _, m := range []int{2, 3} {
		for _, n := range []int{100, 1000, 10000} {
			rng := rand.New(rand.NewPCG(uint64(m), uint64(n)))
			pts := make([][]float64, n)
			for i := range pts {
				// Points on the unit sphere's octant: all non-dominated.
				v := make([]float64, m)
				var r float64
				for j := range v {
					v[j] = math.Abs(rng.NormFloat64())
					r += v[j] * v[j]
				}
				for j := range v {
					v[j] /= math.Sqrt(r)
				}
				pts[i] = v
			}
			ref := make([]float64, m)
			for j := range ref {
				ref[j] = 1.1
			}
			b.Run(fmt.Sprintf("M=%d/n=%d", m, n), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					Hypervolume(pts, ref)
				}
			})
		}
	}
}

func BenchmarkNonDominatedSort(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	pts := randomPoints(rng, 200, 2, false)
	b.ReportAllocs()
	for b.Loop() {
		NonDominatedSort(pts, nil)
	}
}
