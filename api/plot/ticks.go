package plot

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// niceTicks marks a linear axis at multiples of a round step, 1, 2 or 5
// times a power of ten, chosen for about five labelled ticks, with one or
// four unlabelled ticks between labels. Zero is always a multiple, so an
// axis that spans it is marked there.
type niceTicks struct{}

var _ plot.Ticker = niceTicks{}

// Ticks implements plot.Ticker.
func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || !finite(lo) || !finite(hi) {
		return plot.DefaultTicks{}.Ticks(lo, hi)
	}
	step, minor := niceStep((hi - lo) / 5)
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
			t.Label = strconv.FormatFloat(v, 'f', decimals, 64)
		}
		ticks = append(ticks, t)
	}
	return ticks
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
