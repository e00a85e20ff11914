package model

import (
	"context"
	"errors"
	"math"
	"reflect"
	"testing"
)

// The 3-error bound is the two-sided tail of a Gaussian estimate at
// |z| = 3: 2Q(3) = 0.0026998 (Abramowitz & Stegun, "Handbook of
// Mathematical Functions", table 26.1, P(3) = 0.99865010; 2(1 - P)).
// Tolerance 1e-7: the table's eight decimals.
func TestVerdictSigmasIsTheGaussianTail(t *testing.T) {
	t.Parallel()
	const tableTail, tol = 2 * (1 - 0.99865010), 1e-7
	if got := math.Erfc(VerdictSigmas / math.Sqrt2); math.Abs(got-tableTail) > tol {
		t.Errorf("two-sided tail beyond %d errors: %g, table %g", VerdictSigmas, got, tableTail)
	}
}

// A row is judged by its statistical error: beyond VerdictSigmas of them
// it differs, at or within it holds, without one it is not judged. The
// expected verdicts are worked by hand from |Diff|/StatError.
func TestVerifyRowVerdict(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		row    VerifyRow
		want   Verdict
		sigmas float64 // NaN when not judged
	}{
		{"within", VerifyRow{Diff: -0.2, StatError: 0.1}, VerdictHolds, 2},
		{"at the bound holds", VerifyRow{Diff: 0.75, StatError: 0.25}, VerdictHolds, 3},
		{"beyond, negative", VerifyRow{Diff: -0.5, StatError: 0.125}, VerdictDiffers, 4},
		{"no error", VerifyRow{Diff: 10}, VerdictNotJudged, math.NaN()},
		{"infinite error", VerifyRow{Diff: 10, StatError: math.Inf(1)}, VerdictNotJudged, math.NaN()},
		{"NaN error", VerifyRow{Diff: 10, StatError: math.NaN()}, VerdictNotJudged, math.NaN()},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			got, s := tt.row.Verdict(), tt.row.Sigmas()
			if got != tt.want || (math.IsNaN(tt.sigmas) != math.IsNaN(s)) || (!math.IsNaN(s) && s != tt.sigmas) {
				t.Errorf("verdict %v, %g errors; want %v, %g", got, s, tt.want, tt.sigmas)
			}
		})
	}
}

// A case differs when one judged row does, a report when one case does;
// the summary names the worst judged row (the first of equal ones) and
// the largest time fractions. Figures worked by hand.
func TestVerifyReportVerdictAndSummary(t *testing.T) {
	t.Parallel()
	holds := VerifyCase{Rows: []VerifyRow{
		{Metric: "a", Diff: 1, StatError: 1},
		{Metric: "b", Diff: 100}, // not judged
	}}
	holds.Time.LiftOffProbability = [4]float64{0, 0.02, 0, 0}
	differs := VerifyCase{Rows: []VerifyRow{
		{Metric: "c", Diff: 2, StatError: 1},
		{Metric: "d", Diff: -5, StatError: 1},
		{Metric: "e", Diff: 5, StatError: 1},
	}}
	differs.Time.BumpStopProbability = [4]float64{0, 0, 0.5, 0.25}
	rep := &VerifyReport{Cases: []VerifyCase{holds, differs}}
	if holds.Verdict() != VerdictHolds || differs.Verdict() != VerdictDiffers || rep.Verdict() != VerdictDiffers {
		t.Errorf("verdicts %v, %v, report %v; want holds, differs, differs", holds.Verdict(), differs.Verdict(), rep.Verdict())
	}
	want := VerifySummary{Verdict: VerdictDiffers, Worst: 5, WorstMetric: "d", WorstCase: 1, LiftOff: 0.02, BumpStop: 0.5}
	if got := rep.Summary(); got != want {
		t.Errorf("summary %+v, want %+v", got, want)
	}
	one := &VerifyReport{Cases: []VerifyCase{holds}}
	if got := one.Summary(); got.Verdict != VerdictHolds || got.Worst != 1 || got.WorstMetric != "a" {
		t.Errorf("summary of a holding report %+v", got)
	}
	none := (&VerifyReport{Cases: []VerifyCase{{Rows: []VerifyRow{{Metric: "b", Diff: 1}}}}}).Summary()
	if none.Verdict != VerdictHolds || !math.IsNaN(none.Worst) || none.WorstMetric != "" {
		t.Errorf("summary without a judged row %+v; want holds, NaN, no metric", none)
	}
}

// VerifySetups gives each setup the report Verify gives it, whatever
// the parallelism; a bad setup is named by its position; a cancelled
// context ends it with the context's error.
func TestVerifySetups(t *testing.T) {
	t.Parallel()
	v, cases := demoCar(), demoCases()
	a, b := demoSetup(), tdLinearSetup(0.8)
	opt := VerifyOptions{Seed: 3, Time: TimeOptions{Duration: 2}}
	var want []*VerifyReport
	for _, s := range []Setup{a, b, a} {
		rep, err := Verify(v, cases, s, opt)
		if err != nil {
			t.Fatal(err)
		}
		want = append(want, rep)
	}
	for _, parallel := range []int{0, 1, 2, 5} {
		n := 0
		got, err := VerifySetups(context.Background(), v, cases, []Setup{a, b, a}, opt, parallel, func() { n++ })
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("parallel %d: the reports differ from Verify's one by one", parallel)
		}
		if parallel <= 1 && n != 3 {
			t.Errorf("parallel %d: done called %d times, want 3", parallel, n)
		}
	}

	_, err := VerifySetups(context.Background(), v, cases, []Setup{a, {}, b}, opt, 1, nil)
	var se *SetupError
	if !errors.As(err, &se) || se.Index != 1 {
		t.Fatalf("a bad second setup: %v; want a *SetupError at 1", err)
	}
	synthWantField(t, se.Err, "setup.front.bump_ratio")

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := VerifySetups(ctx, v, cases, []Setup{a}, opt, 1, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("a cancelled check: %v, want context.Canceled", err)
	}
}
