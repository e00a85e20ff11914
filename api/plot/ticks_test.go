package plot

import (
	"math"
	"testing"
)

// TestNiceTicks checks the laws of the linear tick marks over ranges of
// many sizes: labels at whole multiples of a step of 1, 2 or 5 × 10^k
// (the "nice numbers" of P. Heckbert, "Nice numbers for graph labels",
// Graphics Gems, 1990; cited from memory), 3 to 8 of them,
// zero labelled whenever the range spans it, every mark inside the range.
func TestNiceTicks(t *testing.T) {
	t.Parallel()
	const rel = 1e-9 // multiples are computed as k × step in floating point
	for _, r := range [][2]float64{{0, 1}, {-300, 300}, {-2496, 1498}, {4.5, 8.5}, {0.0008, 0.0037}, {0.76, 1.31}, {-1e6, 3e6}, {17, 18}} {
		ticks := niceTicks{}.Ticks(r[0], r[1])
		var labels []float64
		for _, tk := range ticks {
			if tk.Value < r[0]-rel*math.Abs(r[0]) || tk.Value > r[1]+rel*math.Abs(r[1]) {
				t.Errorf("range %v: mark %g outside", r, tk.Value)
			}
			if !tk.IsMinor() {
				labels = append(labels, tk.Value)
			}
		}
		if len(labels) < 3 || len(labels) > 8 {
			t.Errorf("range %v: %d labels %v, want 3 to 8", r, len(labels), labels)
			continue
		}
		step := labels[1] - labels[0]
		p := math.Pow(10, math.Floor(math.Log10(step)+rel))
		if m := step / p; math.Abs(m-1) > 1e-6 && math.Abs(m-2) > 1e-6 && math.Abs(m-5) > 1e-6 {
			t.Errorf("range %v: step %g is not 1, 2 or 5 × 10^k", r, step)
		}
		for _, v := range labels {
			if k := v / step; math.Abs(k-math.Round(k)) > 1e-6 {
				t.Errorf("range %v: label %g is not a multiple of %g", r, v, step)
			}
		}
		if r[0] <= 0 && r[1] >= 0 {
			found := false
			for _, v := range labels {
				found = found || v == 0
			}
			if !found {
				t.Errorf("range %v spans 0, labels %v do not", r, labels)
			}
		}
	}
}

// TestNiceTicksInteger checks that a count axis has whole-number marks only.
func TestNiceTicksInteger(t *testing.T) {
	t.Parallel()
	for _, hi := range []float64{1, 3, 7, 60, 250} {
		for _, tk := range (niceTicks{Integer: true}).Ticks(0, hi) {
			if tk.Value != math.Round(tk.Value) {
				t.Errorf("0..%g: mark %g is not whole", hi, tk.Value)
			}
		}
	}
}

func TestTickLabels(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		v, step float64
		want    string
	}{{0.5, 0.5, "0.5"}, {-1500, 500, "-1500"}, {2e-6, 2e-6, "2e-6"}, {1.9999999999e-6, 2e-6, "2e-6"}, {0, 2e-6, "0"}, {3e6, 1e6, "3e6"}} {
		dec := max(0, -int(math.Floor(math.Log10(tc.step)+1e-9)))
		if got := tickLabel(tc.v, tc.step, dec); got != tc.want {
			t.Errorf("tickLabel(%g, step %g) = %q, want %q", tc.v, tc.step, got, tc.want)
		}
	}
}

func TestDecadeLabels(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		k    int
		want string
	}{{-10, "1e-10"}, {-4, "1e-4"}, {-3, "0.001"}, {-1, "0.1"}, {0, "1"}, {2, "100"}, {3, "1000"}, {4, "1e4"}} {
		if got := decadeLabel(tc.k); got != tc.want {
			t.Errorf("decadeLabel(%d) = %q, want %q", tc.k, got, tc.want)
		}
	}
}
