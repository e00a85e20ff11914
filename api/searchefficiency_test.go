package api

import (
	"context"
	"math"
	"runtime"
	"sync"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/optimizer"
)

// efficiencyPlan is demoSpec on its own road cases or, when rough, on one
// ISO 8608 class C road at 50 m/s instead (a road far rougher than a
// track, where the fixed point needs more iterations and the front
// another shape), with edit applied to its search settings (nil leaves
// them).
func efficiencyPlan(tb testing.TB, rough bool, edit func(*pb.SearchSettings)) *compiledSpec {
	tb.Helper()
	spec := demoSpec(tb)
	if rough {
		spec.RoadCases = []*pb.RoadCase{{Name: "Rough road, ISO 8608 class C", SpeedMPerS: 50,
			Spectrum: &pb.RoadCase_IsoClass{IsoClass: pb.IsoClass_ISO_CLASS_C}}}
	}
	if edit != nil {
		edit(spec.Search)
	}
	pl, err := compileSpec(spec)
	if err != nil {
		tb.Fatal(err)
	}
	return pl
}

// efficientSearch is the search the README recommends for a job that
// must reach the front in few evaluations: the differential variation
// with its defaults and a population of 24.
func efficientSearch(q *pb.SearchSettings) {
	q.Variation = pb.Variation_VARIATION_DIFFERENTIAL
	q.PopulationSize = 24
}

// gridFront evaluates the full-factorial grid of levels values per gene
// (in parallel) and returns its non-dominated objective vectors and the
// number of evaluations.
func gridFront(prob optimizer.Problem, levels int) ([][]float64, int) {
	bounds := prob.Bounds()
	total := 1
	for range bounds {
		total *= levels
	}
	workers := runtime.GOMAXPROCS(0)
	var (
		mu  sync.Mutex
		pts [][]float64
		wg  sync.WaitGroup
	)
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			x := make([]float64, len(bounds))
			obj := make([]float64, prob.NumObjectives())
			viol := make([]float64, prob.NumConstraints())
			var local [][]float64
			for k := w; k < total; k += workers {
				r := k
				for g := range x {
					x[g] = bounds[g].Lo + (bounds[g].Hi-bounds[g].Lo)*float64(r%levels)/float64(levels-1)
					r /= levels
				}
				if prob.Evaluate(x, obj, viol) == nil {
					local = append(local, append([]float64(nil), obj...))
				}
			}
			mu.Lock()
			pts = append(pts, local...)
			mu.Unlock()
		}()
	}
	wg.Wait()
	var front [][]float64
	for _, i := range optimizer.NonDominatedSort(pts, nil)[0] {
		front = append(front, pts[i])
	}
	return front, total
}

// gridReference is the grid front's worst value of each objective plus
// 10 % of its range.
func gridReference(front [][]float64) []float64 {
	ref := make([]float64, len(front[0]))
	for j := range ref {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, p := range front {
			lo, hi = min(lo, p[j]), max(hi, p[j])
		}
		ref[j] = hi + 0.1*(hi-lo)
	}
	return ref
}

// efficiencyTarget is what a search is measured against on one car: the
// 11-level grid's evaluations, its front's reference point (worst values
// plus 10 % of the range) and hypervolume.
type efficiencyTarget struct {
	total  int
	ref    []float64
	target float64
}

// efficiencyTargets holds the grid of each car, computed once per test
// binary (the test and the benchmark share it); index 1 is the rough road.
var efficiencyTargets [2]struct {
	once sync.Once
	t    efficiencyTarget
}

// gridTarget returns the grid target of the car (see efficiencyPlan):
// 14 641 evaluations, about 20 s on two cores for both cars.
func gridTarget(tb testing.TB, rough bool) efficiencyTarget {
	tb.Helper()
	k := 0
	if rough {
		k = 1
	}
	e := &efficiencyTargets[k]
	e.once.Do(func() {
		front, total := gridFront(efficiencyPlan(tb, rough, nil).SearchProblem(), 11)
		ref := gridReference(front)
		e.t = efficiencyTarget{total: total, ref: ref, target: optimizer.Hypervolume(front, ref)}
	})
	if e.t.total == 0 {
		tb.Fatal("grid target not computed")
	}
	return e.t
}

// efficiencyBudget caps the evaluations one seed may take to reach the
// target before it counts as not reached.
const efficiencyBudget = 1500

// hvOf is the hypervolume of a front against ref.
func hvOf(front []optimizer.Solution, ref []float64) float64 {
	pts := make([][]float64, len(front))
	for i, s := range front {
		pts[i] = s.Objectives
	}
	return optimizer.Hypervolume(pts, ref)
}

// evalsTo99 runs the search of pl with the seed one generation at a time
// and returns the evaluations after which the archive first holds 99 %
// of the grid target's hypervolume (0 when not within efficiencyBudget).
// With a polish budget it also tries, at every second generation before
// that, to stop the search there and polish its archive (the search
// restored from its checkpoint there as finished), and returns the
// fewest search plus polish evaluations that reach the target, the
// search alone included.
func evalsTo99(tb testing.TB, pl *compiledSpec, seed uint64, g efficiencyTarget, polish int) int {
	prob := pl.SearchProblem()
	s := pl.Settings(1, nil)
	s.Generations, s.Seed, s.ReferencePoint = efficiencyBudget/s.PopulationSize, seed, g.ref
	st, err := optimizer.New(prob, s)
	if err != nil {
		tb.Fatal(err)
	}
	type cut struct {
		generation int
		checkpoint []byte
	}
	var cuts []cut
	reached := 0
	for !st.Done() && st.Evaluations() <= efficiencyBudget {
		if _, err := st.Step(context.Background(), 1); err != nil {
			tb.Fatal(err)
		}
		if hvOf(st.Front(), g.ref) >= 0.99*g.target {
			reached = st.Evaluations()
			break
		}
		if polish > 0 && st.Generation()%2 == 0 {
			ck, err := st.Checkpoint()
			if err != nil {
				tb.Fatal(err)
			}
			cuts = append(cuts, cut{st.Generation(), ck})
		}
	}
	for _, c := range cuts {
		at := s
		at.Generations = c.generation
		copyAt, err := optimizer.Restore(prob, at, c.checkpoint)
		if err != nil {
			tb.Fatal(err)
		}
		p := optimizer.DefaultPolish(seed)
		p.Budget, p.Workers = polish, runtime.GOMAXPROCS(0)
		rep, err := copyAt.Polish(context.Background(), p)
		if err != nil {
			tb.Fatal(err)
		}
		e := copyAt.Evaluations() + rep.Evaluations
		if reached != 0 && e >= reached {
			break
		}
		if rep.Hypervolume >= 0.99*g.target {
			return e
		}
	}
	return reached
}

// efficiencyCars are the two cars of the measurement.
var efficiencyCars = []struct {
	name  string
	rough bool
}{{"demo", false}, {"classC50", true}}

// maxGridShare is the target: every seed reaches 99 % of the
// grid front's hypervolume within 3 % of the grid's evaluations.
const maxGridShare = 0.03

// TestSearchEfficiency checks the recommended efficient search (the
// differential variation, population 24: efficientSearch) against an
// 11-level full-factorial grid over the four damping ratios (14 641
// evaluations), the exhaustive search an engineer would otherwise run:
// on the demo car on its own road cases and on one ISO 8608 class C road
// at 50 m/s, each of seeds 1 to 8 must reach 99 % of the grid front's
// hypervolume (both against the grid front's worst values plus 10 % of
// its range) within 3 % of the grid's evaluations (439). The 3 % and
// 99 % are the project's target, not published figures; measured worst
// seeds are 1.8 % and 2.3 % (README), so the margin is about a quarter
// of the budget. With SBX (the default variation) the same check fails:
// worst seeds 4.7 % and 7.1 % at population 48.
func TestSearchEfficiency(t *testing.T) {
	if testing.Short() {
		t.Skip("evaluates two grids of 14 641 setups (about 20 s on two cores)")
	}
	t.Parallel()
	for _, car := range efficiencyCars {
		t.Run(car.name, func(t *testing.T) {
			g := gridTarget(t, car.rough)
			pl := efficiencyPlan(t, car.rough, efficientSearch)
			limit := int(maxGridShare * float64(g.total))
			for seed := uint64(1); seed <= 8; seed++ {
				e := evalsTo99(t, pl, seed, g, 0)
				t.Logf("seed %d: %d evaluations (%.2f %% of %d)", seed, e, 100*float64(e)/float64(g.total), g.total)
				if e == 0 || e > limit {
					t.Errorf("seed %d: %d evaluations to 99 %% of the grid's hypervolume, want 1 to %d (0: not within %d)",
						seed, e, limit, efficiencyBudget)
				}
			}
		})
	}
}

// BenchmarkEvaluationsTo99 measures search efficiency (issue: at most 3 %
// of a dense grid's evaluations to reach 99 % of its hypervolume) on the
// cars and against the grids of TestSearchEfficiency: for seeds 1 to 8
// the search runs generation by generation and the benchmark reports the
// evaluations each seed needs until its archive holds 99 % of the grid
// front's hypervolume, for SBX (the default variation) with the default
// population of 48, with 16, and with 16 and a polish of 4 evaluations
// per point tried at every second generation (the evaluations of a
// search stopped there and polished), and for the differential variation
// with populations of 48 and 24. 0 means not reached within 1500
// evaluations. Run it once; it takes a few minutes on two cores:
//
//	go test -run xxx -bench EvaluationsTo99 -benchtime 1x -timeout 0 ./api/
func BenchmarkEvaluationsTo99(b *testing.B) {
	rows := []struct {
		name   string
		edit   func(*pb.SearchSettings)
		polish int
	}{
		{"SBX/N=48", func(q *pb.SearchSettings) { q.PopulationSize = 48 }, 0},
		{"SBX/N=16", func(q *pb.SearchSettings) { q.PopulationSize = 16 }, 0},
		{"SBX/N=16/polish=4", func(q *pb.SearchSettings) { q.PopulationSize = 16 }, 4},
		{"differential/N=48", func(q *pb.SearchSettings) {
			efficientSearch(q)
			q.PopulationSize = 48
		}, 0},
		{"differential/N=24", efficientSearch, 0},
	}
	for _, car := range efficiencyCars {
		b.Run(car.name, func(b *testing.B) {
			g := gridTarget(b, car.rough)
			for _, row := range rows {
				pl := efficiencyPlan(b, car.rough, row.edit)
				b.Run(row.name, func(b *testing.B) {
					for b.Loop() {
						worst, sum := 0, 0
						const seeds = 8
						for seed := uint64(1); seed <= seeds; seed++ {
							e := evalsTo99(b, pl, seed, g, row.polish)
							b.Logf("seed %d: %d evaluations (%.2f %% of %d)", seed, e, 100*float64(e)/float64(g.total), g.total)
							if e == 0 {
								e = math.MaxInt32
							}
							worst, sum = max(worst, e), sum+e
						}
						b.ReportMetric(float64(worst), "worst-evals")
						b.ReportMetric(100*float64(worst)/float64(g.total), "worst-%grid")
						b.ReportMetric(float64(sum)/seeds, "mean-evals")
					}
				})
			}
		})
	}
}
