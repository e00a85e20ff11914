package plot

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
)

// niceTicks marks a linear axis at multiples of a round step, 1, 2 or 5
// times a power of ten, chosen for about five labelled ticks, with three
// or four unlabelled ticks between labels. Zero is always a multiple, so
// an axis that spans it is marked there. Integer marks only counts, such
// as generations: its step is at least 1 and it has no minor ticks
// between integers.
type niceTicks struct{ Integer bool }

var _ plot.Ticker = niceTicks{}

// Ticks implements plot.Ticker.
func (nt niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || !finite(lo) || !finite(hi) {
		return plot.DefaultTicks{}.Ticks(lo, hi)
	}
	step, minor := niceStep((hi - lo) / 5)
	if nt.Integer {
		step = math.Max(step, 1)
		if step/float64(minor) < 1 {
			minor = int(step)
		}
	}
	decimals := max(0, -int(math.Floor(math.Log10(step)+1e-9)))
	var ticks []plot.Tick
	sub := step / float64(minor)
	for k := math.Ceil(lo / sub); k*sub <= hi*(1+1e-12)+1e-300; k++ {
		v := k * sub
		if math.Abs(v) < sub*1e-9 {
			v = 0
		}
		t := plot.Tick{Value: v}
		if int64(math.Round(k))%int64(minor) == 0 {
			t.Label = tickLabel(v, step, decimals)
		}
		ticks = append(ticks, t)
	}
	return ticks
}

// tickLabel writes a label of a linear axis: a decimal with the step's
// decimals, or, for steps below 0.001 or values from a million, the
// shortest exponent form ("2e-6").
func tickLabel(v, step float64, decimals int) string {
	if v == 0 {
		return "0"
	}
	if step < 1e-3 || math.Abs(v) >= 1e6 {
		s := strconv.FormatFloat(v, 'g', 6, 64)
		return strings.NewReplacer("e-0", "e-", "e+0", "e", "e+", "e").Replace(s)
	}
	return strconv.FormatFloat(v, 'f', decimals, 64)
}

// niceStep rounds a raw step to the nearest (in ratio) of 1, 2 or 5 ×
// 10^k and returns it with the number of intervals a label interval is
// split into.
func niceStep(raw float64) (step float64, minor int) {
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	f := raw / p
	switch {
	case f < math.Sqrt(2):
		return p, 5
	case f < math.Sqrt(10):
		return 2 * p, 4
	case f < math.Sqrt(50):
		return 5 * p, 5
	}
	return 10 * p, 5
}

// decadeTicks marks an axis whose data are log10 of the value: a tick at
// every decade, labelled (every other one beyond eight decades), and
// unlabelled ticks at 2 to 9 times it when the axis spans few enough
// decades for them to be told apart. Decades from 0.001 to 1000 are
// labelled as decimals, the others as 1e-6 and so on.
//
// The log10 transform is done on the data instead of with plot.LogScale:
// gonum places a log axis's label by the midpoint of its data range,
// which on a log scale pads the panel by most of the label's length.
type decadeTicks struct{}

var _ plot.Ticker = decadeTicks{}

// Ticks implements plot.Ticker.
func (decadeTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || !finite(lo) || !finite(hi) {
		return nil
	}
	step := 1.0
	if hi-lo > 8 {
		step = 2
	}
	minors := hi-lo <= 6
	var ticks []plot.Tick
	for k := math.Floor(lo); k <= hi; k++ {
		if k >= lo {
			t := plot.Tick{Value: k}
			if math.Mod(k, step) == 0 {
				t.Label = decadeLabel(int(k))
			}
			ticks = append(ticks, t)
		}
		if minors {
			for m := 2.0; m < 10; m++ {
				if v := k + math.Log10(m); v >= lo && v <= hi {
					ticks = append(ticks, plot.Tick{Value: v})
				}
			}
		}
	}
	return ticks
}

// decadeLabel is the label of 10^k: a decimal from 0.001 to 1000,
// "1e-6" beyond.
func decadeLabel(k int) string {
	if k >= -3 && k <= 3 {
		return strconv.FormatFloat(math.Pow(10, float64(k)), 'f', max(0, -k), 64)
	}
	return "1e" + strconv.Itoa(k)
}
