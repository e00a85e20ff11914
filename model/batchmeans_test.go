package model

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The batch-means error against the closed form for an AR(1) sequence
// x_t = φ x_(t-1) + e_t, e_t ~ N(0, 1): stationary variance
// σ² = 1/(1-φ²) and
//
//	Var[x̄_n] = (σ²/n) [ (1+φ)/(1-φ) - 2φ(1-φⁿ) / (n (1-φ)²) ]
//
// (the variance of the mean of a first-order autoregression; e.g.
// Priestley, "Spectral Analysis and Time Series", Academic Press 1981,
// sec. 5.3, from memory; it follows from summing the autocovariances
// σ² φ^|k|). The squared error, averaged over R seeded replications,
// must match it.
func TestBatchMeansErrorMatchesAR1(t *testing.T) {
	t.Parallel()
	const (
		phi  = 0.9
		reps = 200
		m    = 2000 // samples per block: 200 correlation lengths 1/(1-φ)
		n    = meanBatches * m
	)
	// Tolerance: one estimate s_b²/B has a relative standard deviation of
	// sqrt(2/(B-1)) = 0.365 for B = 16 Gaussian block means, so the mean of
	// 200 has 0.026; 4 of those, plus the estimator's bias of order
	// (1/m)·2φ/(1-φ)² ≈ 0.9 % for these blocks.
	const tolerance = 4*0.026 + 0.01
	sigma2 := 1 / (1 - phi*phi)
	exact := sigma2 / n * ((1+phi)/(1-phi) - 2*phi*(1-math.Pow(phi, n))/(n*(1-phi)*(1-phi)))
	rnd := rand.New(rand.NewPCG(8608, 1))
	sum := 0.0
	for r := 0; r < reps; r++ {
		x := rnd.NormFloat64() * math.Sqrt(sigma2) // a stationary start
		var means [meanBatches]float64
		for b := range means {
			s := 0.0
			for i := 0; i < m; i++ {
				x = phi*x + rnd.NormFloat64()
				s += x
			}
			means[b] = s / m
		}
		e := batchMeansError(means[:])
		sum += e * e
	}
	got := sum / reps
	if rel := got/exact - 1; math.Abs(rel) > tolerance {
		t.Errorf("mean squared batch-means error %.4g, closed form %.4g (%+.1f%%); want within %.0f%%", got, exact, 100*rel, 100*tolerance)
	}
	if !math.IsNaN(batchMeansError([]float64{1})) {
		t.Error("one block gives an error; want NaN (no spread to estimate)")
	}
}

// blockBounds cuts a record into meanBatches consecutive blocks that
// cover it exactly, as timeStats.add assigns the samples.
func TestBlockBoundsCoverTheRecord(t *testing.T) {
	t.Parallel()
	for _, total := range []int{16, 17, 1000, 120001} {
		next := 0
		for b := 0; b < meanBatches; b++ {
			lo, hi := blockBounds(b, total)
			if lo != next || hi <= lo {
				t.Fatalf("total %d, block %d: [%d, %d); want it to start at %d and hold samples", total, b, lo, hi, next)
			}
			for _, i := range []int{lo, hi - 1} {
				if got := min(i*meanBatches/total, meanBatches-1); got != b {
					t.Fatalf("total %d: sample %d goes to block %d in add, to %d by blockBounds", total, i, got, b)
				}
			}
			next = hi
		}
		if next != total {
			t.Fatalf("total %d: the blocks end at %d", total, next)
		}
	}
}

// The statistical error Verify gives a mean shift must describe the
// scatter of that mean over independent road realisations: the sample
// standard deviation of the pitch and ride-height shifts over 8 seeds,
// for an asymmetric setup whose jacking wanders with the road, against
// the errors reported. With the linear car's spectral figure alone the
// reported error of the pitch shift was about 20 times smaller than this
// scatter, so every point of the demo front "differed". With the
// batch-means error the ratios were 0.28 (pitch) and 0.72 (ride heights)
// when this was written: conservative, as the errors of the other rows
// are, because the road's deterministic amplitudes make a whole record
// scatter less than its blocks do.
func TestVerifyMeanShiftErrorMatchesReplications(t *testing.T) {
	t.Parallel()
	const seeds = 8
	// Bounds on the ratio scatter/reported: the sample standard deviation
	// of 8 values is within a factor of about 0.5-1.5 of the true one
	// (chi-squared with 7 degrees of freedom, 1st and 99th percentiles,
	// 0.24 and 2.64 for s²/σ²; sqrt: 0.49, 1.62), and the reported errors
	// are upper bounds for a linear car (see Verify's doc), so anything
	// from well below 1 to the top of that range passes; a factor 3 is far
	// outside it.
	const lo, hi = 0.2, 1.7
	v := demoCar()
	a := AxleDamping{BumpRatio: 0.3, ReboundRatio: 0.9}
	s := Setup{Axles: [2]AxleDamping{a, a}}
	rc := demoCases()[1]
	metrics := []string{"pitch_shift_rad", "ride_height_shift_m[front]", "ride_height_shift_m[rear]"}
	vals := make([][]float64, len(metrics))
	errs := make([]float64, len(metrics))
	for seed := uint64(1); seed <= seeds; seed++ {
		rep, err := Verify(v, []RoadCase{rc}, s, VerifyOptions{Seed: seed, Time: TimeOptions{Duration: 60}})
		if err != nil {
			t.Fatal(err)
		}
		for k, name := range metrics {
			r, ok := rep.Cases[0].Row(name)
			if !ok {
				t.Fatalf("no row %s", name)
			}
			vals[k] = append(vals[k], r.Time)
			errs[k] += r.StatError / seeds
		}
	}
	for k, name := range metrics {
		mean, ss := 0.0, 0.0
		for _, x := range vals[k] {
			mean += x / seeds
		}
		for _, x := range vals[k] {
			ss += (x - mean) * (x - mean)
		}
		scatter := math.Sqrt(ss / (seeds - 1))
		ratio := scatter / errs[k]
		t.Logf("%s: scatter over %d seeds %.3g, mean reported error %.3g, ratio %.2f", name, seeds, scatter, errs[k], ratio)
		if ratio < lo || ratio > hi {
			t.Errorf("%s: the scatter over %d seeds is %.2f times the reported statistical error; want %g to %g", name, seeds, ratio, lo, hi)
		}
	}
}
