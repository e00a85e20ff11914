package api

import (
	"context"
	"math"
	"os"
	"runtime"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/optimizer"
)

// demoSpec is testdata/demo-job.yaml without its constraints (a dense
// grid sweep, the engineer's alternative, knows no constraint handling
// either).
func demoSpec(tb testing.TB) *pb.JobSpec {
	tb.Helper()
	b, err := os.ReadFile("../testdata/demo-job.yaml")
	if err != nil {
		tb.Fatal(err)
	}
	spec := &pb.JobSpec{}
	if err := DecodeText(b, spec); err != nil {
		tb.Fatal(err)
	}
	spec.Constraints = nil
	return spec
}

// demoPlan compiles demoSpec, keeping its first nCases road cases.
func demoPlan(tb testing.TB, nCases int) *compiledSpec {
	tb.Helper()
	spec := demoSpec(tb)
	spec.RoadCases = spec.RoadCases[:nCases]
	pl, err := compileSpec(spec)
	if err != nil {
		tb.Fatal(err)
	}
	return pl
}

// BenchmarkSearchVsGrid measures search quality against what an engineer
// would otherwise do: a dense full-factorial sweep of the four damping
// ratios on the demo car with two road cases. It reports the hypervolume
// of the NSGA-II front as a fraction of the grid front's (both against
// one reference point: the grid front's worst values plus 10 % of its
// range), and the evaluation counts. Run it once:
//
//	go test -run xxx -bench SearchVsGrid -benchtime 1x ./api/
func BenchmarkSearchVsGrid(b *testing.B) {
	pl := demoPlan(b, 2)
	prob := pl.SearchProblem()
	const levels = 14 // 14⁴ = 38416 evaluations
	front, total := gridFront(prob, levels)
	ref := gridReference(front)
	workers := runtime.GOMAXPROCS(0)
	hvGrid := optimizer.Hypervolume(front, ref)
	b.ReportMetric(float64(total), "grid-evals")
	b.ResetTimer()
	for n := 0; n < b.N; n++ {
		worst := math.Inf(1)
		evals := 0
		for seed := uint64(1); seed <= 5; seed++ {
			s := pl.Settings(workers, nil)
			s.PopulationSize, s.Generations, s.Seed = 32, 34, seed
			s.ReferencePoint = ref
			st, err := optimizer.New(prob, s)
			if err != nil {
				b.Fatal(err)
			}
			if err := st.Run(context.Background()); err != nil {
				b.Fatal(err)
			}
			worst = math.Min(worst, hvOf(st.Front(), ref)/hvGrid)
			evals = st.Evaluations()
		}
		b.ReportMetric(worst, "hv-fraction-worst-of-5-seeds")
		b.ReportMetric(float64(evals), "nsga-evals")
		b.ReportMetric(float64(evals)/float64(total), "eval-fraction")
	}
}

// BenchmarkStudyEvaluations measures evaluations per second of a whole
// search on the demo car (three road cases) with 1 and 2 workers.
func BenchmarkStudyEvaluations(b *testing.B) {
	pl := demoPlan(b, 3)
	for _, workers := range []int{1, 2} {
		b.Run(map[int]string{1: "workers=1", 2: "workers=2"}[workers], func(b *testing.B) {
			evals := 0
			for n := 0; n < b.N; n++ {
				s := pl.Settings(workers, nil)
				s.PopulationSize, s.Generations, s.Seed = 32, 10, 1
				st, err := optimizer.New(pl.SearchProblem(), s)
				if err != nil {
					b.Fatal(err)
				}
				if err := st.Run(context.Background()); err != nil {
					b.Fatal(err)
				}
				evals += st.Evaluations()
			}
			b.ReportMetric(float64(evals)/b.Elapsed().Seconds(), "evals/s")
		})
	}
}
