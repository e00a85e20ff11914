package model

import (
	"fmt"
	"reflect"
	"testing"
)

// TestResponseCacheSameBits checks that an evaluation with the cached
// damper-independent parts (responsecache.go) gives the same result as
// one that computes them at every sweep, on the symmetric and the
// general path, on a rough and a smooth road, with knee dampers (so the
// fixed point iterates) and with heave dampers. Tolerance: none, the
// results must be equal to the last bit: the cache stores the numbers
// the uncached path computes, with the same operations in the same
// order, so any difference is a bug (and would move the stored digests
// that api/testdata/stored holds against earlier versions).
func TestResponseCacheSameBits(t *testing.T) {
	t.Parallel()
	knee := demoSetup()
	heave := knee
	heave.Heave = [2]AxleDamping{knee.Axles[Front], knee.Axles[Rear]}
	cases := []RoadCase{roughCase(), demoCases()[0], demoCases()[1]}
	for _, tc := range []struct {
		name    string
		v       Vehicle
		s       Setup
		general bool
	}{
		{"symmetric", demoCar(), knee, false},
		{"general", demoCar(), knee, true},
		{"asymmetric", asymmetricCar(), knee, false},
		{"heave", heaveCar(), heave, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			cached, err := NewEvaluator(tc.v, cases, EvaluatorOptions{General: tc.general})
			if err != nil {
				t.Fatal(err)
			}
			plain, err := NewEvaluator(tc.v, cases, EvaluatorOptions{General: tc.general})
			if err != nil {
				t.Fatal(err)
			}
			for i := range plain.cases {
				if cached.cases[i].cache == nil {
					t.Fatalf("case %d not cached", i)
				}
				plain.cases[i].cache = nil
			}
			var got, want Result
			if err := cached.Evaluate(tc.s, &got); err != nil {
				t.Fatal(err)
			}
			if err := plain.Evaluate(tc.s, &want); err != nil {
				t.Fatal(err)
			}
			for i := range want.Cases {
				if want.Cases[i].Iterations < 2 {
					t.Errorf("%s: %d iterations: the fixed point was not exercised", cases[i].Name, want.Cases[i].Iterations)
				}
				if !reflect.DeepEqual(got.Cases[i], want.Cases[i]) {
					t.Errorf("%s: cached\n%+v\nuncached\n%+v", cases[i].Name, got.Cases[i], want.Cases[i])
				}
			}
		})
	}
}

// TestResponseCacheBudget checks that an Evaluator caches cases only
// while their size fits cacheBudget, and that the size it counts is the
// size it holds.
func TestResponseCacheBudget(t *testing.T) {
	t.Parallel()
	if testing.Short() {
		t.Skip("prepares 28 cases on a 2001-point grid")
	}
	grid := Grid{MinHz: 0.1, MaxHz: 250, Points: 2001}
	var cases []RoadCase
	for i := 0; i < 28; i++ { // one past what fits
		rc := roughCase()
		rc.Name = fmt.Sprintf("rough %d", i)
		cases = append(cases, rc)
	}
	ev, err := NewEvaluator(demoCar(), cases, EvaluatorOptions{Grid: grid, General: true})
	if err != nil {
		t.Fatal(err)
	}
	total, cachedCases := 0, 0
	for _, cd := range ev.cases {
		if cd.cache == nil {
			continue
		}
		cachedCases++
		for _, cc := range cd.cache {
			total += 8*len(cc.kd) + 16*len(cc.rhs)
		}
	}
	// 616 bytes a point on the general path (7×7 reals and 7×2
	// complex numbers): 2001 points take 1,232,616 bytes a case, so
	// 27 cases fit 32 MiB.
	if per := 2001 * (8*7*7 + 16*7*2); cachedCases != cacheBudget/per || total != cachedCases*per {
		t.Errorf("%d cases cached in %d bytes, want %d cases of %d bytes", cachedCases, total, cacheBudget/per, per)
	}
	if total > cacheBudget {
		t.Errorf("cache holds %d bytes, over the budget of %d", total, cacheBudget)
	}
}
