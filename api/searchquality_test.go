package api

import (
	"context"
	"math"
	"os"
	"runtime"
	"sync"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/optimizer"
)

// demoPlan compiles testdata/demo-job.yaml, keeping its first nCases
// road cases and dropping its constraints (a dense grid sweep, the
// engineer's alternative, knows no constraint handling either).
func demoPlan(tb testing.TB, nCases int) *compiledSpec {
	tb.Helper()
	b, err := os.ReadFile("../testdata/demo-job.yaml")
	if err != nil {
		tb.Fatal(err)
	}
	spec := &pb.JobSpec{}
	if err := DecodeText(b, spec); err != nil {
		tb.Fatal(err)
	}
	spec.RoadCases = spec.RoadCases[:nCases]
	spec.Constraints = nil
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
	bounds := prob.Bounds()
	const levels = 14 // 14⁴ = 38416 evaluations
	var mu sync.Mutex
	var gridPts [][]float64
	total := 1
	for range bounds {
		total *= levels
	}
	workers := runtime.GOMAXPROCS(0)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			x := make([]float64, len(bounds))
			obj := make([]float64, prob.NumObjectives())
			var local [][]float64
			for k := w; k < total; k += workers {
				r := k
				for g := range x {
					i := r % levels
					r /= levels
					x[g] = bounds[g].Lo + (bounds[g].Hi-bounds[g].Lo)*float64(i)/float64(levels-1)
				}
				if err := prob.Evaluate(x, obj, nil); err != nil {
					continue
				}
				local = append(local, append([]float64(nil), obj...))
			}
			mu.Lock()
			gridPts = append(gridPts, local...)
			mu.Unlock()
		}(w)
	}
	wg.Wait()
	fronts := optimizer.NonDominatedSort(gridPts, make([]float64, len(gridPts)))
	var gridFront [][]float64
	for _, i := range fronts[0] {
		gridFront = append(gridFront, gridPts[i])
	}
	ref := make([]float64, prob.NumObjectives())
	for j := range ref {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, p := range gridFront {
			lo, hi = math.Min(lo, p[j]), math.Max(hi, p[j])
		}
		ref[j] = hi + 0.1*(hi-lo)
	}
	hvGrid := optimizer.Hypervolume(gridFront, ref)
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
			var pts [][]float64
			for _, sol := range st.Front() {
				pts = append(pts, sol.Objectives)
			}
			worst = math.Min(worst, optimizer.Hypervolume(pts, ref)/hvGrid)
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
